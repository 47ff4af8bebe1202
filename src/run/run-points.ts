/**
 * A whole run: for every sweep point, calibrate each pipeline on calibration shots, then
 * score the shots batch by batch, tally, and compare with the analytic budget.
 * Batches are processed and merged in their fixed order, so the result depends only on the
 * scenario and the seed.
 */
import type { Budget } from '../analysis/budget.ts';
import { budgetWithNoise } from '../analysis/noise-budget.ts';
import { REPORT_CONFIDENCE, summarise, type PointSummary } from '../analysis/summary.ts';
import { addPairs, comparePipelines, emptyPairTallies, type PairTally, type PipelineComparison } from '../analysis/compare.ts';
import { addToTally, emptyTally, type Tally, type TallyInput } from '../analysis/tally.ts';
import { foldStack, pushNode, sliceTallyInput, type TallyNode } from '../analysis/tally-tree.ts';
import type { Scenario } from '../scenario/types.ts';
import type { ShotBatch } from '../engine/trace/batch.ts';
import { calibrate, unavailableBudget, withCalibration, type PipelineCalibration } from '../classify/calibrate.ts';
import { compilePoint, type CompiledPoint } from '../engine/compile-point.ts';
import { scoreBatch, type ScoredPipeline } from '../classify/score.ts';
import { batchPlan, ConcatenatedTasks, type TaskList } from './batches.ts';
import { SEED_BLOCK } from '../random/streams.ts';
import { chooseEngine, type EngineChoice, type EngineRequest } from '../engine/choose.ts';
import { TaskRunner } from './task-runner.ts';
import type { TalliedBatch } from '../engine/exact/fused.ts';
import { fusedScoring } from '../engine/exact/fused-scoring.ts';

/** One point of a sweep: the swept values and the scenario with them applied. */
export interface SweepPoint {
  parameters: Record<string, number>;
  /** SI unit of each parameter ('' for plain numbers), for the tables' field metadata. */
  units?: Record<string, string>;
  scenario: Scenario;
}

/**
 * Runs batch tasks and yields their results in task order (in-process or on workers): a
 * ShotBatch, or a TalliedBatch for a task with `scoring` (exact-fused.ts).
 */
export interface BatchExecutor {
  run(points: readonly SweepPoint[], tasks: TaskList): AsyncIterable<ShotBatch | TalliedBatch>;
  close?(): Promise<void>;
}

/** Runs tasks one after another on this thread. */
export function inProcessExecutor(): BatchExecutor {
  return {
    async *run(points, tasks) {
      const runner = new TaskRunner(points.map((p) => p.scenario));
      for (let i = 0; i < tasks.length; i++) yield runner.run(tasks.at(i)!);
    },
  };
}

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
  summaries: PointSummary[];
  /** Paired error counts of every pair of pipelines (a < b) on the same scored shots. */
  pairs: PairTally[];
  /** The pairs compared: difference of errors with interval, exact McNemar p. */
  comparisons: PipelineComparison[];
  /** Scored record samples the digitizer clipped (present when the point has a digitizer). */
  clippedSamples?: number;
}

export interface RunOptions {
  executor?: BatchExecutor;
  /** Run only part K of N of every point's scored batches (0-based K). */
  shard?: { index: number; count: number };
  /** Called for every scored batch, in order (e.g. to stream shots to a table). */
  onScoredBatch?: (point: PointResult, batch: ShotBatch, scored: ScoredPipeline[]) => void | Promise<void>;
  onProgress?: (doneShots: number, totalShots: number) => void;
  /** Called once, after every point is calibrated and before the first scored batch. */
  onCalibrated?: (points: readonly PointResult[]) => void | Promise<void>;
  /** Engine: 'exact', 'traces', 'auto', or a choice already made (plan/engine.ts). Default 'traces'. */
  engine?: EngineRequest | EngineChoice;
  /** Run only points from this index on; earlier ones keep their indices (and seed streams) but are not run (default 0). */
  firstPoint?: number;
}

export interface RunResult {
  points: PointResult[];
  engine: string;
  engineReason: string;
}

/** Budgets of every pipeline of a calibrated point. */
export function pointBudgets(c: CompiledPoint, calibrations: readonly PipelineCalibration[]): Budget[] {
  const sc = c.scenario;
  return c.pipelines.map((p, i) => {
    const cal = calibrations[i]!;
    if (p.chain.classifier === 'likelihood') return unavailableBudget(sc.states.length);
    const k = p.kernels;
    const kernel = new Float64Array(k.inPhase.length);
    for (let j = k.lo; j < k.hi; j++) kernel[j] = k.inPhase[j]! * cal.axis.cos + (k.quadrature ? k.quadrature[j]! * cal.axis.sin : 0);
    // every noise source through the whole path, by the filter function (noise-budget.ts)
    return budgetWithNoise({
      kernel, lo: k.lo, hi: k.hi, sampleRate: c.grid.sampleRate, waveforms: c.waveforms,
      rate: c.chain.rate, jumpCause: c.jumpCause, prepare: sc.prepare,
      outcomeOf: sc.states.map((s) => s.outcome),
      preparation: sc.preparationError, mapping: sc.mappingError,
      threshold: cal.rule.threshold, highIsOne: cal.rule.highIsOne,
    }, c.noise);
  });
}

/**
 * The result of a calibrated point before scoring (shared by runs and by `merge`, which rebuilds
 * points from the calibrations the shards saved).
 */
export function setUpPoint(
  index: number, p: SweepPoint, calibrations: PipelineCalibration[], uncalibrated: CompiledPoint = compilePoint(p.scenario),
): PointResult {
  // matched/optimal weights enter the kernels of the scored shots through the scenario
  const scored = withCalibration(p.scenario, calibrations);
  const compiled = scored === p.scenario ? uncalibrated : compilePoint(scored);
  return {
    index, parameters: p.parameters, scenario: p.scenario, compiled, calibrations,
    tallies: compiled.pipelines.map(() => emptyTally(p.scenario.states.length, p.scenario.outcomes.length)),
    tallyStacks: compiled.pipelines.map(() => []),
    budgets: pointBudgets(compiled, calibrations), summaries: [],
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
  r.summaries = r.compiled.pipelines.map((p, i) => summarise(
    p.spec.name, sc.states.map((s) => s.name), sc.states.map((s) => s.outcome), sc.prepare,
    r.tallies[i]!, r.budgets[i]!, r.calibrations[i]!.rule.threshold, r.calibrations[i]!.rule.highIsOne,
    p.chain.band !== null,
  ));
  r.comparisons = comparePipelines(r.compiled.pipelines.map((p) => p.spec.name), r.pairs, REPORT_CONFIDENCE);
}

/** The engine choice of a run (a request is resolved against every point's scenario). */
export function resolveEngine(points: readonly SweepPoint[], engine: EngineRequest | EngineChoice | undefined): EngineChoice {
  if (engine !== undefined && typeof engine === 'object') return engine;
  return chooseEngine(points.map((p) => p.scenario), engine ?? 'traces');
}

/** Batches per task on the fused exact path (a batch there takes well under a millisecond). */
const FUSED_BATCHES_PER_TASK = 16;

export async function runPoints(points: readonly SweepPoint[], options: RunOptions = {}): Promise<RunResult> {
  const executor = options.executor ?? inProcessExecutor();
  const choice = resolveEngine(points, options.engine);
  const engine = choice.engine;
  const results: PointResult[] = [];
  const first = options.firstPoint ?? 0;
  const calibrationTasks = new ConcatenatedTasks(points.flatMap((p, i) => (i < first ? [] : [batchPlan(p.scenario, i, 'calibrate').with({ engine })])));
  // batches arrive in task order, i.e. point by point: calibrate each point as soon as its
  // batches are in, so only one point's calibration shots are held at a time
  let pending: ShotBatch[] = [];
  const calibratePending = () => {
    if (pending.length === 0) return;
    const i = pending[0]!.point;
    const uncalibrated = compilePoint(points[i]!.scenario);
    results.push(setUpPoint(i, points[i]!, calibrate(uncalibrated, pending), uncalibrated));
    pending = [];
  };
  for await (const b of executor.run(points, calibrationTasks)) {
    if ('kind' in b) throw new Error('a calibration task came back tallied');
    if (pending.length > 0 && pending[0]!.point !== b.point) calibratePending();
    pending.push(b);
  }
  calibratePending();
  if (options.onCalibrated) await options.onCalibrated(results);
  const scorePoints = points.map((p, i) => (i < first ? p : { ...p, scenario: results[i - first]!.compiled.scenario }));
  // without per-shot consumers the exact engine scores and tallies where it simulates
  const fused = engine === 'exact' && !options.onScoredBatch;
  const scorePlans = points.flatMap((p, i) => {
    if (i < first) return [];
    const r = results[i - first]!;
    const scoring = fused ? fusedScoring(r.compiled, r.calibrations) : null;
    const plan = batchPlan(p.scenario, i, 'score', options.shard);
    return [scoring ? plan.with({ engine, scoring }).grouped(FUSED_BATCHES_PER_TASK) : plan.with({ engine })];
  });
  const scoreTasks = new ConcatenatedTasks(scorePlans);
  const totalShots = scorePlans.reduce((a, t) => a + t.shots, 0);
  let done = 0;
  for await (const b of executor.run(scorePoints, scoreTasks)) {
    const r = results[b.point - first]!;
    if ('kind' in b) {
      addTalliedBatch(r, b);
      done += b.count;
      options.onProgress?.(done, totalShots);
      continue;
    }
    const scored = scoreBatch(r.compiled, r.calibrations, b);
    tallyBatch(r, b, scored);
    if (b.clippedSamples !== undefined) r.clippedSamples = (r.clippedSamples ?? 0) + b.clippedSamples;
    if (options.onScoredBatch) await options.onScoredBatch(r, b, scored);
    done += b.count;
    options.onProgress?.(done, totalShots);
  }
  for (const r of results) finishPoint(r);
  await executor.close?.();
  return { points: results, engine, engineReason: choice.reason };
}
