/**
 * Digital demodulation as a lab does it: multiply the record by 2·e^{−i(2π f_c t + φ_ref)},
 * so a tone A·cos(2π f_c t + φ) becomes A·e^{i(φ − φ_ref)} after low-pass filtering (the
 * factor 2 restores the amplitude). The reference is always sinusoidal, whatever the carrier's
 * shape, as in a software lock-in. At baseband (no carrier) the record passes through as I.
 *
 * Baseband I and Q (two channels, channel-major: signal/carrier.ts): the analog demodulator has
 * done the work, so demodulation is the identity (I, Q) → z = I + iQ, followed by the rotation
 * z·e^{−iφ_ref} that puts the reference phase on the I axis: I' = I·cos φ + Q·sin φ,
 * Q' = Q·cos φ − I·sin φ. Written as channel-major reference tables, every output is again a
 * sum over the record's entries, Σ_c x[c·n + k]·ref[c·n + k], so the kernels (pipeline-chain.ts)
 * keep one form for every record.
 */

/**
 * Reference tables, channels × n long: 2cos(θ_k) and −2sin(θ_k), θ_k = 2π f_c k/fs + φ_ref, on a
 * one-channel record; (cos φ | sin φ) and (−sin φ | cos φ) on baseband I and Q.
 */
export interface Reference {
  /** Channels of the record it demodulates. */
  channels: number;
  inPhase: Float64Array;
  quadrature: Float64Array;
}

/**
 * The demodulation reference on n samples per channel; null for one baseband channel (no
 * carrier). `channels` 2 is baseband I and Q (the frequency is then 0).
 */
export function makeReference(n: number, sampleRate: number, frequency: number, phase: number, channels = 1): Reference | null {
  if (channels === 2) {
    const inPhase = new Float64Array(2 * n), quadrature = new Float64Array(2 * n);
    const c = Math.cos(phase), s = Math.sin(phase);
    inPhase.fill(c, 0, n); inPhase.fill(s, n, 2 * n);
    quadrature.fill(-s, 0, n); quadrature.fill(c, n, 2 * n);
    return { channels, inPhase, quadrature };
  }
  if (frequency === 0) return null;
  const inPhase = new Float64Array(n);
  const quadrature = new Float64Array(n);
  const w = 2 * Math.PI * frequency / sampleRate;
  for (let k = 0; k < n; k++) {
    const theta = w * k + phase;
    inPhase[k] = 2 * Math.cos(theta);
    quadrature[k] = -2 * Math.sin(theta);
  }
  return { channels: 1, inPhase, quadrature };
}

/**
 * Demodulates record[lo … hi) (of each channel) into outI/outQ (same indices, one channel long).
 * Baseband: I = record, Q = 0.
 */
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
  const n = ri.length / reference.channels;
  for (let at = n; at < ri.length; at += n) {
    for (let k = lo; k < hi; k++) {
      const x = record[at + k]!;
      outI[k] += x * ri[at + k]!;
      outQ[k] += x * rq[at + k]!;
    }
  }
}
