/**
 * Digital demodulation as a lab does it: multiply the record by 2·e^{−i(2π f_c t + φ_ref)},
 * so a tone A·cos(2π f_c t + φ) becomes A·e^{i(φ − φ_ref)} after low-pass filtering (the
 * factor 2 restores the amplitude). The reference is always sinusoidal, whatever the carrier's
 * shape, as in a software lock-in. At baseband (no carrier) the record passes through as I.
 */

/** Reference tables 2cos(θ_k) and −2sin(θ_k), θ_k = 2π f_c k/fs + φ_ref. */
export interface Reference {
  inPhase: Float64Array;
  quadrature: Float64Array;
}

/** The demodulation reference on n samples; null for baseband (no carrier). */
export function makeReference(n: number, sampleRate: number, frequency: number, phase: number): Reference | null {
  if (frequency === 0) return null;
  const inPhase = new Float64Array(n);
  const quadrature = new Float64Array(n);
  const w = 2 * Math.PI * frequency / sampleRate;
  for (let k = 0; k < n; k++) {
    const theta = w * k + phase;
    inPhase[k] = 2 * Math.cos(theta);
    quadrature[k] = -2 * Math.sin(theta);
  }
  return { inPhase, quadrature };
}

/** Demodulates record[lo … hi) into outI/outQ (same indices). Baseband: I = record, Q = 0. */
export function demodulate(
  record: Float64Array, reference: Reference | null, lo: number, hi: number, outI: Float64Array, outQ: Float64Array,
): void {
  if (!reference) {
    for (let k = lo; k < hi; k++) { outI[k] = record[k]!; outQ[k] = 0; }
    return;
  }
  const ri = reference.inPhase, rq = reference.quadrature;
  for (let k = lo; k < hi; k++) {
    const x = record[k]!;
    outI[k] = x * ri[k]!;
    outQ[k] = x * rq[k]!;
  }
}
