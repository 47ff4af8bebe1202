import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { mcnemarExact, pairedDifference } from '../../src/analysis/mcnemar.ts';
import { loadFixture, mismatch, relativeError } from './load-fixture.ts';

interface McnemarFixture {
  exact: { b: number; c: number; expected: number }[];
  paired: {
    bothWrong: number;
    onlyAWrong: number;
    onlyBWrong: number;
    n: number;
    confidence: number;
    difference: number;
    low: number;
    high: number;
  }[];
}
const fixture = loadFixture<McnemarFixture>('mcnemar');

describe('mcnemarExact', () => {
  // reference library: scipy.stats.binomtest(min(b, c), b + c, 0.5).pvalue, test/fixtures/make-mcnemar.py
  it.each(fixture.exact)('b=$b c=$c → p = $expected (scipy binomtest)', ({ b, c, expected }) => {
    const actual = mcnemarExact(b, c);
    const tol = 1e-10;
    expect(relativeError(actual, expected), mismatch(`mcnemarExact(${b}, ${c})`, actual, expected, tol)).toBeLessThan(tol);
  });

  it('is symmetric in b and c and equals 1 when b = c', () => {
    for (const [b, c] of [[0, 4], [3, 11], [25, 60]]) expect(mcnemarExact(b, c)).toBe(mcnemarExact(c, b));
    expect(mcnemarExact(17, 17)).toBe(1);
    expect(mcnemarExact(0, 0)).toBe(1);
  });

  it('gives 2·2^−n for an all-one-sided table (b = 0, c = n)', () => {
    // exact by hand: P(X ≤ 0) = 2^−n under Binomial(n, ½), doubled for two sides
    for (const n of [1, 5, 20, 60]) {
      const expected = Math.min(1, 2 * 2 ** -n);
      const actual = mcnemarExact(0, n);
      expect(relativeError(actual, expected), mismatch(`mcnemarExact(0, ${n})`, actual, expected, 1e-12)).toBeLessThan(1e-12);
    }
  });
});

describe('pairedDifference (Newcombe 1998 method 10)', () => {
  // reference library: Newcombe, Stat. Med. 17, 2635 (1998) method 10 evaluated in Python over
  // scipy binomtest Wilson intervals (a second, independent implementation), test/fixtures/make-mcnemar.py
  it.each(fixture.paired)(
    'a=$bothWrong b=$onlyAWrong c=$onlyBWrong n=$n c=$confidence',
    ({ bothWrong, onlyAWrong, onlyBWrong, n, confidence, difference, low, high }) => {
      const actual = pairedDifference({ bothWrong, onlyAWrong, onlyBWrong, n }, confidence);
      const tol = 1e-10;
      const input = `(${bothWrong}, ${onlyAWrong}, ${onlyBWrong}, ${n}, ${confidence})`;
      expect(actual.difference).toBe(difference);
      expect(Math.abs(actual.low - low), mismatch(`low${input}`, actual.low, low, tol)).toBeLessThan(tol);
      expect(Math.abs(actual.high - high), mismatch(`high${input}`, actual.high, high, tol)).toBeLessThan(tol);
    },
  );

  it('flips sign when A and B swap, and n = 0 gives NaN in [−1, 1]', () => {
    const ab = pairedDifference({ bothWrong: 4, onlyAWrong: 9, onlyBWrong: 2, n: 300 }, 0.95);
    const ba = pairedDifference({ bothWrong: 4, onlyAWrong: 2, onlyBWrong: 9, n: 300 }, 0.95);
    expect(ba.difference).toBe(-ab.difference);
    expect(Math.abs(ba.low + ab.high)).toBeLessThan(1e-15);
    expect(Math.abs(ba.high + ab.low)).toBeLessThan(1e-15);
    const none = pairedDifference({ bothWrong: 0, onlyAWrong: 0, onlyBWrong: 0, n: 0 }, 0.95);
    expect(none.difference).toBeNaN();
    expect([none.low, none.high]).toEqual([-1, 1]);
  });

  // Monte Carlo coverage, fixed seeds. from memory: Newcombe (1998) reports method 10 coverage
  // close to nominal (mean ≈ 0.95, rarely below 0.93) over a wide grid of tables. With 2000
  // replicates the coverage estimate has a standard error ≈ 0.005, so [0.925, 0.975] is ±5 s.e.
  it.each([
    { seed: 'paired-1', n: 500, pBoth: 0.01, pA: 0.03, pB: 0.02 },
    { seed: 'paired-2', n: 2000, pBoth: 0.0, pA: 0.004, pB: 0.002 },
    { seed: 'paired-3', n: 100, pBoth: 0.3, pA: 0.1, pB: 0.1 },
    { seed: 'paired-4', n: 1000, pBoth: 0.05, pA: 0.01, pB: 0.03 },
  ])('95 % coverage near nominal: n=$n both=$pBoth onlyA=$pA onlyB=$pB', ({ seed, n, pBoth, pA, pB }) => {
    const random = seedrandom(seed);
    const truth = pA - pB;
    const replicates = 2000;
    let covered = 0;
    for (let r = 0; r < replicates; r++) {
      let a = 0;
      let b = 0;
      let c = 0;
      for (let i = 0; i < n; i++) {
        const u = random();
        if (u < pBoth) a++;
        else if (u < pBoth + pA) b++;
        else if (u < pBoth + pA + pB) c++;
      }
      const ci = pairedDifference({ bothWrong: a, onlyAWrong: b, onlyBWrong: c, n }, 0.95);
      if (ci.low <= truth && truth <= ci.high) covered++;
    }
    const coverage = covered / replicates;
    expect(coverage, `coverage ${coverage} (seed ${seed}), expected in [0.925, 0.975]`).toBeGreaterThan(0.925);
    expect(coverage, `coverage ${coverage} (seed ${seed}), expected in [0.925, 0.975]`).toBeLessThan(0.975);
  });
});
