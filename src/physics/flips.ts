/**
 * The prepared mixture as cumulative probabilities, from which plan/history.ts draws each
 * shot's intended state.
 */

/** Cumulative sums of the prepared mixture (the last entry exactly 1). */
export function cumulativeMixture(weights: readonly number[]): Float64Array {
  const c = new Float64Array(weights.length);
  let run = 0;
  weights.forEach((w, i) => { run += w; c[i] = run; });
  c[c.length - 1] = 1;
  return c;
}
