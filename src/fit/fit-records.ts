/**
 * Fitting a twin to recorded traces, start to end (pure: the records come through a
 * RecordSource, the numbers go back as a FittedReadout).
 *
 * 1. The carrier of real records: given, or found in the first records (carrier.ts).
 * 2. Every record to bins of its envelope (binning.ts); the two-level hidden-Markov model learned
 *    on them (two-level.ts), its rates tested (likelihood ratio) and their errors bootstrapped
 *    (rate-bootstrap.ts).
 * 3. Each record read with the model (posteriors.ts): its starting level and its clean stretches;
 *    the levels from the clean bins (levels.ts), the preparation errors from the starts and the
 *    labels (preparation.ts).
 * 4. The noise: the clean stretches less their level, Welch's spectrum, the model fitted and
 *    pruned (residuals.ts, noise-model.ts), then put in the twin's terms: real records give the
 *    record's own additive noise; I/Q pairs are read as the lab's demodulation 2·x·e^(−iθ)
 *    (dsp/demodulate.ts), in which a record's white density S shows as 2S along any direction
 *    and noise that enters at the sensor (modulated like the level) shows as itself along the
 *    separation — so the twin gets S = W/2 and slow noise at the sensor side.
 * 5. The window means against the model's prediction (window-model.ts).
 */
import { InputError } from '../errors.ts';
import { carrierTables, stateWaveform } from '../signal/carrier.ts';
import { firstSampleAtOrAfter } from '../signal/grid.ts';
import { makeStream } from '../random/streams.ts';
import { binRecords, planBins } from './binning.ts';
import { fitCarrier } from './carrier.ts';
import { groupRecords, type Estimate } from './estimate.ts';
import type { FittedCarrier, FittedNoise, FittedReadout, FittedState, FittedTransition } from './fitted-readout.ts';
import { twinLevels } from './levels.ts';
import { fitNoise, type NoiseFit } from './noise-model.ts';
import { readRecords } from './posteriors.ts';
import { preparationErrors, statesOfLabels } from './preparation.ts';
import { rateStandardErrors } from './rate-bootstrap.ts';
import type { RecordSource } from './records.ts';
import { chooseSegmentLength, residualSpectra, type ResidualModel } from './residuals.ts';
import { learnTwoLevels, testRates } from './two-level.ts';
import { kernelSigma, windowView } from './window-model.ts';

/** The shortest Welch segment (samples). */
export const MIN_SEGMENT = 32;
/** Most records used (the first ones). */
export const MAX_RECORDS = 20000;
/** Most groups of records for the bootstrap. */
const GROUPS = 64;
/** Records searched for the carrier. */
const CARRIER_RECORDS = 512;

/** What the fit is told. */
export interface FitSettings {
  sampleRate: number;
  /** Real records: the carrier frequency, none, or find it. */
  carrier: number | 'none' | 'find';
  /** I/Q records: the carrier the twin modulates (null: a quarter of the sample rate, said in the result). */
  pairCarrier: number | null;
  window: { start: number; length: number };
  /** Labels of the records (255: none) and the names of outcomes 0 and 1. */
  labels: { values: Uint8Array; names: readonly [string, string] } | null;
  seed: number;
  resamples: number;
  maxRecords?: number;
}

/** The 1/f band edges of the twin: from the lowest fitted frequency to where 1/f falls to 1 % of the white noise (at most fs/2). */
function flickerBand(fit: NoiseFit, sampleRate: number): { low: number; high: number } {
  let low = Infinity;
  for (let k = 0; k < fit.mask.length; k++) if (fit.mask[k]) { low = fit.spectrum.frequencies[k]!; break; }
  const p = fit.chosen.parameters;
  let high = sampleRate / 2;
  if (p.flicker) high = Math.min(high, fit.referenceFrequency * (p.flicker.amplitude / (0.01 * p.white)) ** (1 / p.flicker.exponent));
  return { low, high: Math.max(high, Math.min(sampleRate / 2, 2 * low)) };
}

function twinNoise(fit: NoiseFit, domain: 'record' | 'pair', sampleRate: number): FittedNoise {
  const p = fit.chosen.parameters, e = fit.errors;
  const factor = domain === 'pair' ? Math.SQRT1_2 : 1;
  const band = flickerBand(fit, sampleRate);
  return {
    injection: domain === 'pair' ? 'sensor' : 'amplifier', domain,
    white: { value: Math.sqrt(p.white) * factor, standardError: e.white * factor },
    flicker: {
      density: { value: p.flicker ? Math.sqrt(p.flicker.amplitude) : NaN, standardError: e.flickerDensity },
      at: fit.referenceFrequency, exponent: { value: p.flicker?.exponent ?? NaN, standardError: e.exponent }, ...band, test: fit.flicker,
    },
    correlated: {
      density: { value: p.lorentzian ? Math.sqrt(p.lorentzian.amplitude) : NaN, standardError: e.lorentzianDensity },
      correlationTime: { value: p.lorentzian?.correlationTime ?? NaN, standardError: e.correlationTime }, test: fit.lorentzian,
    },
    fit,
  };
}

/** Fits the twin (see the file comment). */
export function fitRecords(src: RecordSource, s: FitSettings): FittedReadout {
  const fs = s.sampleRate, samples = src.samples;
  if (samples < MIN_SEGMENT) throw new InputError(src.source, '', `records of at least ${MIN_SEGMENT} samples (one segment of the noise spectrum)`, `${samples} samples`);
  const used = Math.min(src.rows, s.maxRecords ?? MAX_RECORDS);
  const windowLo = Math.min(samples, firstSampleAtOrAfter(s.window.start, fs));
  const windowHi = Math.min(samples, firstSampleAtOrAfter(s.window.start + s.window.length, fs));
  if (windowHi <= windowLo) throw new InputError(src.source, 'window', `a window that holds samples of the ${samples}-sample records`, `${s.window.start} s + ${s.window.length} s`);

  // 1. the carrier (real records)
  let carrier = null as ReturnType<typeof fitCarrier>;
  if (!src.complex && s.carrier !== 'none') {
    const rows = Math.min(used, CARRIER_RECORDS);
    const sample = new Float64Array(rows * samples), row = new Float64Array(samples);
    for (let r = 0; r < rows; r++) { src.row(r, row, null); sample.set(row, r * samples); }
    carrier = fitCarrier(sample, rows, samples, fs, s.carrier === 'find' ? null : s.carrier);
  }

  // 2. bins and the two-level model
  const plan = planBins(samples, fs, carrier, { lo: windowLo, hi: windowHi });
  const binned = binRecords(src, used, plan);
  const pair = src.complex && binned.complexValued;
  const labels = s.labels ? s.labels.values.subarray(0, used) : null;
  const model = learnTwoLevels(binned, labels, src.source);
  const binDuration = plan.binSamples / fs;
  const rates = testRates(model, binDuration);
  const groups = groupRecords(used, GROUPS);

  // 3. the reading, the levels, the labels
  const reading = readRecords(binned, model, groups);
  const baseband = !pair && carrier === null;
  const levels = twinLevels(reading.levelSums, baseband, makeStream(s.seed, 0, 'aux', 0), s.resamples);
  const stateOfLabel = labels ? statesOfLabels(reading.startState, labels, src.source, s.labels!.names) : null;
  // twin state t ↔ model state: by label, else lower first
  const modelState: [number, number] = stateOfLabel ?? [levels.lower, levels.upper];
  const twinOf = (m: number) => (modelState[0] === m ? 0 : 1);

  // 4. the noise
  const residual: ResidualModel = pair
    ? { kind: 'along-axis', levels: levels.measured, axis: { cos: Math.cos(levels.rotation), sin: Math.sin(levels.rotation) } }
    : src.complex
      ? { kind: 'along-axis', levels: levels.measured, axis: { cos: 1, sin: 0 } }
      : { kind: 'record', waveforms: [0, 1].map((m) => waveformOf({ re: levels.re[m]!.value, im: levels.im[m]!.value }, carrier, levels.rotation, samples, fs)) as [Float64Array, Float64Array] };
  const segmentLength = chooseSegmentLength(reading, plan, MIN_SEGMENT);
  if (segmentLength === 0) throw new InputError(src.source, '', `clean stretches of at least ${MIN_SEGMENT} samples (records that stay at one level that long)`, 'none');
  const spectra = residualSpectra(src, plan, reading, residual, segmentLength, groups);
  if (!spectra.sums.some((x) => x > 0)) throw new InputError(src.source, '', 'records with noise (the twin\'s noise comes from their spectrum)', 'records without any noise');
  const knownLines = pair && s.pairCarrier !== null ? [2 * s.pairCarrier] : carrier ? [1, 2, 3].map((h) => h * carrier!.frequency) : [];
  const noiseFit = fitNoise(spectra, fs, makeStream(s.seed, 0, 'aux', 1), s.resamples, knownLines);
  const noise = twinNoise(noiseFit, pair ? 'pair' : 'record', fs);

  // rates and their errors, in twin state order
  const errors = rateStandardErrors(model, groups, makeStream(s.seed, 0, 'aux', 2), s.resamples, binDuration, { up: rates.up.kept, down: rates.down.kept });
  const transitions: FittedTransition[] = [
    { from: 0, to: 1, test: rates.up, error: errors.up },
    { from: 1, to: 0, test: rates.down, error: errors.down },
  ].map(({ from, to, test, error }) => {
    const [tf, tt] = [twinOf(from), twinOf(to)];
    const upward = from === levels.lower;
    return {
      from: tf, to: tt, kind: upward ? 'excitation' as const : 'relaxation' as const,
      rate: { value: test.rate, standardError: error },
      lifetime: { value: 1 / test.rate, standardError: error / (test.rate * test.rate) },
      deviance: test.deviance, kept: test.kept,
    };
  });
  const rateOut = (m: number) => (m === 0 ? rates.up.rate : rates.down.rate);

  // preparation errors, with labels
  let preparation: FittedReadout['preparation'] = null;
  if (labels && stateOfLabel) {
    const leave: [number, number] = [0, 1].map((m) => -Math.expm1(-rateOut(m) * binDuration / 2)) as [number, number];
    preparation = preparationErrors(reading.startState, labels, stateOfLabel, leave).map((p) => ({ ...p, state: twinOf(p.state), labelName: s.labels!.names[p.label]! }));
  }

  // states
  const shares = stateShares([model.shares[modelState[0]]!, model.shares[modelState[1]]!], labels, stateOfLabel, used);
  const states = [0, 1].map((t): FittedState => {
    const m = modelState[t]!;
    return {
      name: m === levels.lower ? 'lower' : 'upper', outcome: s.labels ? s.labels.names[t]! : String(t),
      re: levels.re[m]!, im: pair || carrier ? levels.im[m]! : { value: 0, standardError: 0 }, share: shares[t]!,
    };
  }) as [FittedState, FittedState];

  const fittedCarrier: FittedCarrier = pair
    ? { shape: 'sine', frequency: { value: s.pairCarrier ?? fs / 4, standardError: 0 }, phase: { value: 0, standardError: 0 }, origin: s.pairCarrier === null ? 'assumed' : 'given', lineRatio: NaN }
    : carrier
      ? {
        shape: carrier.shape, frequency: { value: carrier.frequency, standardError: carrier.standardError },
        phase: { value: levels.rotation, standardError: levels.rotationError }, origin: s.carrier === 'find' ? 'found' : 'given', lineRatio: carrier.lineRatio,
      }
      : { shape: 'none' };

  // 5. window means against the model
  const rate = new Float64Array(4);
  for (const t of transitions) rate[t.from * 2 + t.to] = t.rate.value;
  const kernel = new Float64Array(samples);
  for (let k = windowLo; k < windowHi; k++) {
    kernel[k] = carrier && !src.complex
      ? (2 * plan.scale / (windowHi - windowLo)) * Math.cos((2 * Math.PI * carrier.frequency * k) / fs + levels.rotation)
      : 1 / (windowHi - windowLo);
  }
  const p = noiseFit.chosen.parameters;
  const sigma = kernelSigma(p, noiseFit.referenceFrequency, kernel, windowLo, windowHi, fs, noise.flicker.low, noise.flicker.high);
  const cos = Math.cos(levels.rotation), sin = Math.sin(levels.rotation);
  const view = windowView({
    values: Float64Array.from(binned.windowRe, (re, i) => re * cos + binned.windowIm[i]! * sin),
    labels: labels && s.labels ? { values: labels, names: s.labels.names } : null,
    levels: [states[0].re.value, states[1].re.value], shares: [shares[0]!.value, shares[1]!.value], rate,
    preparation: [0, 1].map((t) => {
      const e = preparation?.find((q) => q.state === t);
      return e && e.probability > 0 ? { probability: e.probability, into: 1 - t } : null;
    }),
    samples, windowLo, windowHi, sampleRate: fs, sigma,
  });

  return {
    source: src.source, rows: src.rows, used, samples, complex: src.complex, sampleRate: fs, window: s.window, states,
    carrier: fittedCarrier, transitions, preparation, noise, view,
    details: {
      binSamples: plan.binSamples, bins: plan.bins, levelDeviance: model.levelDeviance, iterations: model.learned.iterations,
      groups: groups.count, resamples: s.resamples, seed: s.seed, cleanBins: reading.cleanBins[0] + reading.cleanBins[1],
    },
  };
}

/**
 * The noise-free record of a level in the twin's frame (levels turned by the carrier phase χ):
 * constant at baseband, the level on the carrier at phase χ otherwise (signal/carrier.ts) — for a
 * square carrier a phase is not a turn of the level, so the frame matters.
 */
function waveformOf(level: { re: number; im: number }, carrier: { frequency: number; shape: 'sine' | 'square' } | null, phase: number, samples: number, fs: number): Float64Array {
  if (!carrier) return new Float64Array(samples).fill(level.re);
  const tables = carrierTables({ shape: carrier.shape, frequency: carrier.frequency, phase }, samples, fs);
  return stateWaveform(tables, level.re, level.im, 1, new Float64Array(samples));
}

/** Prepared shares in twin state order: the labels' shares, else the model's start probabilities; binomial standard errors. */
function stateShares(modelShares: [number, number], labels: Uint8Array | null, stateOfLabel: [number, number] | null, used: number): [Estimate, Estimate] {
  let shares: [number, number];
  let n = used;
  if (labels && stateOfLabel) {
    let ones = 0, labelled = 0;
    for (let i = 0; i < labels.length; i++) if (labels[i]! < 2) { labelled++; if (labels[i] === 1) ones++; }
    n = labelled;
    shares = [1 - ones / labelled, ones / labelled];
  } else {
    shares = [modelShares[0], modelShares[1]];
  }
  const se = (p: number) => Math.sqrt((p * (1 - p)) / n);
  return [{ value: shares[0], standardError: se(shares[0]) }, { value: shares[1], standardError: se(shares[1]) }];
}
