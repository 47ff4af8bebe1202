import { describe, expect, it } from 'vitest';
import { chiSquareTest } from './chi-square.ts';
import { loadFixture, mismatch, relativeError } from '../analysis/load-fixture.ts';

interface ChiCase {
  observed: number[];
  probabilities: number[];
  fitted?: number;
  minExpected?: number;
  groups: number;
  dof: number;
  statistic: number;
  pValue: number | null;
}
const fixture = loadFixture<{ cases: ChiCase[] }>('chi-square');
const cases = fixture.cases.map((c, index) => ({ ...c, index }));

describe('chiSquareTest against scipy.stats.chisquare', () => {
  // reference library: scipy.stats.chisquare over bins merged by the same rule,
  // re-implemented in test/fixtures/make-chi-square.py
  it.each(cases)('case $index: observed $observed', (c) => {
    const r = chiSquareTest(c.observed, c.probabilities, {
      fittedParameters: c.fitted,
      minExpected: c.minExpected,
    });
    const input = `case ${c.index}`;
    expect(r.groups, `${input}: groups`).toBe(c.groups);
    expect(r.dof, `${input}: dof`).toBe(c.dof);
    const tolStat = 1e-12;
    expect(relativeError(r.statistic, c.statistic), mismatch(`${input} statistic`, r.statistic, c.statistic, tolStat)).toBeLessThan(tolStat);
    if (c.pValue === null) {
      expect(r.pValue, `${input}: no test possible at dof ${r.dof}`).toBeNaN();
    } else {
      const tolP = 1e-10; // upper incomplete gamma, stdlib vs scipy/Cephes
      expect(relativeError(r.pValue, c.pValue), mismatch(`${input} p`, r.pValue, c.pValue, tolP)).toBeLessThan(tolP);
    }
  });
});

describe('chiSquareTest by hand', () => {
  it('merges a short leading run and a short tail into their neighbours', () => {
    // exact by hand: 100 counts, expected 2, 3, 45, 46, 2, 2 → 2+3 = 5 closes a group; 45; 46;
    // the tail 2+2 = 4 < 5 joins 46 → groups with expected [5, 45, 50] and observed [5, 45, 50]
    const r = chiSquareTest([1, 4, 45, 46, 1, 3], [0.02, 0.03, 0.45, 0.46, 0.02, 0.02]);
    expect(r.groups).toBe(3);
    expect(r.dof).toBe(2);
    expect(r.statistic).toBeLessThan(1e-26);
    expect(r.pValue).toBeCloseTo(1, 12);
  });

  it('accepts unnormalised probabilities (weights)', () => {
    const a = chiSquareTest([10, 20, 30], [1, 2, 3]);
    const b = chiSquareTest([10, 20, 30], [1 / 6, 2 / 6, 3 / 6]);
    expect(a.statistic).toBeCloseTo(0, 12);
    expect(Math.abs(a.statistic - b.statistic)).toBeLessThan(1e-12);
  });
});
