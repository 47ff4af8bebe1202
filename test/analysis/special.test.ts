import { describe, expect, it } from 'vitest';
import { gaussianTail, gaussianTailInverse, normalCdf } from '../../src/analysis/special.ts';
import { loadFixture, mismatch, relativeError } from './load-fixture.ts';

const EPS = Number.EPSILON;

interface SpecialFixture {
  tail: { x: number; expected: number }[];
  tailInverse: { p: number; expected: number }[];
  cdf: { x: number; mu: number; sigma: number; expected: number }[];
}
const fixture = loadFixture<SpecialFixture>('special');

describe('gaussianTail', () => {
  // published: Abramowitz & Stegun, Handbook of Mathematical Functions (1964), Table 7.1 /
  // NIST DLMF §7, via Q(x) = ½ erfc(x/√2); values given to the digits printed in CHECKS.md.
  it.each([
    { x: 1, expected: 0.158655, digits: 6 },
    { x: 2, expected: 0.0227501, digits: 6 },
    { x: 3, expected: 1.349898e-3, digits: 7 },
    { x: 5, expected: 2.866516e-7, digits: 7 },
  ])('Q($x) = $expected (Abramowitz & Stegun Table 7.1)', ({ x, expected, digits }) => {
    const actual = gaussianTail(x);
    const tol = 0.5 * 10 ** (1 - digits);
    expect(relativeError(actual, expected), mismatch(`Q(${x})`, actual, expected, tol)).toBeLessThan(tol);
  });

  // common practice, no source (CHECKS.md): SNR 6.5 and 15.5 at the midpoint threshold.
  it.each([
    { x: 3.25, expected: 5.77e-4 },
    { x: 7.75, expected: 4.59e-15 },
  ])('Q($x) ≈ $expected to 3 digits (common practice, no source)', ({ x, expected }) => {
    const actual = gaussianTail(x);
    const tol = 5e-3;
    expect(relativeError(actual, expected), mismatch(`Q(${x})`, actual, expected, tol)).toBeLessThan(tol);
  });

  // reference library: scipy.stats.norm.sf, test/fixtures/make-special.py
  it.each(fixture.tail)('Q($x) matches scipy norm.sf = $expected', ({ x, expected }) => {
    const actual = gaussianTail(x);
    const tol = x === 7.75 ? 1e-9 : 1e-12; // brief: Q(7.75) to 1e-9; elsewhere erfc is ~ulp-accurate
    expect(relativeError(actual, expected), mismatch(`Q(${x})`, actual, expected, tol)).toBeLessThan(tol);
  });

  it('is NaN for NaN, 0 at +∞ and 1 at −∞', () => {
    expect(gaussianTail(NaN)).toBeNaN();
    expect(gaussianTail(Infinity)).toBe(0);
    expect(gaussianTail(-Infinity)).toBe(1);
  });
});

describe('gaussianTailInverse', () => {
  // reference library: scipy.stats.norm.isf, test/fixtures/make-special.py
  it.each(fixture.tailInverse)('Q⁻¹($p) matches scipy norm.isf = $expected', ({ p, expected }) => {
    const actual = gaussianTailInverse(p);
    const tol = 1e-12;
    const err = Math.abs(expected) < 1e-3 ? Math.abs(actual - expected) : relativeError(actual, expected);
    expect(err, mismatch(`Q⁻¹(${p})`, actual, expected, tol)).toBeLessThan(tol);
  });

  it.each([3.25, 7.75, 0.1, -2])('round-trips Q⁻¹(Q(%s))', (x) => {
    const actual = gaussianTailInverse(gaussianTail(x));
    const tol = 1e-12;
    expect(Math.abs(actual - x), mismatch(`Q⁻¹(Q(${x}))`, actual, x, tol)).toBeLessThan(tol);
  });

  it('is ±∞ at 0 and 1, NaN outside [0, 1]', () => {
    expect(gaussianTailInverse(0)).toBe(Infinity);
    expect(gaussianTailInverse(1)).toBe(-Infinity);
    expect(gaussianTailInverse(-0.1)).toBeNaN();
    expect(gaussianTailInverse(1.1)).toBeNaN();
  });
});

describe('normalCdf', () => {
  // reference library: scipy.stats.norm.cdf, test/fixtures/make-special.py
  it.each(fixture.cdf)('Φ(($x − $mu)/$sigma) matches scipy norm.cdf = $expected', ({ x, mu, sigma, expected }) => {
    const actual = normalCdf(x, mu, sigma);
    const tol = 1e-12;
    expect(relativeError(actual, expected), mismatch(`normalCdf(${x}, ${mu}, ${sigma})`, actual, expected, tol)).toBeLessThan(tol);
  });

  it('equals Q(−z) exactly for the standard normal', () => {
    for (const z of [-7.75, -1, 0, 0.3, 4]) {
      expect(Math.abs(normalCdf(z, 0, 1) - gaussianTail(-z))).toBeLessThanOrEqual(2 * EPS * gaussianTail(-z));
    }
  });

  it('is a step for sigma = 0 and NaN for sigma < 0 or NaN input', () => {
    expect(normalCdf(0.9, 1, 0)).toBe(0);
    expect(normalCdf(1, 1, 0)).toBe(1);
    expect(normalCdf(1.1, 1, 0)).toBe(1);
    expect(normalCdf(0, 0, -1)).toBeNaN();
    expect(normalCdf(NaN, 0, 1)).toBeNaN();
    expect(normalCdf(0, NaN, 1)).toBeNaN();
  });
});
