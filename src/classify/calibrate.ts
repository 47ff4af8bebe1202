/**
 * Calibration of each pipeline on its own shots (never the scored ones), as a lab does it
 * from shots of known preparation: the separation axis from the mean I/Q of each intended
 * outcome; for matched/optimal weights the weights from the calibration shots' decimated records
 * (calibrate-bins.ts); for the likelihood classifier the hidden-Markov model; then the decision
 * rule on the decision statistic (the weighted value, or the log-odds): threshold (midpoint of
 * the outcome means, count-minimising on the calibration histograms, or fixed; the likelihood
 * classifier decides at log-odds 0) and the ambiguous band around it.
 *
 * The calibration batches carry the decimated records only for pipelines that need them
 * (compile-pipeline.ts `needsCalibrationBins`); calibrationShots × bins values per pipeline.
 */
import { midpointThreshold, optimalThreshold, type ThresholdRule } from './threshold.ts';
import { project, separationAxis, type Axis } from './project.ts';
import type { HmmClassifier } from './likelihood.ts';
import { CAUSES } from '../analysis/causes.ts';
import type { Budget } from '../analysis/budget.ts';
import type { PipelineSpec, Scenario } from '../scenario/types.ts';
import type { ShotBatch } from '../engine/trace/batch.ts';
import { InputError } from '../errors.ts';
import type { CompiledPipeline, CompiledPoint } from '../engine/compile-point.ts';
import { calibratedWeights, calibrateLikelihood, gatherRecords, logOddsOf, weightedValues } from './calibrate-records.ts';

export interface PipelineCalibration {
  axis: Axis;
  /** Decision rule on the decision statistic (the likelihood classifier: log-odds > 0 is outcome 1). */
  rule: ThresholdRule;
  /** Mean decision statistic of the calibration shots of each intended outcome. */
  outcomeMeans: [number, number];
  /** Calibrated weights per bin (matched/optimal), else null. */
  weights: Float64Array | null;
  /** Half-width of the ambiguous band around the threshold (0: no band). */
  bandHalfWidth: number;
  /** The likelihood classifier, else null. */
  likelihood: HmmClassifier | null;
  /** σ of one projected bin used by the likelihood classifier (NaN otherwise). */
  binSigma: number;
}

/** Calibrates every pipeline of a point from its calibration batches. */
export function calibrate(point: CompiledPoint, batches: readonly ShotBatch[]): PipelineCalibration[] {
  const outcomeOf = point.scenario.states.map((s) => s.outcome);
  return point.pipelines.map((pipeline, p) => {
    const axis = calibrationAxis(pipeline, p, batches, outcomeOf);
    const chain = pipeline.chain;
    let statistic: [number[], number[]];
    let weights: Float64Array | null = null;
    let likelihood: HmmClassifier | null = null;
    let binSigma = NaN;
    if (chain.classifier === 'likelihood' || chain.weights !== 'boxcar') {
      const records = gatherRecords(point, p, batches, axis);
      let values: Float64Array;
      if (chain.classifier === 'likelihood') {
        const l = calibrateLikelihood(point, p, records, axis);
        likelihood = l.classifier;
        binSigma = l.sigma;
        values = logOddsOf(records, l.classifier);
      } else {
        weights = calibratedWeights(pipeline, records, point.scenario.states.length);
        values = weightedValues(records, weights);
      }
      statistic = [[], []];
      for (let i = 0; i < records.count; i++) statistic[records.outcome[i]!]!.push(values[i]!);
    } else {
      statistic = [[], []];
      for (const b of batches) {
        const v = b.values[p]!;
        const projected = project(v.inPhase, v.quadrature, axis, new Float64Array(b.count));
        for (let i = 0; i < b.count; i++) statistic[outcomeOf[b.intended[i]!]!]!.push(projected[i]!);
      }
    }
    const m0 = statistic[0].reduce((a, x) => a + x, 0) / statistic[0].length;
    const m1 = statistic[1].reduce((a, x) => a + x, 0) / statistic[1].length;
    const rule = decisionRule(pipeline.spec, likelihood !== null, statistic, m0, m1);
    const band = chain.band;
    const bandHalfWidth = band === null ? 0 : band.kind === 'width' ? band.value / 2 : (band.value * Math.abs(m1 - m0)) / 2;
    return { axis, rule, outcomeMeans: [m0, m1], weights, bandHalfWidth, likelihood, binSigma };
  });
}

/** The separation axis from the mean integrated I/Q of each intended outcome (the I axis at baseband or with a fixed referencePhase). */
function calibrationAxis(pipeline: CompiledPipeline, p: number, batches: readonly ShotBatch[], outcomeOf: readonly number[]): Axis {
  const sums = [[0, 0, 0], [0, 0, 0]] as [number, number, number][];
  for (const b of batches) {
    const v = b.values[p]!;
    for (let i = 0; i < b.count; i++) {
      const s = sums[outcomeOf[b.intended[i]!]!]!;
      s[0] += v.inPhase[i]!; s[1] += v.quadrature[i]!; s[2]++;
    }
  }
  const [g0, g1] = sums as [[number, number, number], [number, number, number]];
  if (g0[2] === 0 || g1[2] === 0) {
    // a property of the scenario (prepare weights, calibrationShots), so a user error, not a bug
    throw new InputError('scenario', 'calibrationShots', 'enough calibration shots to see both outcomes (raise calibrationShots or the prepare weight of the rare outcome)',
      `${g0[2]} and ${g1[2]} shots of the two outcomes`);
  }
  // baseband, or a fixed reference angle: the decision is on I of that reference (README, referencePhase)
  if (pipeline.kernels.quadrature === null || pipeline.spec.referencePhase !== 'auto') return { cos: 1, sin: 0 };
  return separationAxis(g0[0] / g0[2], g0[1] / g0[2], g1[0] / g1[2], g1[1] / g1[2]);
}

function decisionRule(spec: PipelineSpec, likelihood: boolean, statistic: [number[], number[]], m0: number, m1: number): ThresholdRule {
  if (likelihood) return { threshold: 0, highIsOne: true };
  const { threshold } = spec;
  if (threshold.method === 'midpoint') return midpointThreshold(m0, m1);
  if (threshold.method === 'fixed') return { threshold: threshold.value, highIsOne: m1 >= m0 };
  const best = optimalThreshold(Float64Array.from(statistic[0]), Float64Array.from(statistic[1]));
  return { threshold: best.threshold, highIsOne: best.highIsOne };
}

/**
 * The scenario the scored shots run with: pipelines with calibrated weights carry them
 * (`calibratedWeights`), so the kernels built from it (in any process) use them. Returns the
 * same object when nothing was calibrated into the kernels.
 */
export function withCalibration(scenario: Scenario, calibrations: readonly PipelineCalibration[]): Scenario {
  if (calibrations.every((c) => c.weights === null)) return scenario;
  return {
    ...scenario,
    pipelines: scenario.pipelines.map((p, i) => {
      const w = calibrations[i]!.weights;
      return w === null ? p : { ...p, calibratedWeights: Array.from(w) };
    }),
  };
}

/**
 * The budget of a pipeline that has no analytic model (the likelihood classifier): every value
 * NaN, which the summary shows as "—" and never counts as a disagreement.
 */
export function unavailableBudget(states: number): Budget {
  const state = () => ({
    causes: new Float64Array(CAUSES.length).fill(NaN), alone: new Float64Array(CAUSES.length).fill(NaN), total: NaN, linearSum: NaN,
  });
  return {
    means: new Float64Array(states).fill(NaN), sigma: NaN, separation: NaN, snr: NaN,
    perState: Array.from({ length: states }, state), mean: state(),
  };
}
