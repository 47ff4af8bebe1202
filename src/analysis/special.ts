/**
 * Gaussian tail function Q(x), its inverse, and the normal CDF.
 *
 * Q(x) = ½ erfc(x/√2) (Abramowitz & Stegun, Handbook of Mathematical Functions, 1964, §26.2.3
 * and Table 7.1; NIST DLMF §7.2 and §7.18). Computing the tail through erfc, never as 1 − Φ(x),
 * keeps full relative precision far into the tail (Q(7.75) ≈ 4.59e−15, Q(30) ≈ 4.9e−198).
 */
import erfc from '@stdlib/math-base-special-erfc';
import erfcinv from '@stdlib/math-base-special-erfcinv';

const SQRT_HALF = Math.SQRT1_2;

/** Upper tail of the standard normal distribution, Q(x) = P(Z > x) = ½ erfc(x/√2). */
export function gaussianTail(x: number): number {
  return 0.5 * erfc(x * SQRT_HALF);
}

/**
 * Inverse of {@link gaussianTail}: the x with Q(x) = p, for p in [0, 1] (NaN outside).
 * Computed as √2·erfcinv(2p), which keeps full precision for tiny p (down to 1e−300).
 * (The normal quantile through erfinv(2p − 1) would lose it: at p = 4.59e−15 it is off by 6e−5.)
 */
export function gaussianTailInverse(p: number): number {
  if (Number.isNaN(p) || p < 0 || p > 1) return NaN;
  return Math.SQRT2 * erfcinv(2 * p);
}

/**
 * Normal cumulative distribution function P(X ≤ x) for X ~ N(mu, sigma²).
 * Evaluated as ½ erfc(−(x − mu)/(sigma √2)), accurate in the lower tail.
 * sigma = 0 gives the step (0 below mu, 1 at and above); sigma < 0 or NaN input gives NaN.
 */
export function normalCdf(x: number, mu: number, sigma: number): number {
  if (Number.isNaN(x) || Number.isNaN(mu) || Number.isNaN(sigma) || sigma < 0) return NaN;
  if (sigma === 0) return x < mu ? 0 : 1;
  return 0.5 * erfc(-(x - mu) * SQRT_HALF / sigma);
}
