/**
 * Fitting the noise model (spectrum-model.ts) to a Welch spectrum by maximum likelihood on the
 * periodogram, Whittle's approximation (Whittle, J. R. Stat. Soc. B 19, 38 (1957)).
 *
 * Why not least squares on log S: a Welch average of K segments is S·χ²_2ν/2ν-like, so its
 * logarithm is biased low by a digamma term that depends on ν, and the variance of each bin is
 * proportional to S², which weights that curve badly at low frequency. The likelihood of the
 * averaged periodogram as a gamma variable of mean S(f) and shape ν,
 *   −ℓ(θ) = w·Σ_k [ln S_k(θ) + Ŝ_k/S_k(θ)] + const,   w = ν/g,
 * is unbiased for any ν, and its curvature gives the test between nested models. S_k is what bin
 * k expects, the model seen through the window (welch-window.ts). ν is the
 * effective number of segments (50 % overlap of Hann windows: K/(1 + 2ρ²), ρ = Σw_n·w_{n+L/2}/Σw²;
 * Welch 1967), g the number of neighbouring bins one bin is correlated with (1 + 2Σ_j |c_j|²,
 * c_j = Σw²e^(−2πijn/L)/Σw²: 1.94 for Hann; Percival & Walden, Spectral Analysis for Physical
 * Applications (1993), §6.6, from memory) — dividing by g treats the sum as over independent bins.
 *
 * Minimisation: Levenberg–Marquardt on Fisher scoring. The gradient is w·Σ(1 − Ŝ/S)·∂lnS/∂θ and
 * the expected information w·Σ ∂lnS/∂θ·∂lnS/∂θᵀ (the gamma variable's score has variance
 * ν per unit of ∂lnS); the step solves (I + μ·diag I)·Δ = −∇ with μ shrinking after a good step
 * and growing after a bad one (Marquardt, J. SIAM 11, 431 (1963)). Several starts for the 1/f
 * exponent and the correlation time; the best minimum wins.
 */
import { choleskyLower } from '../analysis/cholesky.ts';
import type { BinReading } from './welch-window.ts';
import {
  densityAndLogGradient, fromVector, layoutOf, toVector, type SpectrumComponents, type SpectrumFrame, type SpectrumParameters,
} from './spectrum-model.ts';

/** A measured spectrum and how much each bin weighs. */
export interface MeasuredSpectrum {
  frequencies: Float64Array;
  density: Float64Array;
  /** w = ν/g of the file comment. */
  weight: number;
  /** Relative standard deviation of one bin's estimate, 1/√ν. */
  relativeError: number;
  /** How each bin reads the spectrum through the window (welch-window.ts). */
  readings: readonly BinReading[];
}

/** A fit of one set of components. */
export interface ComponentFit {
  components: SpectrumComponents;
  parameters: SpectrumParameters;
  /** −ℓ at the minimum (smaller is better). */
  objective: number;
}

/** ν/g and 1/√ν for K segments of Hann window `window` (see the file comment). */
export function spectrumWeights(window: Float64Array, segments: number): { weight: number; relativeError: number } {
  const n = window.length, half = n / 2;
  let power = 0, overlap = 0;
  for (let i = 0; i < n; i++) power += window[i]! ** 2;
  for (let i = 0; i < half; i++) overlap += window[i]! * window[i + half]!;
  const rho = overlap / power;
  const nu = segments / (1 + 2 * rho * rho);
  let g = 1;
  for (let j = 1; j <= 8; j++) {
    let re = 0, im = 0;
    for (let i = 0; i < n; i++) {
      const w2 = window[i]! ** 2, a = (2 * Math.PI * j * i) / n;
      re += w2 * Math.cos(a);
      im -= w2 * Math.sin(a);
    }
    g += (2 * (re * re + im * im)) / (power * power);
  }
  return { weight: nu / g, relativeError: 1 / Math.sqrt(nu) };
}

/** Bounds of the vector, so that a component cannot run off to where the data say nothing. */
interface Bounds {
  lo: Float64Array;
  hi: Float64Array;
}

function boundsOf(data: MeasuredSpectrum, mask: Uint8Array, c: SpectrumComponents, frame: SpectrumFrame): Bounds {
  let fLo = Infinity, fHi = 0, sLo = Infinity, sHi = 0;
  for (let k = 0; k < mask.length; k++) {
    if (!mask[k]) continue;
    fLo = Math.min(fLo, data.frequencies[k]!); fHi = Math.max(fHi, data.frequencies[k]!);
    sLo = Math.min(sLo, data.density[k]!); sHi = Math.max(sHi, data.density[k]!);
  }
  const at = layoutOf(c);
  const lo = new Float64Array(at.size), hi = new Float64Array(at.size);
  const amplitude = (i: number) => { lo[i] = Math.log(Math.max(1e-300, sLo * 1e-6)); hi[i] = Math.log(Math.max(1e-300, sHi * 1e4)); };
  amplitude(0);
  if (c.flicker) {
    amplitude(at.flicker);
    // the 1/f amplitude is its density at the reference frequency, inside the band
    hi[at.flicker] = Math.log(Math.max(1e-300, sHi * 1e4 * (fHi / frame.referenceFrequency) ** 3));
    lo[at.flicker + 1] = 0.05; hi[at.flicker + 1] = 3;
  }
  if (c.lorentzian) {
    amplitude(at.lorentzian);
    hi[at.lorentzian] = Math.log(Math.max(1e-300, sHi * 1e8));
    lo[at.lorentzian + 1] = Math.log(1 / (2 * Math.PI * fHi) / 100);
    hi[at.lorentzian + 1] = Math.log(100 / (2 * Math.PI * fLo));
  }
  return { lo, hi };
}

/** What bin `reading` expects of the model v, and ∂ln/∂θ of it into `gradient` (`scratch`: same length). */
export function expectedBin(v: Float64Array, c: SpectrumComponents, frame: SpectrumFrame, reading: BinReading, gradient: Float64Array, scratch: Float64Array): number {
  if (reading.weights.length === 1) return densityAndLogGradient(v, c, frame, reading.frequencies[0]!, gradient);
  gradient.fill(0);
  let expected = 0;
  for (let q = 0; q < reading.weights.length; q++) {
    const part = reading.weights[q]! * densityAndLogGradient(v, c, frame, reading.frequencies[q]!, scratch);
    expected += part;
    for (let j = 0; j < gradient.length; j++) gradient[j] += part * scratch[j]!;
  }
  for (let j = 0; j < gradient.length; j++) gradient[j]! /= expected;
  return expected;
}

/** −ℓ of vector v over the masked bins. */
function objectiveOf(data: MeasuredSpectrum, mask: Uint8Array, c: SpectrumComponents, frame: SpectrumFrame, v: Float64Array, gradient: Float64Array, scratch: Float64Array): number {
  let total = 0;
  for (let k = 0; k < mask.length; k++) {
    if (!mask[k]) continue;
    const s = expectedBin(v, c, frame, data.readings[k]!, gradient, scratch);
    total += Math.log(s) + data.density[k]! / s;
  }
  return data.weight * total;
}

/** Levenberg–Marquardt from `start` (see the file comment); returns the minimum. */
export function fitFrom(data: MeasuredSpectrum, mask: Uint8Array, c: SpectrumComponents, frame: SpectrumFrame, start: SpectrumParameters): ComponentFit {
  const bounds = boundsOf(data, mask, c, frame);
  const p = bounds.lo.length;
  const clamp = (v: Float64Array) => { for (let j = 0; j < p; j++) v[j] = Math.min(bounds.hi[j]!, Math.max(bounds.lo[j]!, v[j]!)); return v; };
  let v = clamp(toVector(start));
  const d = new Float64Array(p), scratch = new Float64Array(p), grad = new Float64Array(p), info = new Float64Array(p * p), damped = new Float64Array(p * p);
  const step = new Float64Array(p), y = new Float64Array(p);
  let objective = objectiveOf(data, mask, c, frame, v, d, scratch);
  let mu = 1e-3;
  let converged = false;
  for (let iteration = 0; iteration < 400 && !converged; iteration++) {
    grad.fill(0);
    info.fill(0);
    for (let k = 0; k < mask.length; k++) {
      if (!mask[k]) continue;
      const s = expectedBin(v, c, frame, data.readings[k]!, d, scratch);
      const r = 1 - data.density[k]! / s;
      for (let i = 0; i < p; i++) {
        grad[i] += r * d[i]!;
        for (let j = 0; j < p; j++) info[i * p + j] += d[i]! * d[j]!;
      }
    }
    let accepted = false;
    while (mu < 1e12) {
      for (let i = 0; i < p * p; i++) damped[i] = info[i]!;
      for (let i = 0; i < p; i++) damped[i * p + i] = info[i * p + i]! * (1 + mu) + 1e-300;
      const { factor } = choleskyLower(damped, p);
      // solve L·Lᵀ·step = −grad
      for (let i = 0; i < p; i++) {
        let s = -grad[i]!;
        for (let j = 0; j < i; j++) s -= factor[i * p + j]! * y[j]!;
        y[i] = factor[i * p + i]! > 0 ? s / factor[i * p + i]! : 0;
      }
      for (let i = p - 1; i >= 0; i--) {
        let s = y[i]!;
        for (let j = i + 1; j < p; j++) s -= factor[j * p + i]! * step[j]!;
        step[i] = factor[i * p + i]! > 0 ? s / factor[i * p + i]! : 0;
      }
      const trial = clamp(Float64Array.from(v, (x, j) => x + step[j]!));
      const value = objectiveOf(data, mask, c, frame, trial, d, scratch);
      if (value < objective) {
        const gain = objective - value;
        v = trial;
        objective = value;
        mu = Math.max(mu / 4, 1e-12);
        accepted = true;
        // −ℓ carries a large constant (Σ ln S): its gains are judged in absolute log-likelihood units
        converged = gain < 1e-8;
        break;
      }
      mu *= 8;
    }
    if (!accepted) break;
  }
  return { components: c, parameters: fromVector(v, c), objective };
}

/** The best fit of components `c` over a few starts (see the file comment). */
export function fitComponents(data: MeasuredSpectrum, mask: Uint8Array, c: SpectrumComponents, frame: SpectrumFrame): ComponentFit {
  const used: number[] = [];
  let fLo = Infinity, fHi = 0;
  for (let k = 0; k < mask.length; k++) {
    if (!mask[k]) continue;
    used.push(k);
    fLo = Math.min(fLo, data.frequencies[k]!); fHi = Math.max(fHi, data.frequencies[k]!);
  }
  const sorted = used.map((k) => data.density[k]!).sort((a, b) => a - b);
  const upper = used.slice(used.length >> 1).map((k) => data.density[k]!).sort((a, b) => a - b);
  const white = upper[upper.length >> 1]!;
  const low = used.slice(0, 5).map((k) => data.density[k]!).sort((a, b) => a - b)[2] ?? sorted[0]!;
  const excess = Math.max(low - white, 0.05 * white);
  const exponents = c.flicker ? [0.7, 1, 1.5, 2.2] : [NaN];
  const times = c.lorentzian ? Array.from({ length: 6 }, (_, i) => (1 / (2 * Math.PI * fHi)) * (fHi / fLo) ** (i / 5)) : [NaN];
  let best: ComponentFit | null = null;
  for (const exponent of exponents) {
    for (const correlationTime of times) {
      const start: SpectrumParameters = {
        white,
        flicker: c.flicker ? { amplitude: excess * (fLo / frame.referenceFrequency) ** exponent, exponent } : null,
        lorentzian: c.lorentzian ? { amplitude: 2 * excess, correlationTime } : null,
      };
      const fit = fitFrom(data, mask, c, frame, start);
      if (!best || fit.objective < best.objective) best = fit;
    }
  }
  return best!;
}
