/**
 * The noise spectrum of the records, fitted and pruned: which of white, 1/f and correlated
 * (Lorentzian) noise the data support, their parameters, and their standard errors.
 *
 * Lines. A narrow line is no noise. Where lines are known to be — what is left of the carrier and
 * its harmonics in real records, the 2f term of demodulated I/Q pairs (2·x·e^(−iθ) keeps
 * L*·e^(−2iθ) beside the level) — KNOWN_LINE_REACH bins either side are left out however weak
 * the line. Elsewhere, bins more than LINE_FACTOR times the full model (and beyond six standard
 * errors of a bin) are left out with their neighbours; the neighbourhood grows with the line's height h, to
 * where the Hann window's side lobes, which fall as (πd³)^(−1) in amplitude at d bins (Harris,
 * Proc. IEEE 66, 51 (1978), from memory), are below 1 % of the noise: d = (100h/π²)^(1/6). The
 * model is fitted again without them until no line is left.
 *
 * Components. The four nested models (white; white + 1/f; white + Lorentzian; all three) are
 * fitted (whittle.ts). A component is kept when (1) the model without it is rejected by the
 * likelihood ratio: deviance above COMPONENT_DEVIANCE = 13.82, the 99.9 % point of χ² with two
 * degrees of freedom (each component has two parameters; on the boundary this is conservative,
 * Self & Liang 1987), and (2) it is at least RELEVANT_SHARE of the fitted spectrum at some
 * frequency of the band (a detectable but negligible component only mimics a misfit; common
 * practice, no source). Both components are tested against the full model first; when neither
 * passes there, each is tested against white noise alone and the stronger one kept if it passes.
 *
 * Errors. A bootstrap over groups of records (estimate.ts): the Welch sums of the drawn groups
 * are added, the chosen model fitted again from the full fit, and the spread of each parameter
 * is its standard error.
 */
import { welchFromSums } from '../analysis/welch.ts';
import type { RandomStream } from '../random/stream.ts';
import { drawGroupCounts, spread } from './estimate.ts';
import type { ResidualSpectra } from './residuals.ts';
import { componentDensities, toVector, type SpectrumComponents, type SpectrumFrame, type SpectrumParameters } from './spectrum-model.ts';
import { binReading, type BinReading } from './welch-window.ts';
import { expectedBin, fitComponents, fitFrom, spectrumWeights, type ComponentFit, type MeasuredSpectrum } from './whittle.ts';

/** χ²₂ at 99.9 % (= −2 ln 0.001). */
export const COMPONENT_DEVIANCE = 13.82;
/** Smallest share of the spectrum a kept component must reach somewhere in the band. */
export const RELEVANT_SHARE = 0.1;
/** An unexpected line stands at least this many times above the model (common practice, no source). */
const LINE_FACTOR = 2;
/** Bins left out either side of a known line (the Hann window's main lobe is ±2 bins). */
const KNOWN_LINE_REACH = 3;

/** A component's test. */
export interface ComponentTest {
  /** Deviance of the model without it (against the model it was tested in). */
  deviance: number;
  /** Its largest share of the fitted spectrum in the band. */
  share: number;
  kept: boolean;
}

/** The fitted noise and how it was chosen. */
export interface NoiseFit {
  spectrum: MeasuredSpectrum;
  /** Bins used in the fit (1) and left out (0: the lowest two bins, the last, lines). */
  mask: Uint8Array;
  /** Frequencies of the lines left out. */
  lines: number[];
  referenceFrequency: number;
  /** The reference frequency and the sample rate, as the model reads them. */
  frame: SpectrumFrame;
  segmentLength: number;
  segments: number;
  chosen: ComponentFit;
  flicker: ComponentTest;
  lorentzian: ComponentTest;
  /** Standard errors: √W, √A (at the reference frequency), α, √B, τ. */
  errors: { white: number; flickerDensity: number; exponent: number; lorentzianDensity: number; correlationTime: number };
}

/** What fit `f` expects in bin k (the model through the window). */
export function expectedDensity(f: ComponentFit, spectrum: MeasuredSpectrum, frame: SpectrumFrame, k: number): number {
  const v = toVector(f.parameters);
  return expectedBin(v, f.components, frame, spectrum.readings[k]!, new Float64Array(v.length), new Float64Array(v.length));
}

function measured(spectra: ResidualSpectra, sampleRate: number, counts: Float64Array | null, readings: readonly BinReading[]): MeasuredSpectrum {
  const width = spectra.segmenter.segmentLength / 2 + 1;
  const sums = new Float64Array(width);
  let segments = 0;
  for (let g = 0; g < spectra.segments.length; g++) {
    const w = counts ? counts[g]! : 1;
    if (w === 0) continue;
    segments += w * spectra.segments[g]!;
    for (let k = 0; k < width; k++) sums[k] += w * spectra.sums[g * width + k]!;
  }
  const estimate = welchFromSums(sums, segments, sampleRate, spectra.segmenter);
  return { frequencies: estimate.frequencies, density: estimate.density, ...spectrumWeights(spectra.segmenter.window, segments), readings };
}

/** Largest share of component `index` (1: 1/f, 2: Lorentzian) over the masked bins. */
function largestShare(fit: ComponentFit, spectrum: MeasuredSpectrum, mask: Uint8Array, frame: SpectrumFrame, index: 1 | 2): number {
  let share = 0;
  for (let k = 0; k < mask.length; k++) {
    if (!mask[k]) continue;
    const parts = componentDensities(fit.parameters, frame, spectrum.frequencies[k]!);
    share = Math.max(share, parts[index] / (parts[0] + parts[1] + parts[2]));
  }
  return share;
}

/** Fits the noise of the residual spectra (see the file comment); `knownLines` in Hz (folded into [0, fs/2] here). */
export function fitNoise(spectra: ResidualSpectra, sampleRate: number, stream: RandomStream, resamples: number, knownLines: readonly number[] = []): NoiseFit {
  const length = spectra.segmenter.segmentLength;
  const readings = Array.from({ length: length / 2 + 1 }, (_, k) => binReading(k, length, sampleRate));
  const spectrum = measured(spectra, sampleRate, null, readings);
  const n = spectrum.frequencies.length;
  const mask = new Uint8Array(n);
  // not the lowest two bins (the segment mean's window leaks there) nor the last (f = fs/2: one-sided
  // Welch leaves it undoubled, so it shows half the density, as scipy.signal.welch does)
  for (let k = 2; k < n - 1; k++) mask[k] = spectrum.density[k]! > 0 ? 1 : 0;
  const referenceFrequency = Math.sqrt(spectrum.frequencies[2]! * spectrum.frequencies[n - 2]!);
  const frame: SpectrumFrame = { referenceFrequency, sampleRate };
  const all: SpectrumComponents = { flicker: true, lorentzian: true };
  const lines: number[] = [];
  const step = sampleRate / length;
  for (const line of knownLines) {
    const folded = Math.abs(line - sampleRate * Math.round(line / sampleRate));
    const k = Math.round(folded / step);
    if (folded <= 0 || k >= n) continue;
    lines.push(folded);
    for (let j = Math.max(0, k - KNOWN_LINE_REACH); j <= Math.min(n - 1, k + KNOWN_LINE_REACH); j++) mask[j] = 0;
  }
  const threshold = Math.max(LINE_FACTOR, 1 + 6 * spectrum.relativeError);
  let full = fitComponents(spectrum, mask, all, frame);
  for (let round = 0; round < 8; round++) {
    const height = (k: number) => spectrum.density[k]! / expectedDensity(full, spectrum, frame, k);
    const peaks: { k: number; height: number }[] = [];
    for (let k = 0; k < n; k++) if (mask[k] && height(k) > threshold) peaks.push({ k, height: height(k) });
    if (peaks.length === 0) break;
    for (const { k, height: h } of peaks) {
      // a line's top: no higher flagged bin next to it
      if (!peaks.some((p) => Math.abs(p.k - k) === 1 && p.height > h)) lines.push(spectrum.frequencies[k]!);
      const reach = Math.ceil(Math.max(2, ((100 * h) / (Math.PI * Math.PI)) ** (1 / 6)));
      for (let j = Math.max(0, k - reach); j <= Math.min(n - 1, k + reach); j++) mask[j] = 0;
    }
    full = fitComponents(spectrum, mask, all, frame);
  }
  const white = fitComponents(spectrum, mask, { flicker: false, lorentzian: false }, frame);
  const flickerOnly = fitComponents(spectrum, mask, { flicker: true, lorentzian: false }, frame);
  const lorentzOnly = fitComponents(spectrum, mask, { flicker: false, lorentzian: true }, frame);
  const test = (without: ComponentFit, within: ComponentFit, index: 1 | 2): ComponentTest => {
    const deviance = Math.max(0, 2 * (without.objective - within.objective));
    const share = largestShare(within, spectrum, mask, frame, index);
    return { deviance, share, kept: deviance > COMPONENT_DEVIANCE && share >= RELEVANT_SHARE };
  };
  let flicker = test(lorentzOnly, full, 1), lorentzian = test(flickerOnly, full, 2);
  let chosen: ComponentFit;
  if (flicker.kept && lorentzian.kept) chosen = full;
  else if (flicker.kept) { chosen = flickerOnly; flicker = test(white, flickerOnly, 1); }
  else if (lorentzian.kept) { chosen = lorentzOnly; lorentzian = test(white, lorentzOnly, 2); }
  else {
    flicker = test(white, flickerOnly, 1);
    lorentzian = test(white, lorentzOnly, 2);
    if (flicker.kept && (!lorentzian.kept || flicker.deviance >= lorentzian.deviance)) { chosen = flickerOnly; lorentzian = { ...lorentzian, kept: false }; }
    else if (lorentzian.kept) { chosen = lorentzOnly; flicker = { ...flicker, kept: false }; }
    else chosen = white;
  }
  const errors = bootstrapErrors(spectra, sampleRate, mask, frame, chosen, stream, resamples, readings);
  return {
    spectrum, mask, lines, referenceFrequency, frame, segmentLength: spectra.segmenter.segmentLength,
    segments: spectra.segments.reduce((a, b) => a + b, 0), chosen, flicker, lorentzian, errors,
  };
}

function bootstrapErrors(
  spectra: ResidualSpectra, sampleRate: number, mask: Uint8Array, frame: SpectrumFrame, chosen: ComponentFit, stream: RandomStream, resamples: number,
  readings: readonly BinReading[],
): NoiseFit['errors'] {
  const counts = new Float64Array(spectra.segments.length);
  const draws: SpectrumParameters[] = [];
  for (let b = 0; b < resamples; b++) {
    drawGroupCounts(stream, counts);
    const again = measured(spectra, sampleRate, counts, readings);
    draws.push(fitFrom(again, mask, chosen.components, frame, chosen.parameters).parameters);
  }
  const sd = (f: (p: SpectrumParameters) => number) => spread(draws.map(f));
  return {
    white: sd((p) => Math.sqrt(p.white)),
    flickerDensity: chosen.components.flicker ? sd((p) => Math.sqrt(p.flicker!.amplitude)) : NaN,
    exponent: chosen.components.flicker ? sd((p) => p.flicker!.exponent) : NaN,
    lorentzianDensity: chosen.components.lorentzian ? sd((p) => Math.sqrt(p.lorentzian!.amplitude)) : NaN,
    correlationTime: chosen.components.lorentzian ? sd((p) => p.lorentzian!.correlationTime) : NaN,
  };
}
