/**
 * Windowed-sinc low-pass FIR: design, streaming application, and response.
 *
 * Design (the window method, Oppenheim & Schafer, *Discrete-Time Signal Processing*, 3rd ed.,
 * 2010, ch. 7): the ideal low-pass impulse response h[n] = c·sinc(c·(n − (N−1)/2)), c = 2·fc/fs,
 * sinc(x) = sin(πx)/(πx), times a symmetric window of length N, scaled so that Σh = 1 (unit DC
 * gain). Windows are the symmetric generalised cosines of Harris, *Proc. IEEE* 66, 51 (1978):
 * Hann (0.5, 0.5), Hamming (0.54, 0.46), Blackman (0.42, 0.5, 0.08), or all ones. This is the
 * same design as `scipy.signal.firwin(numtaps, cutoff, window=…, fs=fs)`, except that the taps here
 * are exactly symmetric (the first half is mirrored), so the phase is exactly linear.
 */

import { type ComplexSeries, makeComplexSeries } from './complex-response.ts';

/** Window applied to the truncated sinc. */
export type FirWindow = 'hamming' | 'hann' | 'blackman' | 'rectangular';

/** Generalised-cosine coefficients a_k of w[n] = Σ (−1)^k a_k cos(2πkn/(N−1)) (Harris 1978). */
const WINDOW_COEFFICIENTS: Record<FirWindow, readonly number[]> = {
  rectangular: [1],
  hann: [0.5, 0.5],
  hamming: [0.54, 0.46],
  blackman: [0.42, 0.5, 0.08],
};

/**
 * Designs `numTaps` low-pass taps with cutoff `cutoff` (Hz, where the unwindowed gain is ½) at
 * `sampleRate` (Hz), windowed by `window`, normalised to unit DC gain; throws RangeError on
 * invalid arguments.
 */
export function windowedSincTaps(
  numTaps: number,
  cutoff: number,
  sampleRate: number,
  window: FirWindow,
): Float64Array {
  if (!Number.isInteger(numTaps) || numTaps < 1) throw new RangeError(`numTaps must be an integer ≥ 1, got ${numTaps}`);
  if (!(sampleRate > 0) || !Number.isFinite(sampleRate)) throw new RangeError(`sample rate must be positive, got ${sampleRate}`);
  if (!(cutoff > 0 && cutoff < sampleRate / 2)) {
    throw new RangeError(`cutoff must lie in (0, sampleRate/2) = (0, ${sampleRate / 2}), got ${cutoff}`);
  }
  const coefficients = WINDOW_COEFFICIENTS[window];
  if (coefficients === undefined) throw new RangeError(`unknown FIR window ${String(window)}`);
  const c = (2 * cutoff) / sampleRate;
  const centre = (numTaps - 1) / 2;
  const taps = new Float64Array(numTaps);
  // Compute the first half and mirror it, so the taps are exactly symmetric (exact linear phase).
  for (let n = 0; n <= (numTaps - 1) >> 1; n++) {
    const x = c * (n - centre);
    const sinc = x === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x);
    let w = 0;
    if (numTaps === 1) w = 1;
    else {
      const phase = (2 * Math.PI * n) / (numTaps - 1);
      for (let k = 0; k < coefficients.length; k++) w += (k % 2 === 0 ? 1 : -1) * coefficients[k] * Math.cos(k * phase);
    }
    taps[n] = c * sinc * w;
    taps[numTaps - 1 - n] = taps[n];
  }
  let sum = 0;
  for (let n = 0; n < numTaps; n++) sum += taps[n];
  for (let n = 0; n < numTaps; n++) taps[n] /= sum;
  return taps;
}

/** Zero history for a filter of `numTaps` taps: Float64Array(numTaps − 1), the last inputs oldest first. */
export function makeFirHistory(numTaps: number): Float64Array {
  return new Float64Array(Math.max(numTaps - 1, 0));
}

/**
 * Convolves `input` with `taps` (y[n] = Σ_k taps[k]·x[n−k]) into `output` (same length; may be
 * `input`) and returns `output`. `history` (length taps.length − 1) holds the inputs before the
 * first sample, oldest first, and is overwritten with the last ones, so calls continue one
 * record. Works sample by sample on `history` as a ring buffer: no allocation.
 */
export function applyFir(
  taps: Float64Array,
  input: Float64Array,
  output: Float64Array,
  history: Float64Array,
): Float64Array {
  const h = history.length; // = taps.length − 1
  const t0 = taps[0];
  if (h === 0) {
    for (let i = 0; i < input.length; i++) output[i] = t0 * input[i];
    return output;
  }
  // Ring buffer: `head` indexes the oldest stored input; x[n−k] sits at (head − k) mod h.
  let head = 0;
  for (let i = 0; i < input.length; i++) {
    const x = input[i];
    let acc = t0 * x;
    let k = 1;
    for (let j = head - 1; j >= 0; j--, k++) acc += taps[k] * history[j];
    for (let j = h - 1; k <= h; j--, k++) acc += taps[k] * history[j];
    history[head] = x;
    head = head + 1 === h ? 0 : head + 1;
    output[i] = acc;
  }
  // Rotate left by `head` so that the history is oldest-first again (three reversals, in place).
  if (head !== 0) {
    reverse(history, 0, head - 1);
    reverse(history, head, h - 1);
    reverse(history, 0, h - 1);
  }
  return output;
}

/** Reverses a[from..to] in place. */
function reverse(a: Float64Array, from: number, to: number): void {
  for (let i = from, j = to; i < j; i++, j--) {
    const t = a[i];
    a[i] = a[j];
    a[j] = t;
  }
}

/** Response H(e^{jω}) = Σ_n taps[n]·e^{−jωn}, ω = 2π·f/fs (the DTFT of the taps), at each frequency of `freqs` (Hz). */
export function firResponse(taps: Float64Array, freqs: ArrayLike<number>, sampleRate: number): ComplexSeries {
  const out = makeComplexSeries(freqs.length);
  for (let i = 0; i < freqs.length; i++) {
    const w = (2 * Math.PI * freqs[i]) / sampleRate;
    let re = 0;
    let im = 0;
    for (let n = 0; n < taps.length; n++) {
      re += taps[n] * Math.cos(w * n);
      im -= taps[n] * Math.sin(w * n);
    }
    out.re[i] = re;
    out.im[i] = im;
  }
  return out;
}
