/**
 * Integration of a record against weights. A linear processing chain (demodulation, linear
 * filters, integration weights) reduces to one kernel per output (I and Q): the integrated
 * value is Σ_k kernel[k]·record[k]. That identity is what lets the exact-statistic engine skip
 * the samples; the trace engine still computes every product.
 */

/** Σ_{k=lo}^{hi−1} a[k]·b[k]. */
export function dotRange(a: Float64Array, b: Float64Array, lo: number, hi: number): number {
  let s0 = 0, s1 = 0;
  let k = lo;
  // two accumulators break the dependency chain of the additions
  for (; k + 1 < hi; k += 2) {
    s0 += a[k]! * b[k]!;
    s1 += a[k + 1]! * b[k + 1]!;
  }
  if (k < hi) s0 += a[k]! * b[k]!;
  return s0 + s1;
}

/**
 * Σ a[k]·x[k] and Σ b[k]·x[k] over [lo, hi) in one pass over x, written to out[0] and out[1].
 * Each sum keeps the even/odd accumulators of `dotRange`, so the results equal two calls of
 * it bit for bit; reading the record once is what saves time.
 */
export function dotRangePair(a: Float64Array, b: Float64Array, x: Float64Array, lo: number, hi: number, out: Float64Array): Float64Array {
  let a0 = 0, a1 = 0, b0 = 0, b1 = 0;
  let k = lo;
  for (; k + 1 < hi; k += 2) {
    const x0 = x[k]!, x1 = x[k + 1]!;
    a0 += a[k]! * x0;
    a1 += a[k + 1]! * x1;
    b0 += b[k]! * x0;
    b1 += b[k + 1]! * x1;
  }
  if (k < hi) {
    a0 += a[k]! * x[k]!;
    b0 += b[k]! * x[k]!;
  }
  out[0] = a0 + a1;
  out[1] = b0 + b1;
  return out;
}

/**
 * Kernels of a linear chain on the record grid, nonzero only on [lo, hi) of each channel. They
 * have the record's layout: channels × n entries, channel-major (signal/carrier.ts), so the value
 * is Σ kernel·record over every entry.
 */
export interface LinearKernels {
  inPhase: Float64Array;
  /** null at baseband with one channel (Q is identically zero). */
  quadrature: Float64Array | null;
  lo: number;
  hi: number;
}

/**
 * Kernels of "demodulate, then average over the window (boxcar)": weight 1/L on the L window
 * samples of each channel times the demodulation reference.
 */
export function boxcarKernels(
  n: number, lo: number, hi: number, reference: { channels: number; inPhase: Float64Array; quadrature: Float64Array } | null,
): LinearKernels {
  const channels = reference ? reference.channels : 1;
  const inPhase = new Float64Array(channels * n);
  const quadrature = reference ? new Float64Array(channels * n) : null;
  const w = 1 / (hi - lo);
  for (let at = 0; at < channels * n; at += n) {
    for (let k = at + lo; k < at + hi; k++) {
      inPhase[k] = reference ? w * reference.inPhase[k]! : w;
      if (quadrature && reference) quadrature[k] = w * reference.quadrature[k]!;
    }
  }
  return { inPhase, quadrature, lo, hi };
}
