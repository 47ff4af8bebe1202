/**
 * The window mean of each record beside what the fitted model predicts for it: the records'
 * window means along the separation axis, and per group (each label, or all records) the
 * model's distribution of the same quantity — the Gaussian mixture of analysis/value-density.ts
 * (relaxation during the window as in Barthel et al., Phys. Rev. Lett. 103, 160503 (2009),
 * preparation errors, the prepared shares) with the σ the fitted noise spectrum gives the window
 * mean: σ² = ∫ S(f)·|H(f)|² df through the window's kernel (signal/filter-function.ts), white
 * noise as W·fs/2·Σx², the Lorentzian through its exact exponential correlation, 1/f by
 * quadrature over its band.
 */
import { exponentialQuadraticForm, filterFunctionVariance, squaredSum } from '../signal/filter-function.ts';
import { valueMixture, type ValueMixture } from '../analysis/value-density.ts';
import type { SpectrumParameters } from './spectrum-model.ts';

/** One histogram: the records' values and the model's mixture for them. */
export interface WindowGroup {
  name: string;
  values: Float64Array;
  mixture: ValueMixture;
}

/** The window means and their model. */
export interface WindowView {
  groups: WindowGroup[];
  /** The model's σ of a window mean. */
  sigma: number;
  /** The levels along the axis, in state order. */
  levels: [number, number];
}

/** σ of Σ_k x_k·n_k over [lo, hi) for noise of fitted spectrum `p` (flicker on [flickerLow, flickerHigh]). */
export function kernelSigma(
  p: SpectrumParameters, referenceFrequency: number, kernel: Float64Array, lo: number, hi: number, sampleRate: number, flickerLow: number, flickerHigh: number,
): number {
  let variance = (p.white * sampleRate) / 2 * squaredSum(kernel, lo, hi);
  if (p.lorentzian) {
    const { amplitude, correlationTime } = p.lorentzian;
    // S(0) = 4σ²τ (Gillespie 1996) and the sampled process has correlation e^(−|k|/(fs·τ))
    variance += (amplitude / (4 * correlationTime)) * exponentialQuadraticForm(kernel, lo, hi, Math.exp(-1 / (sampleRate * correlationTime)));
  }
  if (p.flicker) {
    const { amplitude, exponent } = p.flicker;
    variance += filterFunctionVariance((f) => amplitude * (f / referenceFrequency) ** -exponent, kernel, lo, hi, sampleRate, flickerLow, flickerHigh);
  }
  return Math.sqrt(variance);
}

/** What the view is made from, in the twin's state order. */
export interface WindowInputs {
  /** Window mean of each record along the axis. */
  values: Float64Array;
  /** Labels of the records (in twin state order: label ℓ means state ℓ) and their names, or null. */
  labels: { values: Uint8Array; names: readonly string[] } | null;
  levels: [number, number];
  /** Prepared shares of the two states. */
  shares: [number, number];
  /** Rate matrix rate[from·2 + to] in 1/s. */
  rate: Float64Array;
  /** Per state, the preparation error (null: none). */
  preparation: ({ probability: number; into: number } | null)[];
  samples: number;
  windowLo: number;
  windowHi: number;
  sampleRate: number;
  sigma: number;
}

/** The histograms and their model. */
export function windowView(w: WindowInputs): WindowView {
  const kernel = new Float64Array(w.samples);
  for (let k = w.windowLo; k < w.windowHi; k++) kernel[k] = 1 / (w.windowHi - w.windowLo);
  const waveforms = w.levels.map((level) => new Float64Array(w.samples).fill(level));
  const input = { kernel, lo: w.windowLo, hi: w.windowHi, sampleRate: w.sampleRate, waveforms, rate: w.rate, preparation: w.preparation, mapping: [null, null] };
  const groups: WindowGroup[] = [];
  if (w.labels) {
    for (const label of [0, 1]) {
      const values = w.values.filter((_, i) => w.labels!.values[i] === label);
      if (values.length > 0) groups.push({ name: `labelled ${w.labels.names[label]}`, values, mixture: valueMixture(input, label) });
    }
  } else {
    const parts = [0, 1].map((s) => valueMixture(input, s));
    const means = Float64Array.from([...parts[0]!.means, ...parts[1]!.means]);
    const weights = Float64Array.from([...Array.from(parts[0]!.weights, (x) => x * w.shares[0]), ...Array.from(parts[1]!.weights, (x) => x * w.shares[1])]);
    groups.push({ name: 'all records', values: w.values, mixture: { means, weights } });
  }
  return { groups, sigma: w.sigma, levels: w.levels };
}
