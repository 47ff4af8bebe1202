/**
 * Confidence intervals for a binomial proportion (an error rate k/n).
 *
 * Wilson score interval: Wilson, J. Am. Stat. Assoc. 22, 209 (1927).
 * Clopper–Pearson ("exact") interval: Clopper & Pearson, Biometrika 26, 404 (1934), written
 * through beta quantiles as in Newcombe, Stat. Med. 17, 857 (1998).
 *
 * Conventions, the same for both:
 * - two-sided, with probability (1 − confidence)/2 left out on each side;
 * - k = 0 gives low = 0 exactly; k = n gives high = 1 exactly;
 * - n = 0 (no trials) gives { rate: NaN, low: 0, high: 1 }: no data, so the rate is undefined
 *   and the interval is the whole unit range.
 * Inputs are assumed valid (integers 0 ≤ k ≤ n, 0 < confidence < 1); validation is the caller's.
 */
import betaQuantile from '@stdlib/stats-base-dists-beta-quantile';
import { gaussianTailInverse } from './special.ts';

/** A rate estimate with its confidence interval. */
export interface RateInterval {
  /** Point estimate k/n (NaN when n = 0). */
  rate: number;
  /** Lower bound, in [0, rate]. */
  low: number;
  /** Upper bound, in [rate, 1]. */
  high: number;
}

/** Two-sided normal quantile for a confidence level: z with P(|Z| ≤ z) = confidence. */
export function zForConfidence(confidence: number): number {
  return gaussianTailInverse((1 - confidence) / 2);
}

/** Wilson score interval for k successes in n trials at the given two-sided confidence. */
export function wilsonInterval(k: number, n: number, confidence: number): RateInterval {
  if (n === 0) return { rate: NaN, low: 0, high: 1 };
  const rate = k / n;
  const z = zForConfidence(confidence);
  const z2 = z * z;
  const denominator = 2 * (n + z2);
  const centre = (2 * k + z2) / denominator;
  const half = (z / denominator) * Math.sqrt(4 * k * (1 - rate) + z2);
  const low = k === 0 ? 0 : Math.max(0, centre - half);
  const high = k === n ? 1 : Math.min(1, centre + half);
  return { rate, low, high };
}

/** Clopper–Pearson interval for k successes in n trials at the given two-sided confidence. */
export function clopperPearsonInterval(k: number, n: number, confidence: number): RateInterval {
  if (n === 0) return { rate: NaN, low: 0, high: 1 };
  const alpha = 1 - confidence;
  const low = k === 0 ? 0 : betaQuantile(alpha / 2, k, n - k + 1);
  const high = k === n ? 1 : betaQuantile(1 - alpha / 2, k + 1, n - k);
  return { rate: k / n, low, high };
}
