/**
 * Calibration from the decimated records of calibration shots (never scored shots): matched
 * and optimal linear integration weights, and the hidden-Markov likelihood classifier.
 *
 * Matched weights (Gambetta, Braff, Wallraff, Girvin & Schoelkopf, Phys. Rev. A 76, 012325
 * (2007)): w ∝ Δμ, the mean projected record of the calibration shots prepared in outcome 1
 * minus that of outcome 0, bin by bin. It includes relaxation, so under T1 decay Δμ(t) falls as
 * e^(−t/T1) and so do the weights.
 * Optimal linear weights: w ∝ C⁻¹·Δμ with C the noise covariance of the bins, pooled over the
 * states from CLEAN calibration shots (no preparation or mapping error, no jump up to the window
 * end) about each state's own mean (the Fisher discriminant of the noise; Fisher, Ann. Eugen. 7,
 * 179 (1936)). For white noise and no filter C ∝ I and this is the matched filter up to
 * estimation noise; a filter that colours the noise between bins makes them differ.
 * Likelihood classifier (D'Anjou & Coish, Phys. Rev. A 89, 012313 (2014)): per-state bin means
 * from the model (each state's noise-free waveform through the same chain), σ per bin pooled
 * from the clean calibration shots' residuals, per-bin transition matrix exp(Q·D/fs) from the
 * scenario's rates, and the prior at the window start from the prepared mixture after
 * preparation and mapping errors, propagated from the record start.
 */
import { matchedWeights, noiseCovariance, optimalLinearWeights } from '../dsp/weights.ts';
import type { Axis } from './project.ts';
import { makeHmmClassifier, type HmmClassifier } from './likelihood.ts';
import { generatorMatrix, transitionMatrix } from './transition.ts';
import { matrixExponential } from './matrix-exponential.ts';
import type { Scenario } from '../scenario/types.ts';
import type { ShotBatch } from '../engine/trace/batch.ts';
import type { CompiledPipeline, CompiledPoint } from '../engine/compile-point.ts';
import { makeProcessScratch, processRecord, projectRecords } from '../dsp/process-record.ts';

/** The projected bins of one pipeline's calibration shots with their truth, row after row. */
export interface CalibrationRecords {
  bins: number;
  count: number;
  /** count × bins projected values. */
  projected: Float64Array;
  /** Intended outcome of each shot. */
  outcome: Uint8Array;
  /** The state of a clean shot (no preparation/mapping error, no jump before the window end), else 255. */
  cleanState: Uint8Array;
}

/** Gathers and projects pipeline p's kept bins from the calibration batches. */
export function gatherRecords(point: CompiledPoint, p: number, batches: readonly ShotBatch[], axis: Axis): CalibrationRecords {
  const pipeline = point.pipelines[p]!;
  const bins = pipeline.chain.bins;
  const outcomeOf = point.scenario.states.map((s) => s.outcome);
  const count = batches.reduce((a, b) => a + b.count, 0);
  const projected = new Float64Array(count * bins);
  const outcome = new Uint8Array(count);
  const cleanState = new Uint8Array(count).fill(255);
  let at = 0;
  for (const b of batches) {
    const kept = b.records?.[p];
    if (!kept) throw new Error(`pipeline "${pipeline.spec.name}": calibration batches carry no decimated records (the trace engine keeps them)`);
    projectRecords(kept.inPhase, kept.quadrature, axis, projected.subarray(at * bins, (at + b.count) * bins));
    for (let i = 0; i < b.count; i++) {
      const s = b.intended[i]!;
      outcome[at + i] = outcomeOf[s]!;
      if (b.prepared[i] === s && b.initial[i] === s && b.jumpCause[i] === 0) cleanState[at + i] = s;
    }
    at += b.count;
  }
  return { bins, count, projected, outcome, cleanState };
}

/** Per-bin mean of the records whose `select` is true. */
function meanOf(r: CalibrationRecords, select: (i: number) => boolean): { mean: Float64Array; n: number } {
  const mean = new Float64Array(r.bins);
  let n = 0;
  for (let i = 0; i < r.count; i++) {
    if (!select(i)) continue;
    n++;
    const base = i * r.bins;
    for (let b = 0; b < r.bins; b++) mean[b]! += r.projected[base + b]!;
  }
  for (let b = 0; b < r.bins; b++) mean[b]! /= n;
  return { mean, n };
}

/** Δμ per bin: mean record of intended outcome 1 minus outcome 0. */
export function meanDifference(r: CalibrationRecords): Float64Array {
  const one = meanOf(r, (i) => r.outcome[i] === 1);
  const zero = meanOf(r, (i) => r.outcome[i] === 0);
  if (one.n === 0 || zero.n === 0) throw new Error('calibration needs shots prepared in both outcomes; raise calibrationShots or check prepare');
  return Float64Array.from(one.mean, (m, b) => m - zero.mean[b]!);
}

/** Noise covariance of the bins, pooled over states from clean records about each state's mean. */
export function pooledNoiseCovariance(r: CalibrationRecords, states: number, pipelineName: string): Float64Array {
  const n = r.bins;
  const pooled = new Float64Array(n * n);
  let dof = 0;
  for (let s = 0; s < states; s++) {
    const rows: number[] = [];
    for (let i = 0; i < r.count; i++) if (r.cleanState[i] === s) rows.push(i);
    if (rows.length < 2) continue;
    const records = new Float64Array(rows.length * n);
    rows.forEach((i, j) => records.set(r.projected.subarray(i * n, (i + 1) * n), j * n));
    const { mean } = meanOf(r, (i) => r.cleanState[i] === s);
    const c = noiseCovariance(records, mean, 1);
    for (let k = 0; k < n * n; k++) pooled[k]! += (rows.length - 1) * c[k]!;
    dof += rows.length - 1;
  }
  if (dof <= n) {
    throw new Error(`pipeline "${pipelineName}": ${dof} degrees of freedom from clean calibration shots cannot estimate a ${n}×${n} noise covariance; raise calibrationShots or decimate more`);
  }
  for (let k = 0; k < n * n; k++) pooled[k]! /= dof;
  return pooled;
}

/** Matched or optimal weights of a pipeline from its calibration records. */
export function calibratedWeights(pipeline: CompiledPipeline, r: CalibrationRecords, states: number): Float64Array {
  const delta = meanDifference(r);
  if (pipeline.chain.weights === 'matched') return matchedWeights(delta);
  return optimalLinearWeights(delta, pooledNoiseCovariance(r, states, pipeline.spec.name));
}

/** Values Σ_b w_b·r_b of every calibration record. */
export function weightedValues(r: CalibrationRecords, weights: Float64Array): Float64Array {
  const out = new Float64Array(r.count);
  for (let i = 0; i < r.count; i++) {
    let v = 0;
    const base = i * r.bins;
    for (let b = 0; b < r.bins; b++) v += weights[b]! * r.projected[base + b]!;
    out[i] = v;
  }
  return out;
}

/** Probability of each state at the record start: the prepared mixture after preparation and mapping errors. */
export function initialMixture(scenario: Scenario): Float64Array {
  const n = scenario.states.length;
  const flip = (p: Float64Array, flips: Scenario['preparationError']): Float64Array => {
    const out = new Float64Array(n);
    for (let s = 0; s < n; s++) {
      const f = flips[s];
      if (f && f.into !== s) {
        out[s]! += p[s]! * (1 - f.probability);
        out[f.into]! += p[s]! * f.probability;
      } else out[s]! += p[s]!;
    }
    return out;
  };
  return flip(flip(Float64Array.from(scenario.prepare), scenario.preparationError), scenario.mappingError);
}

/** The likelihood classifier of a pipeline and the σ per bin it uses. */
export interface LikelihoodCalibration {
  classifier: HmmClassifier;
  sigma: number;
  /** Model means per state and bin (projected). */
  means: Float64Array[];
}

/** Builds the likelihood classifier of pipeline p (see the file comment). */
export function calibrateLikelihood(point: CompiledPoint, p: number, r: CalibrationRecords, axis: Axis): LikelihoodCalibration {
  const { scenario, grid } = point;
  const pipeline = point.pipelines[p]!;
  const chain = pipeline.chain;
  const n = scenario.states.length;
  const scratch = makeProcessScratch(chain, grid.samples);
  const binsI = new Float64Array(chain.bins);
  const binsQ = chain.reference ? new Float64Array(chain.bins) : null;
  const means = point.waveforms.map((w) => {
    processRecord(chain, w, scratch, binsI, binsQ, 0);
    return projectRecords(binsI, binsQ, axis, new Float64Array(chain.bins));
  });
  let sum = 0, count = 0;
  for (let i = 0; i < r.count; i++) {
    const s = r.cleanState[i]!;
    if (s === 255) continue;
    const base = i * r.bins;
    const m = means[s]!;
    for (let b = 0; b < r.bins; b++) {
      const d = r.projected[base + b]! - m[b]!;
      sum += d * d;
    }
    count += r.bins;
  }
  if (count === 0) throw new Error(`pipeline "${pipeline.spec.name}": no clean calibration shot to estimate the noise per bin; raise calibrationShots`);
  const sigma = Math.sqrt(sum / count);
  const rates = scenario.transitions.map((t) => ({ from: t.from, to: t.to, rate: t.rate }));
  const generator = generatorMatrix(n, rates);
  const transition = transitionMatrix(generator, n, chain.binDuration);
  // prior at the window start: π(0)·exp(Q·t_start)
  const start = initialMixture(scenario);
  const toWindow = new Float64Array(n * n);
  const scaled = Float64Array.from(generator, (q) => q * (chain.windowLo / grid.sampleRate));
  matrixExponential(scaled, n, toWindow);
  const prior = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) prior[j]! += start[i]! * Math.max(0, toWindow[i * n + j]!);
  const classifier = makeHmmClassifier({
    means, sigma, transition, prior,
    outcomeOfState: Uint8Array.from(scenario.states, (s) => s.outcome),
  });
  return { classifier, sigma, means };
}

/** Log-odds of every calibration record under a likelihood classifier. */
export function logOddsOf(r: CalibrationRecords, classifier: HmmClassifier): Float64Array {
  const out = new Float64Array(r.count);
  for (let i = 0; i < r.count; i++) out[i] = classifier.logLikelihoodRatio(r.projected, i * r.bins, r.bins);
  return out;
}
