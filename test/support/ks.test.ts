import { describe, expect, it } from 'vitest';
import { kolmogorovTail, ksStatistic, ksTwoSample } from './ks.ts';
import { loadFixture, mismatch, relativeError } from '../analysis/load-fixture.ts';

interface KsFixture {
  first: number[];
  base: number[];
  cases: { scale: number; shift: number; statistic: number; pValue: number }[];
  tail: { lambda: number; expected: number }[];
}
const fixture = loadFixture<KsFixture>('ks');
const first = Float64Array.from(fixture.first);

/** Second sample of a case, built element by element exactly as make-ks.py does. */
function secondSample(scale: number, shift: number): Float64Array {
  const out = new Float64Array(fixture.base.length);
  for (let i = 0; i < out.length; i++) out[i] = fixture.base[i] * scale + shift;
  return out;
}

describe('kolmogorovTail', () => {
  // reference library: scipy.stats.kstwobign.sf, test/fixtures/make-ks.py
  it.each(fixture.tail)('Q_KS($lambda) = $expected (scipy kstwobign.sf)', ({ lambda, expected }) => {
    const actual = kolmogorovTail(lambda);
    const tol = 1e-12;
    expect(relativeError(actual, expected), mismatch(`Q_KS(${lambda})`, actual, expected, tol)).toBeLessThan(tol);
  });

  it('is 1 at λ ≤ 0 and NaN for NaN', () => {
    expect(kolmogorovTail(0)).toBe(1);
    expect(kolmogorovTail(-1)).toBe(1);
    expect(kolmogorovTail(NaN)).toBeNaN();
  });
});

describe('ksTwoSample against scipy ks_2samp(method="asymp")', () => {
  // reference library: scipy.stats.ks_2samp, test/fixtures/make-ks.py (200 + 300 values, with ties)
  it.each(fixture.cases)('scale=$scale shift=$shift: D = $statistic', ({ scale, shift, statistic }) => {
    const actual = ksTwoSample(first, secondSample(scale, shift)).statistic;
    const tol = 1e-14;
    expect(Math.abs(actual - statistic), mismatch(`D(scale ${scale}, shift ${shift})`, actual, statistic, tol)).toBeLessThan(tol);
  });

  // scipy's 'asymp' p is the exact one-sample law kstwo(round(nₑ)) = kstwo(120) at D, ours is the
  // Kolmogorov limit with Stephens' correction at nₑ = 120 exactly: two different approximations
  // of the same finite-sample law, so they agree to a few percent, not to machine precision.
  it.each(fixture.cases)('scale=$scale shift=$shift: p = $pValue within 5 %', ({ scale, shift, pValue }) => {
    const actual = ksTwoSample(first, secondSample(scale, shift)).pValue;
    const tol = 0.05;
    expect(relativeError(actual, pValue), mismatch(`p(scale ${scale}, shift ${shift})`, actual, pValue, tol)).toBeLessThan(tol);
  });
});

describe('ksStatistic edge cases', () => {
  it('does not modify its inputs', () => {
    const x = Float64Array.from([3, 1, 2]);
    const y = Float64Array.from([0.5, 2.5]);
    ksStatistic(x, y);
    expect(Array.from(x)).toEqual([3, 1, 2]);
    expect(Array.from(y)).toEqual([0.5, 2.5]);
  });

  it('is 0 for identical samples, 1 for disjoint ones, and symmetric', () => {
    const x = Float64Array.from([1, 2, 2, 3, 5]);
    expect(ksStatistic(x, Float64Array.from(x))).toBe(0);
    expect(ksStatistic(x, Float64Array.from([6, 7]))).toBe(1);
    const y = Float64Array.from([2, 4, 4.5]);
    expect(ksStatistic(x, y)).toBe(ksStatistic(y, x));
  });

  it('handles ties across samples (by hand: x = {1, 2, 2}, y = {2, 3} → D = 1/2)', () => {
    // exact by hand: after value 1, F₁ = 1/3, F₂ = 0; after 2, F₁ = 1, F₂ = 1/2; after 3, both 1
    expect(ksStatistic(Float64Array.from([1, 2, 2]), Float64Array.from([2, 3]))).toBe(0.5);
  });

  it('gives NaN for an empty sample', () => {
    const r = ksTwoSample(new Float64Array(0), Float64Array.from([1]));
    expect(r.statistic).toBeNaN();
    expect(r.pValue).toBeNaN();
  });
});
