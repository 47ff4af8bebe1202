/**
 * Calibration from the decimated records of calibration shots (never scored shots): the records
 * gathered and projected (for any classifier that reads bins), and matched and optimal linear
 * integration weights.
 *
 * Matched weights (Gambetta, Braff, Wallraff, Girvin & Schoelkopf, Phys. Rev. A 76, 012325
 * (2007)): w ∝ Δμ/v, the mean projected record of the calibration shots prepared in outcome 1
 * minus that of outcome 0, bin by bin, over each bin's noise variance v (pooled from clean
 * shots; dsp/weights.ts says why the variance: a demodulated record's noise is not stationary).
 * Δμ includes relaxation, so under T1 decay Δμ(t) falls as e^(−t/T1) and so do the weights.
 * Optimal linear weights: w ∝ C⁻¹·Δμ with C the noise covariance of the bins, pooled over the
 * states from CLEAN calibration shots (no preparation or mapping error, no jump up to the window
 * end) about each state's own mean (the Fisher discriminant of the noise; Fisher, Ann. Eugen. 7,
 * 179 (1936)). For white noise and no filter C ∝ I and this is the matched filter up to
 * estimation noise; a filter that colours the noise between bins makes them differ.
 */
import { matchedWeights, noiseCovariance, optimalLinearWeights } from '../dsp/weights.ts';
import { ScenarioProblem } from '../errors.ts';
import type { PipelineChain } from '../dsp/pipeline-chain.ts';
import { projectRecords, type Axis } from './project.ts';
import type { ShotColumns } from './shots.ts';

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

/** Gathers and projects pipeline p's kept bins from the calibration batches; `outcomeOf` maps states to outcomes. */
export function gatherRecords(
  pipelineName: string, chain: Pick<PipelineChain, 'bins'>, p: number, outcomeOf: readonly number[], batches: readonly ShotColumns[], axis: Axis,
): CalibrationRecords {
  const bins = chain.bins;
  const count = batches.reduce((a, b) => a + b.count, 0);
  const projected = new Float64Array(count * bins);
  const outcome = new Uint8Array(count);
  const cleanState = new Uint8Array(count).fill(255);
  let at = 0;
  for (const b of batches) {
    const kept = b.records?.[p];
    if (!kept) throw new Error(`pipeline "${pipelineName}": calibration batches carry no decimated records (the trace engine keeps them)`);
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
  if (one.n === 0 || zero.n === 0) throw new ScenarioProblem(['calibrationShots'], 'calibration shots prepared in both outcomes (raise calibrationShots or check prepare)', `${zero.n} and ${one.n}`);
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
    throw new ScenarioProblem(['calibrationShots'], `more clean calibration shots than the ${n} bins of pipeline "${pipelineName}" (to estimate its ${n}×${n} noise covariance; or decimate more)`, `${dof} degrees of freedom`);
  }
  for (let k = 0; k < n * n; k++) pooled[k]! /= dof;
  return pooled;
}

/** Per-bin noise variance, pooled over states from clean records about each state's mean (the diagonal of pooledNoiseCovariance). */
export function pooledNoiseVariance(r: CalibrationRecords, states: number, pipelineName: string): Float64Array {
  const n = r.bins;
  const pooled = new Float64Array(n);
  let dof = 0;
  for (let s = 0; s < states; s++) {
    const { mean, n: count } = meanOf(r, (i) => r.cleanState[i] === s);
    if (count < 2) continue;
    for (let i = 0; i < r.count; i++) {
      if (r.cleanState[i] !== s) continue;
      const base = i * n;
      for (let b = 0; b < n; b++) pooled[b] += (r.projected[base + b]! - mean[b]!) ** 2;
    }
    dof += count - 1;
  }
  if (dof < 1) throw new Error(`pipeline "${pipelineName}": no clean calibration shots to estimate the noise per bin; raise calibrationShots`);
  for (let b = 0; b < n; b++) pooled[b]! /= dof;
  return pooled;
}

/** Matched or optimal weights of a pipeline from its calibration records (the noise from clean shots). */
export function calibratedWeights(pipelineName: string, kind: 'matched' | 'optimal', r: CalibrationRecords, states: number): Float64Array {
  const delta = meanDifference(r);
  if (kind === 'matched') return matchedWeights(delta, pooledNoiseVariance(r, states, pipelineName));
  return optimalLinearWeights(delta, pooledNoiseCovariance(r, states, pipelineName));
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
