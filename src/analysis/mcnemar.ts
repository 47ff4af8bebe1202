/**
 * Paired comparison of two classifiers (A and B) on the same shots.
 *
 * Counts of the paired 2×2 table, with "wrong" as the event:
 *
 * |              | B wrong      | B right       |
 * | ------------ | ------------ | ------------- |
 * | **A wrong**  | bothWrong    | onlyAWrong (b)|
 * | **A right**  | onlyBWrong (c)| bothRight    |
 *
 * Exact McNemar test: McNemar, Psychometrika 12, 153 (1947), in its exact conditional form
 * (given b + c discordant shots, b ~ Binomial(b + c, ½) under equal error rates).
 * Interval for the difference of error rates: Newcombe, Stat. Med. 17, 2635 (1998), method 10
 * (Wilson score intervals of the two marginal rates combined with the phi correlation of the
 * table, no continuity correction).
 */
import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import { wilsonInterval } from './intervals.ts';

/** Counts of a paired 2×2 table of two classifiers' errors on the same n shots. */
export interface PairedCounts {
  /** Shots both A and B got wrong. */
  bothWrong: number;
  /** Shots A got wrong and B got right (the usual b). */
  onlyAWrong: number;
  /** Shots A got right and B got wrong (the usual c). */
  onlyBWrong: number;
  /** Total shots n (so bothRight = n − bothWrong − onlyAWrong − onlyBWrong). */
  n: number;
}

/** Difference of paired error rates, errA − errB = (b − c)/n, with its confidence interval. */
export interface PairedDifference {
  /** errA − errB = (onlyAWrong − onlyBWrong)/n (NaN when n = 0). */
  difference: number;
  /** Lower bound, in [−1, difference]. */
  low: number;
  /** Upper bound, in [difference, 1]. */
  high: number;
}

/**
 * Two-sided exact McNemar p-value for b (A wrong, B right) and c (A right, B wrong):
 * min(1, 2·P(X ≤ min(b, c))) with X ~ Binomial(b + c, ½); no mid-p. b + c = 0 gives 1.
 */
export function mcnemarExact(b: number, c: number): number {
  const discordant = b + c;
  if (discordant === 0) return 1;
  return Math.min(1, 2 * binomialCdf(Math.min(b, c), discordant, 0.5));
}

/**
 * Confidence interval for errA − errB on paired shots, Newcombe (1998) method 10.
 * With p1 = errA, p2 = errB and Wilson intervals (l1, u1), (l2, u2):
 * low = d − √((p1−l1)² − 2φ(p1−l1)(u2−p2) + (u2−p2)²),
 * high = d + √((u1−p1)² − 2φ(u1−p1)(p2−l2) + (p2−l2)²),
 * φ = (ad − bc)/√((a+b)(c+d)(a+c)(b+d)), taken as 0 when a margin is empty.
 * n = 0 gives { difference: NaN, low: −1, high: 1 }.
 */
export function pairedDifference(counts: PairedCounts, confidence: number): PairedDifference {
  const { bothWrong: a, onlyAWrong: b, onlyBWrong: c, n } = counts;
  if (n === 0) return { difference: NaN, low: -1, high: 1 };
  const d = n - a - b - c;
  const difference = (b - c) / n;
  const errA = wilsonInterval(a + b, n, confidence);
  const errB = wilsonInterval(a + c, n, confidence);
  const marginProduct = (a + b) * (c + d) * (a + c) * (b + d);
  const phi = marginProduct === 0 ? 0 : (a * d - b * c) / Math.sqrt(marginProduct);
  const dl1 = errA.rate - errA.low;
  const du1 = errA.high - errA.rate;
  const dl2 = errB.rate - errB.low;
  const du2 = errB.high - errB.rate;
  const below = Math.sqrt(Math.max(0, dl1 * dl1 - 2 * phi * dl1 * du2 + du2 * du2));
  const above = Math.sqrt(Math.max(0, du1 * du1 - 2 * phi * du1 * dl2 + dl2 * dl2));
  return {
    difference,
    low: Math.max(-1, difference - below),
    high: Math.min(1, difference + above),
  };
}
