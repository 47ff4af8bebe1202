/**
 * Streaming mean and variance on plain `{ n, mean, m2 }` objects.
 *
 * One value at a time by Welford's update (Welford, Technometrics 4, 419 (1962)); two partial
 * results combined by the pairwise formula of Chan, Golub & LeVeque (Stanford report
 * STAN-CS-79-773, 1979; also Am. Stat. 37, 242 (1983)):
 * δ = mean_b − mean_a, mean = mean_a + δ·n_b/n, m2 = m2_a + m2_b + δ²·n_a·n_b/n.
 * A chunk of values seen in one pass can also be summarised by shifted sums (the shift one of
 * the values, so the sums are of deviations of a few σ and lose no precision):
 * S1 = Σ(x − c), S2 = Σ(x − c)², mean = c + S1/n, m2 = S2 − S1²/n (Chan, Golub & LeVeque 1983,
 * "shifted data"); the hot loops use it because it needs no division per value.
 * All functions are pure: they return a new accumulator and never modify their inputs.
 */

/** Partial moments of a stream: count, running mean, and sum of squared deviations m2. */
export interface Moments {
  /** Number of values seen. */
  n: number;
  /** Mean of the values seen (0 when n = 0). */
  mean: number;
  /** Σ (x − mean)² over the values seen. */
  m2: number;
}

/** An accumulator that has seen no values. */
export function emptyMoments(): Moments {
  return { n: 0, mean: 0, m2: 0 };
}

/** Accumulator after one more value x (Welford update). */
export function addValue(acc: Moments, x: number): Moments {
  const n = acc.n + 1;
  const delta = x - acc.mean;
  const mean = acc.mean + delta / n;
  return { n, mean, m2: acc.m2 + delta * (x - mean) };
}

/** Accumulator after values[start..end) (end exclusive, defaults to the whole array). */
export function addValues(
  acc: Moments,
  values: Float64Array,
  start = 0,
  end = values.length,
): Moments {
  let n = acc.n;
  let mean = acc.mean;
  let m2 = acc.m2;
  for (let i = start; i < end; i++) {
    const x = values[i];
    n++;
    const delta = x - mean;
    mean += delta / n;
    m2 += delta * (x - mean);
  }
  return { n, mean, m2 };
}

/**
 * The moments of n values from their shifted sums s1 = Σ(x − shift), s2 = Σ(x − shift)², with
 * the arithmetic every caller must share (the tallies of both engines are compared bit for bit).
 */
export function momentsFromShiftedSums(n: number, shift: number, s1: number, s2: number): Moments {
  if (n === 0) return { n: 0, mean: 0, m2: 0 };
  const q = s1 / n;
  return { n, mean: shift + q, m2: Math.max(0, s2 - s1 * q) };
}

/** Accumulator of the union of two disjoint streams (Chan et al. pairwise formula). */
export function mergeMoments(a: Moments, b: Moments): Moments {
  if (a.n === 0) return { n: b.n, mean: b.mean, m2: b.m2 };
  if (b.n === 0) return { n: a.n, mean: a.mean, m2: a.m2 };
  const n = a.n + b.n;
  const delta = b.mean - a.mean;
  return {
    n,
    mean: a.mean + (delta * b.n) / n,
    m2: a.m2 + b.m2 + (delta * delta * a.n * b.n) / n,
  };
}

/**
 * Variance m2/(n − ddof); ddof = 1 (default) gives the unbiased sample variance, ddof = 0 the
 * population variance. NaN when n ≤ ddof.
 */
export function variance(acc: Moments, ddof = 1): number {
  return acc.n > ddof ? acc.m2 / (acc.n - ddof) : NaN;
}
