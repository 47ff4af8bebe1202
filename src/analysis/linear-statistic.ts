/**
 * The exact distribution of a linear statistic of a record, y = Σ_k K[k]·x[k], when the record
 * is a piecewise-constant choice of noise-free waveforms plus white Gaussian noise:
 * - the signal part of a path that is in state s on samples [a, b) contributes
 *   Σ_{a≤k<b} K[k]·w_s[k] = P_s[b] − P_s[a], with P_s the prefix sums of K·w_s;
 * - the white part of several statistics y_a, y_b is jointly Gaussian with covariance
 *   σ²·Σ_k K_a[k]·K_b[k] (independent samples of variance σ²).
 * On a record of several channels (baseband I and Q, channel-major) a path switches every channel
 * at the same sample, so the prefix sums run over time with each sample's terms folded over the
 * channels (signal/channel-fold.ts), and the white covariance sums over every entry (each channel
 * has its own, independent white noise of the same σ).
 */
import { allChannels, foldedProducts } from '../signal/channel-fold.ts';

/** P[j] = Σ_{lo ≤ k < lo+j} Σ_c kernel[c·n + k]·waveform[c·n + k] for j = 0 … hi−lo (n = kernel.length / channels). */
export function kernelPrefixSums(kernel: Float64Array, waveform: Float64Array, lo: number, hi: number, channels = 1): Float64Array {
  const p = new Float64Array(hi - lo + 1);
  let run = 0;
  if (channels === 1) {
    for (let k = lo; k < hi; k++) {
      run += kernel[k]! * waveform[k]!;
      p[k - lo + 1] = run;
    }
    return p;
  }
  const t = foldedProducts(kernel, waveform, lo, hi, kernel.length / channels, allChannels(channels));
  for (let k = lo; k < hi; k++) {
    run += t[k]!;
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

/**
 * Row-major covariance C[a·n + b] = σ²·Σ_k K_a[k]·K_b[k] of the white-noise parts of n statistics,
 * the sum over every channel of a record of `channels` channels.
 */
export function whiteCovariance(kernels: readonly SupportedKernel[], sigma: number, channels = 1): Float64Array {
  const n = kernels.length;
  const c = new Float64Array(n * n);
  for (let a = 0; a < n; a++) {
    for (let b = 0; b <= a; b++) {
      const ka = kernels[a]!, kb = kernels[b]!;
      const lo = Math.max(ka.lo, kb.lo), hi = Math.min(ka.hi, kb.hi);
      const samples = ka.kernel.length / channels;
      let s = 0;
      for (let at = 0; at < ka.kernel.length; at += samples) {
        for (let k = at + lo; k < at + hi; k++) s += ka.kernel[k]! * kb.kernel[k]!;
      }
      c[a * n + b] = c[b * n + a] = sigma * sigma * s;
    }
  }
  return c;
}
