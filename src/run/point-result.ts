/**
 * One point's result as a run builds it: set up from its calibrations (with its budget), then
 * scored batch by batch into the tally tree, then finished (folded tallies, summaries, pipeline
 * comparisons). `merge` rebuilds points the same way from the tallies shards saved.
 */
import { unavailableBudget, type Budget } from '../analysis/budget.ts';
import { predictNoise, type NoisePrediction } from '../analysis/noise-prediction.ts';
import { REPORT_CONFIDENCE, summarise, type PointSummary } from '../analysis/summary.ts';
import { addPairs, comparePipelines, emptyPairTallies, type PairTally, type PipelineComparison } from '../analysis/compare.ts';
import { addToTally, emptyTally, type Tally, type TallyInput } from '../analysis/tally.ts';
import { foldStack, pushNode, sliceTallyInput, type TallyNode } from '../analysis/tally-tree.ts';
import type { Scenario } from '../scenario/types.ts';
import type { ShotBatch } from '../engine/trace/batch.ts';
import type { TalliedBatch } from '../engine/exact/fused.ts';
import type { PipelineCalibration } from '../classify/calibrate.ts';
import { classifierOf } from '../classify/registry.ts';
import { projectKernel } from '../classify/project.ts';
import { compilePoint, withWeights, type CompiledPoint } from '../engine/compile-point.ts';
import type { ScoredPipeline } from '../classify/score.ts';
import { SEED_BLOCK } from '../random/streams.ts';
import type { SweepPoint } from './sweep-point.ts';
import { ScenarioProblem } from '../errors.ts';

export interface PointResult {
  index: number;
  parameters: Record<string, number>;
  scenario: Scenario;
  compiled: CompiledPoint;
  calibrations: PipelineCalibration[];
  /** Per pipeline: the fold of `tallyStacks` (filled by finishPoint). */
  tallies: Tally[];
  /**
   * Per pipeline: the pending nodes of the tally tree over the scored seeding blocks
   * (analysis/tally-tree.ts); a shard saves them so that merged shards give identical bits.
   */
  tallyStacks: TallyNode[][];
  budgets: Budget[];
  /** Per pipeline: the predicted noise of its integrated value, source by source (null where its classifier does not decide on it). */
  noise: (NoisePrediction | null)[];
  summaries: PointSummary[];
  /** Paired error counts of every pair of pipelines (a < b) on the same scored shots. */
  pairs: PairTally[];
  /** The pairs compared: difference of errors with interval, exact McNemar p. */
  comparisons: PipelineComparison[];
  /** Scored record samples the digitizer clipped (present when the point has a digitizer). */
  clippedSamples?: number;
}

/** Budgets of every pipeline of a calibrated point: its classifier's, where it has one. */
export function pointBudgets(c: CompiledPoint, calibrations: readonly PipelineCalibration[]): Budget[] {
  const sc = c.scenario;
  return c.pipelines.map((p, i) => {
    const cal = calibrations[i]!;
    const k = p.kernels;
    // every noise source through the whole path, by the filter function (analysis/noise-budget.ts)
    const budget = classifierOf(p.spec).budget({
      kernel: projectKernel(k, cal.axis, c.channels), lo: k.lo, hi: k.hi, sampleRate: c.grid.sampleRate, waveforms: c.waveforms,
      rate: c.chain.rate, jumpCause: c.jumpCause, prepare: sc.prepare,
      outcomeOf: sc.states.map((s) => s.outcome),
      preparation: sc.preparationError, mapping: sc.mappingError,
      threshold: cal.rule.threshold, highIsOne: cal.rule.highIsOne,
    }, c.noise);
    return budget ?? unavailableBudget(sc.states.length);
  });
}

/**
 * The noise prediction of every pipeline of a calibrated point (null for a pipeline whose
 * classifier does not decide on the integrated value, e.g. the likelihood classifier).
 */
export function pointNoise(c: CompiledPoint, calibrations: readonly PipelineCalibration[]): (NoisePrediction | null)[] {
  return c.pipelines.map((p, i) => {
    if (classifierOf(p.spec).readsBins) return null;
    const k = p.kernels;
    return predictNoise(c.noise, projectKernel(k, calibrations[i]!.axis, c.channels), k.lo, k.hi, c.grid.sampleRate);
  });
}

/**
 * The result of a calibrated point before scoring (shared by runs and by `merge`, which rebuilds
 * points from the calibrations the shards saved). `uncalibrated` is the point as calibration ran
 * it; calibrated weights are put into its pipelines (withWeights), nothing else is compiled again.
 */
export function setUpPoint(
  index: number, p: SweepPoint, calibrations: PipelineCalibration[], uncalibrated: CompiledPoint = compilePoint(p.scenario),
): PointResult {
  const compiled = withWeights(uncalibrated, calibrations.map((c) => c.weights));
  return {
    index, parameters: p.parameters, scenario: p.scenario, compiled, calibrations,
    tallies: compiled.pipelines.map(() => emptyTally(p.scenario.states.length, p.scenario.outcomes.length)),
    tallyStacks: compiled.pipelines.map(() => []),
    budgets: pointBudgets(compiled, calibrations), noise: pointNoise(compiled, calibrations), summaries: [],
    pairs: emptyPairTallies(compiled.pipelines.length), comparisons: [],
  };
}

/** Adds a scored batch to a point's tallies: one leaf of the tally tree per seeding block and pipeline. */
export function tallyBatch(r: PointResult, b: ShotBatch, scored: readonly ScoredPipeline[]): void {
  const states = r.scenario.states.length, outcomes = r.scenario.outcomes.length;
  const firstBlock = b.firstShot / SEED_BLOCK;
  scored.forEach((s, p) => {
    // every per-shot field that TallyInput reads
    const input: TallyInput = {
      count: b.count, intended: b.intended, prepared: b.prepared, initial: b.initial, jumpCause: s.jumpCause,
      projected: s.projected, outcome: s.outcome, cause: s.cause, discarded: s.discarded,
    };
    for (let from = 0, block = firstBlock; from < b.count; from += SEED_BLOCK, block++) {
      const leaf = addToTally(emptyTally(states, outcomes), sliceTallyInput(input, from, Math.min(b.count, from + SEED_BLOCK)), SEED_BLOCK);
      pushNode(r.tallyStacks[p]!, { level: 0, index: block, tally: leaf });
    }
  });
  addPairs(r.pairs, scored.map((s) => s.cause), b.count);
}

/** Adds a batch scored and tallied where it was simulated (exact-fused.ts): its tally-tree nodes and paired counts. */
export function addTalliedBatch(r: PointResult, b: TalliedBatch): void {
  b.nodes.forEach((nodes, p) => {
    for (const node of nodes) pushNode(r.tallyStacks[p]!, node);
  });
  r.pairs.forEach((pair, k) => {
    pair.counts.bothWrong += b.pairs[3 * k]!;
    pair.counts.onlyAWrong += b.pairs[3 * k + 1]!;
    pair.counts.onlyBWrong += b.pairs[3 * k + 2]!;
    pair.counts.n += b.count;
  });
}

/** Folds a scored point's tally trees and fills its summaries and pipeline comparisons. */
export function finishPoint(r: PointResult): void {
  const sc = r.scenario;
  r.tallies = r.tallyStacks.map((stack) => foldStack(stack, sc.states.length, sc.outcomes.length));
  // the measured values' moments are finite whenever the scenario is inside its bounds: anything
  // else stops the point here, naming the pipeline, rather than leaving NaN in its tables
  r.tallies.forEach((t, p) => t.clean.forEach((m, s) => {
    if (m.n > 0 && !(Number.isFinite(m.mean) && Number.isFinite(m.m2))) {
      const problem = new ScenarioProblem(['pipelines', p], 'finite integrated values (a value of the scenario is beyond what the arithmetic holds)', `a mean ${m.mean} and spread ${m.m2} for state "${sc.states[s]!.name}"`);
      problem.point = r.index;
      throw problem;
    }
  }));
  r.summaries = r.compiled.pipelines.map((p, i) => summarise(
    p.spec.name, sc.states.map((s) => s.name), sc.states.map((s) => s.outcome), sc.prepare,
    r.tallies[i]!, r.budgets[i]!, r.calibrations[i]!.rule.threshold, r.calibrations[i]!.rule.highIsOne,
    p.chain.band !== null,
  ));
  r.comparisons = comparePipelines(r.compiled.pipelines.map((p) => p.spec.name), r.pairs, REPORT_CONFIDENCE);
}
