/**
 * Calibration of each pipeline on its own shots (never the scored ones), as a lab does it
 * from shots of known preparation: the separation axis from the mean I/Q of each intended
 * outcome; for matched/optimal weights the weights from the calibration shots' decimated records
 * (calibrate-records.ts); for a classifier that reads bins its model (registry.ts); then the
 * decision rule on the classifier's decision statistic (the weighted value, or e.g. the log-odds)
 * and the ambiguous band around it.
 *
 * The calibration batches carry the decimated records only for pipelines that need them
 * (registry.ts `needsCalibrationBins`); calibrationShots × bins values per pipeline.
 */
import type { ThresholdRule } from './threshold.ts';
import { project, separationAxis, type Axis } from './project.ts';
import type { PipelineSpec } from '../scenario/types.ts';
import type { PipelineChain } from '../dsp/pipeline-chain.ts';
import { ScenarioProblem } from '../errors.ts';
import type { DeviceView } from './contract.ts';
import type { ShotColumns } from './shots.ts';
import { classifierOf } from './registry.ts';
import { calibratedWeights, gatherRecords, weightedValues } from './calibrate-records.ts';

export interface PipelineCalibration {
  axis: Axis;
  /** Decision rule on the classifier's decision statistic (e.g. the likelihood classifier: log-odds > 0 is outcome 1). */
  rule: ThresholdRule;
  /** Mean decision statistic of the calibration shots of each intended outcome. */
  outcomeMeans: [number, number];
  /** Calibrated weights per bin (matched/optimal), else null. */
  weights: Float64Array | null;
  /** Half-width of the ambiguous band around the threshold (0: no band). */
  bandHalfWidth: number;
  /** The classifier's fitted model (plain data: saved with the calibration), null for one that fits none. */
  model: unknown;
}

/** What calibration reads of a point: its states' outcomes and its pipelines (engine/compile-point.ts's CompiledPoint has it all). */
export interface CalibrationView {
  scenario: { states: readonly { outcome: number }[] };
  pipelines: readonly { spec: PipelineSpec; chain: PipelineChain; kernels: { quadrature: Float64Array | null } }[];
}

/**
 * Calibrates every pipeline of a point from its calibration batches. `device` is the simulated
 * device a classifier may start its model from; null for recorded traces (analyze), whose
 * "states" are the two labelled outcomes. A scenario that cannot be calibrated (no shot of an
 * outcome, no noise for a classifier or weights that divide by it, values beyond what the
 * arithmetic holds) is a ScenarioProblem naming the key to change.
 */
export function calibrate(point: CalibrationView, batches: readonly ShotColumns[], device: DeviceView | null): PipelineCalibration[] {
  const outcomeOf = point.scenario.states.map((s) => s.outcome);
  return point.pipelines.map((pipeline, p) => {
    try {
      return calibratePipeline(point, pipeline, p, batches, outcomeOf, device);
    } catch (e) {
      if (e instanceof ScenarioProblem && e.path[0] !== 'calibrationShots') throw e.inPipeline(p);
      throw e;
    }
  });
}

/** Index of the first non-finite value, or -1. */
function firstNonFinite(values: Float64Array): number {
  for (let i = 0; i < values.length; i++) if (!Number.isFinite(values[i]!)) return i;
  return -1;
}

function calibratePipeline(
  point: CalibrationView, pipeline: CalibrationView['pipelines'][number], p: number, batches: readonly ShotColumns[], outcomeOf: readonly number[],
  device: DeviceView | null,
): PipelineCalibration {
  {
    const axis = calibrationAxis(pipeline, p, batches, outcomeOf);
    const { chain, spec } = pipeline;
    const classifier = classifierOf(spec);
    let values: Float64Array;
    let outcome: ArrayLike<number>;
    let weights: Float64Array | null = null;
    let model: unknown = null;
    if (classifier.readsBins || chain.weights !== 'boxcar') {
      const records = gatherRecords(spec.name, chain, p, outcomeOf, batches, axis);
      if (classifier.readsBins) {
        model = classifier.fit!(records, chain, axis, device);
        let statistic: ReturnType<NonNullable<typeof classifier.statistic>>;
        try {
          statistic = classifier.statistic!(model);
        } catch (e) {
          if (!(e instanceof RangeError)) throw e;
          throw new ScenarioProblem(['classifier'], `a model the ${classifier.name} classifier can build from the calibration shots (it needs noise in the record to divide by)`, e.message.replace(/^[a-zA-Z]+: /, ''));
        }
        values = new Float64Array(records.count);
        for (let i = 0; i < records.count; i++) values[i] = statistic(records.projected, i * records.bins, records.bins);
      } else {
        try {
          weights = calibratedWeights(spec.name, chain.weights as 'matched' | 'optimal', records, point.scenario.states.length);
        } catch (e) {
          if (!(e instanceof RangeError)) throw e;
          const why = chain.weights === 'optimal' ? 'noise in the record that optimal weights can divide by (a noise covariance of full rank)' : 'calibration shots whose outcomes differ on average';
          throw new ScenarioProblem(['weights'], why, e.message.replace(/^[a-zA-Z]+: /, ''));
        }
        values = weightedValues(records, weights);
      }
      outcome = records.outcome;
    } else {
      const count = batches.reduce((n, b) => n + b.count, 0);
      values = new Float64Array(count);
      const intended = new Uint8Array(count);
      let at = 0;
      for (const b of batches) {
        const v = b.values[p]!;
        project(v.inPhase, v.quadrature, axis, values.subarray(at, at + b.count));
        for (let i = 0; i < b.count; i++) intended[at + i] = outcomeOf[b.intended[i]!]!;
        at += b.count;
      }
      outcome = intended;
    }
    const bad = firstNonFinite(values);
    if (bad >= 0) {
      throw new ScenarioProblem([], 'finite calibration values (a value of the scenario is beyond what the arithmetic holds)', `${values[bad]} for calibration shot ${bad}`);
    }
    const statistic = byOutcome(values, outcome);
    const m0 = statistic[0].reduce((a, x) => a + x, 0) / statistic[0].length;
    const m1 = statistic[1].reduce((a, x) => a + x, 0) / statistic[1].length;
    const rule = classifier.rule(spec.threshold, statistic, m0, m1);
    const band = chain.band;
    const bandHalfWidth = band === null ? 0 : band.kind === 'width' ? band.value / 2 : (band.value * Math.abs(m1 - m0)) / 2;
    return { axis, rule, outcomeMeans: [m0, m1], weights, bandHalfWidth, model };
  }
}

/** The values of each outcome, in shot order. */
function byOutcome(values: Float64Array, outcome: ArrayLike<number>): [Float64Array, Float64Array] {
  let n1 = 0;
  for (let i = 0; i < values.length; i++) n1 += outcome[i]!;
  const out: [Float64Array, Float64Array] = [new Float64Array(values.length - n1), new Float64Array(n1)];
  const at = [0, 0];
  for (let i = 0; i < values.length; i++) {
    const o = outcome[i]!;
    out[o]![at[o]!++] = values[i]!;
  }
  return out;
}

/** The separation axis from the mean integrated I/Q of each intended outcome (the I axis at baseband or with a fixed referencePhase). */
function calibrationAxis(
  pipeline: CalibrationView['pipelines'][number], p: number, batches: readonly ShotColumns[], outcomeOf: readonly number[],
): Axis {
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
    throw new ScenarioProblem(['calibrationShots'], 'enough calibration shots to see both outcomes (raise calibrationShots or the prepare weight of the rare outcome)',
      `${g0[2]} and ${g1[2]} shots of the two outcomes`);
  }
  // baseband, or a fixed reference angle: the decision is on I of that reference (README, referencePhase)
  if (pipeline.kernels.quadrature === null || pipeline.spec.referencePhase !== 'auto') return { cos: 1, sin: 0 };
  return separationAxis(g0[0] / g0[2], g0[1] / g0[2], g1[0] / g1[2], g1[1] / g1[2]);
}
