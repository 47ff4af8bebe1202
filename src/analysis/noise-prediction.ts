/**
 * Predicted σ of a pipeline's integrated value, source by source, from the filter function
 * (signal/filter-function.ts): σ² = ∫ S(f)·|H(f)|² df per source, with H the whole path from
 * the source's injection point to the value.
 *
 * Derivation. The value is V = Σ_k K_k·record_k (K the projected kernel: demodulation reference,
 * filters, window weights). A sensor-side source n(t) enters as g·c_k·n(t_k) (gain g, carrier
 * c_k; the analog response H_a is already in n, whose spectrum is S·|H_a|²), so V gets
 * Σ_k x_k·n(t_k) with x_k = K_k·g·c_k; an amplifier-side source has x_k = K_k·g. With a sine
 * carrier and the factor-2 reference, K_k·c_k = (2/L)·cos(θ_k + φ)·cos θ_k = (1/L)·[cos φ +
 * cos(2θ_k + φ)]: sensor-side noise is integrated like a baseband boxcar (the carrier does not
 * help), while for amplifier-side noise |H_x(f)|² sits at ±f_c and low-frequency noise only meets
 * its sinc side lobes, ∝ (πτ(f_c − f))^−2 (the carrier removes it).
 *
 * - white: σ²_sample·Σ K² (independent samples); every component separately, so they add up;
 * - every other source: its kind's variance of Σ_k x_k·n(t_k) (signal/noise/*.ts: for 1/f the
 *   band-by-band quadratic form on the timeline the engine draws from, for a fluctuator
 *   Machlup's exponential correlation);
 * - quantisation: step²/12·Σ K² (Widrow 1956), valid when the noise spans many steps.
 * Noise correlated across shots (1/f) is predicted as the marginal variance of one shot's value
 * over the whole band (what the pooled σ of many shots estimates). Clipping is not predicted
 * (the run warns when it happened).
 *
 * Baseband I and Q (two channels; the kernel is channel-major, V = Σ_k K_I[k]·I_k + K_Q[k]·Q_k):
 * white noise and quantisation are independent on every entry, so σ²·Σ K² runs over both
 * channels; every other source adds the variances of its independent realisations
 * (signal/injection.ts), one for sensor-side noise seen through x_k = K_I[k]·g·cos α +
 * K_Q[k]·g·sin α, one per channel for amplifier-side noise seen through g·K_I and g·K_Q.
 */
import { squaredSum } from '../signal/filter-function.ts';
import { quantisationStep } from '../signal/digitizer.ts';
import type { NoiseInjection } from '../scenario/types.ts';
import type { NoisePlan } from '../signal/noise-plan.ts';
import type { NoiseSourceInfo } from '../signal/noise/contract.ts';
import { seenThrough } from '../signal/injection.ts';

/** One source's entry in the noise budget: its line (signal/noise/contract.ts; white and quantisation alike) and what it adds to the integrated value. */
export interface NoiseSourceBudget extends NoiseSourceInfo {
  /** 'white', 'quantisation', or the kind of a noise source (signal/noise/). */
  kind: string;
  /** Its variance of the integrated value, its σ, and its share of the total variance. */
  variance: number;
  sigma: number;
  share: number;
}

/** The predicted noise of one pipeline's integrated value. */
export interface NoisePrediction {
  sources: NoiseSourceBudget[];
  /** Total variance (the sources are independent, so their variances add). */
  variance: number;
  sigma: number;
}

/** Predicts the noise of Σ_k kernel[k]·record[k] over [lo, hi) of each channel, source by source. */
export function predictNoise(plan: NoisePlan, kernel: Float64Array, lo: number, hi: number, sampleRate: number): NoisePrediction {
  const sources: Omit<NoiseSourceBudget, 'sigma' | 'share'>[] = [];
  const samples = kernel.length / plan.channels;
  let k2 = squaredSum(kernel, lo, hi);
  for (let at = samples; at < kernel.length; at += samples) k2 += squaredSum(kernel, at + lo, at + hi);
  for (const w of plan.white) {
    sources.push({ name: w.name, kind: 'white', injection: 'amplifier', density: w.density, densityUnit: '{unit}/√Hz', origin: w.origin, variance: w.perSampleVariance * k2 });
  }
  for (const { compiled } of plan.kinds) {
    compiled.sources.forEach((info, s) => {
      let variance = 0;
      for (const x of seenFrom(plan, info.injection, kernel, lo, hi)) variance += compiled.variance(s, x, lo, hi, sampleRate);
      sources.push({ ...info, variance });
    });
  }
  if (plan.digitizer && plan.digitizer.codes > 0) {
    const step = quantisationStep(plan.digitizer);
    const perSample = (step * step) / 12;
    sources.push({
      name: 'quantisation', kind: 'quantisation', injection: 'amplifier',
      density: Math.sqrt(perSample / (sampleRate / 2)) / plan.gain, densityUnit: '{unit}/√Hz',
      origin: `${Math.log2(plan.digitizer.codes)} bits over [${plan.digitizer.low}, ${plan.digitizer.high}]`,
      variance: perSample * k2,
    });
  }
  const variance = sources.reduce((a, s) => a + s.variance, 0);
  return {
    sources: sources.map((s) => ({ ...s, sigma: Math.sqrt(s.variance), share: variance > 0 ? s.variance / variance : 0 })),
    variance, sigma: Math.sqrt(variance),
  };
}

/**
 * The functionals of the noise at an injection point, one per independent realisation
 * (signal/injection.ts): x_k = K_k·g·c_k for sensor-side noise (the carrier modulates it like the
 * signal), K_k·g for amplifier-side noise; on baseband I and Q, Σ_c K_c[k]·g·u_c for sensor-side
 * noise and g·K_I, g·K_Q for amplifier-side noise. Each is one channel long.
 */
export function seenFrom(
  plan: Pick<NoisePlan, 'realisations' | 'channels'>, injection: NoiseInjection, kernel: Float64Array, lo: number, hi: number,
): Float64Array[] {
  const samples = kernel.length / plan.channels;
  return plan.realisations[injection].map((r) => seenThrough(r, kernel, lo, hi, samples));
}
