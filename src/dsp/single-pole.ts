/**
 * First-order IIR low-pass y[n] = y[n−1] + α·(x[n] − y[n−1]), the digital image of an RC
 * low-pass (time constant τ = 1/(2π·fc)).
 *
 * Design: α = 1 − e^(−T/τ) with T = 1/fs, i.e. α = 1 − e^(−2π·fc/fs). This is the impulse-invariant
 * discretisation of the RC low-pass (Oppenheim & Schafer, *Discrete-Time Signal Processing*,
 * 3rd ed., 2010, ch. 7): the pole e^(−T/τ) is the analog pole s = −1/τ mapped by z = e^(sT), so
 * the sampled impulse response decays exactly like the analog one, y[n+1]/y[n] = e^(−T/τ); the
 * gain is then scaled for unit DC gain. `fc` is the analog −3 dB frequency; the digital −3 dB
 * point lies above it, by O(fc/fs) for fc ≪ fs and increasingly so towards fs/2, where the gain
 * α/(2 − α) at Nyquist may even stay above 1/√2 (see `singlePoleResponse`).
 */

import { type ComplexSeries, makeComplexSeries } from './complex-response.ts';

/** Smoothing factor α = 1 − e^(−2π·cutoff/sampleRate) of the single-pole low-pass with analog −3 dB point `cutoff` (Hz). */
export function singlePoleAlpha(cutoff: number, sampleRate: number): number {
  return -Math.expm1((-2 * Math.PI * cutoff) / sampleRate);
}

/** Smoothing factor α = 1 − e^(−1/(sampleRate·timeConstant)) for an RC time constant `timeConstant` (s). */
export function singlePoleAlphaFromTimeConstant(timeConstant: number, sampleRate: number): number {
  return -Math.expm1(-1 / (sampleRate * timeConstant));
}

/** Initial state of the single-pole filter: Float64Array(1) holding y[−1] (0 = starts from rest). */
export function makeSinglePoleState(): Float64Array {
  return new Float64Array(1);
}

/**
 * Runs y[n] = y[n−1] + α·(x[n] − y[n−1]) over `input` into `output` (same length; may be `input`)
 * and returns `output`; `state[0]` is y[−1] on entry and the last output on exit.
 */
export function applySinglePole(
  alpha: number,
  input: Float64Array,
  output: Float64Array,
  state: Float64Array,
): Float64Array {
  let y = state[0];
  for (let i = 0; i < input.length; i++) {
    y = y + alpha * (input[i] - y);
    output[i] = y;
  }
  state[0] = y;
  return output;
}

/**
 * Closed-form response H(e^{jω}) = α / (1 − (1 − α)·e^{−jω}), ω = 2π·f/fs, at each frequency
 * of `freqs` (Hz): the z-transform of the recurrence evaluated on the unit circle.
 */
export function singlePoleResponse(alpha: number, freqs: ArrayLike<number>, sampleRate: number): ComplexSeries {
  const out = makeComplexSeries(freqs.length);
  const r = 1 - alpha;
  for (let i = 0; i < freqs.length; i++) {
    const w = (2 * Math.PI * freqs[i]) / sampleRate;
    const half = Math.sin(w / 2);
    const dr = alpha + 2 * r * half * half; // = 1 − r·cos ω, without cancellation near DC
    const di = r * Math.sin(w);
    const d = dr * dr + di * di;
    out.re[i] = (alpha * dr) / d;
    out.im[i] = (-alpha * di) / d;
  }
  return out;
}
