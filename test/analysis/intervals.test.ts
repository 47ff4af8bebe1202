import { describe, expect, it } from 'vitest';
import { clopperPearsonInterval, wilsonInterval, zForConfidence } from '../../src/analysis/intervals.ts';
import { loadFixture, mismatch, relativeError } from './load-fixture.ts';

interface IntervalCase {
  k: number;
  n: number;
  confidence: number;
  z: number;
  wilson: [number, number];
  exact: [number, number];
  exactBeta: [number, number];
}
const fixture = loadFixture<{ cases: IntervalCase[] }>('intervals');

/** Relative error, or absolute when the expected bound is exactly 0 or 1 (k = 0, k = n). */
function boundError(actual: number, expected: number): number {
  return expected === 0 || expected === 1 ? Math.abs(actual - expected) : relativeError(actual, expected);
}

describe('published check values (3 significant digits)', () => {
  // published: Wilson, J. Am. Stat. Assoc. 22, 209 (1927); Clopper & Pearson, Biometrika 26, 404
  // (1934); values for 10 errors in 100 000 shots at 95 % as listed in CHECKS.md.
  it.each([
    { name: 'Wilson', fn: wilsonInterval, low: 5.43e-5, high: 1.84e-4 },
    { name: 'Clopper–Pearson', fn: clopperPearsonInterval, low: 4.8e-5, high: 1.84e-4 },
  ])('$name 95 % for 10/100000 = [$low, $high]', ({ fn, low, high }) => {
    const ci = fn(10, 100000, 0.95);
    const tol = 5e-3; // half a unit in the third significant digit, relative
    expect(ci.rate).toBe(1e-4);
    expect(relativeError(ci.low, low), mismatch('low', ci.low, low, tol)).toBeLessThan(tol);
    expect(relativeError(ci.high, high), mismatch('high', ci.high, high, tol)).toBeLessThan(tol);
  });
});

describe('against scipy binomtest.proportion_ci', () => {
  // reference library: scipy.stats.binomtest(k, n).proportion_ci, test/fixtures/make-intervals.py
  it.each(fixture.cases)('Wilson k=$k n=$n c=$confidence', ({ k, n, confidence, wilson }) => {
    const ci = wilsonInterval(k, n, confidence);
    const tol = 1e-11; // closed form; only z and rounding differ
    expect(boundError(ci.low, wilson[0]), mismatch(`low(${k},${n},${confidence})`, ci.low, wilson[0], tol)).toBeLessThan(tol);
    expect(boundError(ci.high, wilson[1]), mismatch(`high(${k},${n},${confidence})`, ci.high, wilson[1], tol)).toBeLessThan(tol);
    expect(ci.rate).toBe(k / n);
  });

  it.each(fixture.cases)('Clopper–Pearson k=$k n=$n c=$confidence vs scipy beta.ppf', ({ k, n, confidence, exactBeta }) => {
    const ci = clopperPearsonInterval(k, n, confidence);
    const tol = 1e-9; // two independent beta-quantile implementations (stdlib vs scipy/Boost)
    expect(boundError(ci.low, exactBeta[0]), mismatch(`low(${k},${n},${confidence})`, ci.low, exactBeta[0], tol)).toBeLessThan(tol);
    expect(boundError(ci.high, exactBeta[1]), mismatch(`high(${k},${n},${confidence})`, ci.high, exactBeta[1], tol)).toBeLessThan(tol);
    expect(ci.rate).toBe(k / n);
  });

  it.each(fixture.cases)('Clopper–Pearson k=$k n=$n c=$confidence vs scipy binomtest exact', ({ k, n, confidence, exact }) => {
    const ci = clopperPearsonInterval(k, n, confidence);
    // binomtest solves with brentq, absolute xtol 2e-12: allow that absolute slack plus 1e-9 relative
    for (const [name, actual, expected] of [['low', ci.low, exact[0]], ['high', ci.high, exact[1]]] as const) {
      const tol = 4e-12 + 1e-9 * Math.abs(expected);
      expect(Math.abs(actual - expected), mismatch(`${name}(${k},${n},${confidence})`, actual, expected, tol)).toBeLessThan(tol);
    }
  });

  it.each(fixture.cases)('zForConfidence($confidence) = scipy ndtri', ({ confidence, z }) => {
    const actual = zForConfidence(confidence);
    const tol = 1e-12;
    expect(relativeError(actual, z), mismatch(`z(${confidence})`, actual, z, tol)).toBeLessThan(tol);
  });
});

describe('edge cases', () => {
  it.each([
    { name: 'Wilson', fn: wilsonInterval },
    { name: 'Clopper–Pearson', fn: clopperPearsonInterval },
  ])('$name: k = 0 gives low exactly 0, k = n gives high exactly 1, n = 0 gives NaN in [0, 1]', ({ fn }) => {
    expect(fn(0, 37, 0.95).low).toBe(0);
    expect(fn(0, 37, 0.95).high).toBeGreaterThan(0);
    expect(fn(37, 37, 0.95).high).toBe(1);
    expect(fn(37, 37, 0.95).low).toBeLessThan(1);
    const none = fn(0, 0, 0.95);
    expect(none.rate).toBeNaN();
    expect(none.low).toBe(0);
    expect(none.high).toBe(1);
  });

  it.each([
    { name: 'Wilson', fn: wilsonInterval },
    { name: 'Clopper–Pearson', fn: clopperPearsonInterval },
  ])('$name: bounds bracket the rate and widen with confidence', ({ fn }) => {
    for (const [k, n] of [[1, 3], [7, 1000], [500, 1000], [999, 1000]]) {
      const narrow = fn(k, n, 0.9);
      const wide = fn(k, n, 0.999);
      expect(narrow.low).toBeLessThanOrEqual(narrow.rate);
      expect(narrow.high).toBeGreaterThanOrEqual(narrow.rate);
      expect(wide.low, `${k}/${n}`).toBeLessThan(narrow.low);
      expect(wide.high, `${k}/${n}`).toBeGreaterThan(narrow.high);
    }
  });

  it('Clopper–Pearson is wider than Wilson for a rare event (k = 1, n = 1e6)', () => {
    // common practice, no source: the exact interval is conservative
    const w = wilsonInterval(1, 1e6, 0.95);
    const cp = clopperPearsonInterval(1, 1e6, 0.95);
    expect(cp.high - cp.low).toBeGreaterThan(w.high - w.low);
  });
});
