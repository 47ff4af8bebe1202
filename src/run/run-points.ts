/**
 * A whole run: for every sweep point, calibrate each pipeline on calibration shots, then
 * score the shots batch by batch, tally, and compare with the analytic budget.
 * Batches are processed and merged in their fixed order, so the result depends only on the
 * scenario and the seed.
 */
import type { ShotBatch } from '../engine/trace/batch.ts';
import { calibrate } from '../classify/calibrate.ts';
import { compilePoint } from '../engine/compile-point.ts';
import { scoreBatch, type ScoredPipeline } from '../classify/score.ts';
import { batchPlan, ConcatenatedTasks } from './batches.ts';
import { chooseEngine, type EngineChoice, type EngineRequest } from '../engine/choose.ts';
import { fusedScoring } from '../engine/exact/fused-scoring.ts';
import type { PointPlan } from '../engine/point-plan.ts';
import { inProcessExecutor, type BatchExecutor } from './executor.ts';
import { addTalliedBatch, finishPoint, setUpPoint, tallyBatch, type PointResult } from './point-result.ts';
import type { SweepPoint } from './sweep-point.ts';
import { ScenarioProblem } from '../errors.ts';

export interface RunOptions {
  executor?: BatchExecutor;
  /** Run only part K of N of every point's scored batches (0-based K). */
  shard?: { index: number; count: number };
  /** Called for every scored batch, in order (e.g. to stream shots to a table). */
  onScoredBatch?: (point: PointResult, batch: ShotBatch, scored: ScoredPipeline[]) => void | Promise<void>;
  /** Shots done of the phase's total, after every batch: calibration shots first, then scored shots. */
  onProgress?: (doneShots: number, totalShots: number, phase: RunPhase) => void;
  /** Called once, after every point is calibrated and before the first scored batch. */
  onCalibrated?: (points: readonly PointResult[]) => void | Promise<void>;
  /** Engine: 'exact', 'traces', 'auto', or a choice already made (engine/choose.ts). Default 'traces'. */
  engine?: EngineRequest | EngineChoice;
  /** Keep every scored shot's whole record (raw, or demodulated baseband I/Q) in its ShotBatch. */
  keepTraces?: 'raw' | 'baseband';
  /** Run only points from this index on; earlier ones keep their indices (and seed streams) but are not run (default 0). */
  firstPoint?: number;
}

/** What a run is doing: simulating calibration shots, or the scored shots. */
export type RunPhase = 'calibrating' | 'simulating';

export interface RunResult {
  points: PointResult[];
  engine: string;
  engineReason: string;
}

/** The engine choice of a run (a request is resolved against every point's scenario). */
export function resolveEngine(
  points: readonly SweepPoint[], engine: EngineRequest | EngineChoice | undefined, keepTraces?: 'raw' | 'baseband',
): EngineChoice {
  if (engine !== undefined && typeof engine === 'object') return engine;
  return chooseEngine(points.map((p) => p.scenario), engine ?? 'traces', { keepTraces });
}

/** The shots of one purpose the run simulates, over its points from `first` on (the progress totals). */
function shotsToRun(points: readonly SweepPoint[], first: number, purpose: 'calibrate' | 'score', shard?: RunOptions['shard']): number {
  return points.reduce((a, p, i) => a + (i < first ? 0 : batchPlan(p.scenario, i, purpose, shard).shots), 0);
}

/** Batches per task on the fused exact path (a batch there takes well under a millisecond). */
const FUSED_BATCHES_PER_TASK = 16;

export async function runPoints(points: readonly SweepPoint[], options: RunOptions = {}): Promise<RunResult> {
  const executor = options.executor ?? inProcessExecutor();
  const choice = resolveEngine(points, options.engine, options.keepTraces);
  const engine = choice.engine;
  const results: PointResult[] = [];
  const first = options.firstPoint ?? 0;
  // calibration shots are never kept; the plans carry no run options yet
  const calibrationPlans: PointPlan[] = points.map((p) => ({ scenario: p.scenario }));
  const calibrationTasks = new ConcatenatedTasks(points.flatMap((p, i) => (i < first ? [] : [batchPlan(p.scenario, i, 'calibrate').with({ engine })])));
  // batches arrive in task order, i.e. point by point: calibrate each point as soon as its
  // batches are in, so only one point's calibration shots are held at a time
  let pending: ShotBatch[] = [];
  const calibrationShots = shotsToRun(points, first, 'calibrate');
  let calibrated = 0;
  const calibratePending = () => {
    if (pending.length === 0) return;
    const i = pending[0]!.point;
    try {
      const uncalibrated = compilePoint(points[i]!.scenario);
      results.push(setUpPoint(i, points[i]!, calibrate(uncalibrated, pending, uncalibrated), uncalibrated));
    } catch (e) {
      if (e instanceof ScenarioProblem && e.point === null) e.point = i;
      throw e;
    }
    pending = [];
  };
  for await (const b of executor.run(calibrationPlans, calibrationTasks)) {
    if ('kind' in b) throw new Error('a calibration task came back tallied');
    if (pending.length > 0 && pending[0]!.point !== b.point) calibratePending();
    pending.push(b);
    calibrated += b.count;
    options.onProgress?.(calibrated, calibrationShots, 'calibrating');
  }
  calibratePending();
  if (options.onCalibrated) await options.onCalibrated(results);
  // scored shots run with the calibrated weights and the run's options (never inside the scenario)
  const scorePlans: PointPlan[] = points.map((p, i) => {
    if (i < first) return calibrationPlans[i]!;
    const weights = results[i - first]!.calibrations.map((c) => c.weights);
    return {
      scenario: p.scenario,
      ...(weights.some((w) => w !== null) ? { weights } : {}),
      ...(options.keepTraces ? { keepTraces: options.keepTraces } : {}),
    };
  });
  // without per-shot consumers the exact engine scores and tallies where it simulates
  const fused = engine === 'exact' && !options.onScoredBatch;
  const scoreTasks = new ConcatenatedTasks(points.flatMap((p, i) => {
    if (i < first) return [];
    const r = results[i - first]!;
    const scoring = fused ? fusedScoring(r.compiled, r.calibrations) : null;
    const plan = batchPlan(p.scenario, i, 'score', options.shard);
    return [scoring ? plan.with({ engine, scoring }).grouped(FUSED_BATCHES_PER_TASK) : plan.with({ engine })];
  }));
  const totalShots = shotsToRun(points, first, 'score', options.shard);
  let done = 0;
  for await (const b of executor.run(scorePlans, scoreTasks)) {
    const r = results[b.point - first]!;
    if ('kind' in b) {
      addTalliedBatch(r, b);
      done += b.count;
      options.onProgress?.(done, totalShots, 'simulating');
      continue;
    }
    const scored = scoreBatch(r.compiled, r.calibrations, b);
    tallyBatch(r, b, scored);
    if (b.clippedSamples !== undefined) r.clippedSamples = (r.clippedSamples ?? 0) + b.clippedSamples;
    if (options.onScoredBatch) await options.onScoredBatch(r, b, scored);
    done += b.count;
    options.onProgress?.(done, totalShots, 'simulating');
  }
  for (const r of results) finishPoint(r);
  await executor.close?.();
  return { points: results, engine, engineReason: choice.reason };
}
