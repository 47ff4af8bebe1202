/**
 * The exact distribution of a linear statistic of a record, y = Σ_k K[k]·x[k], when the record
 * is a piecewise-constant choice of noise-free waveforms plus white Gaussian noise:
 * - the signal part of a path that is in state s on samples [a, b) contributes
 *   Σ_{a≤k<b} K[k]·w_s[k] = P_s[b] − P_s[a], with P_s the prefix sums of K·w_s;
 * - the white part of several statistics y_a, y_b is jointly Gaussian with covariance
 *   σ²·Σ_k K_a[k]·K_b[k] (independent samples of variance σ²).
 */

/** P[j] = Σ_{lo ≤ k < lo+j} kernel[k]·waveform[k] for j = 0 … hi−lo. */
export function kernelPrefixSums(kernel: Float64Array, waveform: Float64Array, lo: number, hi: number): Float64Array {
  const p = new Float64Array(hi - lo + 1);
  let run = 0;
  for (let k = lo; k < hi; k++) {
    run += kernel[k]! * waveform[k]!;
    p[k - lo + 1] = run;
  }
  return p;
}

/** A kernel with its support [lo, hi). */
export interface SupportedKernel {
  kernel: Float64Array;
  lo: number;
  hi: number;
}

/** Row-major covariance C[a·n + b] = σ²·Σ_k K_a[k]·K_b[k] of the white-noise parts of n statistics. */
export function whiteCovariance(kernels: readonly SupportedKernel[], sigma: number): Float64Array {
  const n = kernels.length;
  const c = new Float64Array(n * n);
  for (let a = 0; a < n; a++) {
    for (let b = 0; b <= a; b++) {
      const ka = kernels[a]!, kb = kernels[b]!;
      const lo = Math.max(ka.lo, kb.lo), hi = Math.min(ka.hi, kb.hi);
      let s = 0;
      for (let k = lo; k < hi; k++) s += ka.kernel[k]! * kb.kernel[k]!;
      c[a * n + b] = c[b * n + a] = sigma * sigma * s;
    }
  }
  return c;
}
