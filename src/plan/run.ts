/**
 * A whole run: for every sweep point, calibrate each pipeline on calibration shots, then
 * score the shots batch by batch, tally, and compare with the analytic budget.
 * Batches are processed and merged in their fixed order, so the result depends only on the
 * scenario and the seed.
 */
import { analyticBudget, whiteNoiseVariance, type Budget } from '../analysis/budget.ts';
import { summarise, type PointSummary } from '../analysis/summary.ts';
import { addToTally, emptyTally, type Tally } from '../analysis/tally.ts';
import type { Scenario } from '../scenario/types.ts';
import { simulateBatch, makeScratch, type ShotBatch } from './batch.ts';
import { calibrate, type PipelineCalibration } from './calibrate.ts';
import { compilePoint, type CompiledPoint } from './compile.ts';
import { scoreBatch, type ScoredPipeline } from './score.ts';
import { batchPlan, type BatchTask } from './batches.ts';
import { SEED_BLOCK } from '../random/streams.ts';

/** One point of a sweep: the swept values and the scenario with them applied. */
export interface SweepPoint {
  parameters: Record<string, number>;
  scenario: Scenario;
}

/** Runs batch tasks and yields their results in task order (in-process or on workers). */
export interface BatchExecutor {
  run(points: readonly SweepPoint[], tasks: readonly BatchTask[]): AsyncIterable<ShotBatch>;
  close?(): Promise<void>;
}

/** Runs tasks one after another on this thread. */
export function inProcessExecutor(): BatchExecutor {
  return {
    async *run(points, tasks) {
      const compiled = new Map<number, CompiledPoint>();
      const scratch = new Map<number, ReturnType<typeof makeScratch>>();
      for (const t of tasks) {
        let c = compiled.get(t.point);
        if (!c) {
          c = compilePoint(points[t.point]!.scenario);
          compiled.set(t.point, c);
          scratch.set(t.point, makeScratch(c));
        }
        yield simulateBatch(c, t.point, t.purpose, t.batch, t.count, scratch.get(t.point));
      }
    },
  };
}

export interface PointResult {
  index: number;
  parameters: Record<string, number>;
  scenario: Scenario;
  compiled: CompiledPoint;
  calibrations: PipelineCalibration[];
  tallies: Tally[];
  budgets: Budget[];
  summaries: PointSummary[];
}

export interface RunOptions {
  executor?: BatchExecutor;
  /** Run only part K of N of every point's scored batches (0-based K). */
  shard?: { index: number; count: number };
  /** Called for every scored batch, in order (e.g. to stream shots to a table). */
  onScoredBatch?: (point: PointResult, batch: ShotBatch, scored: ScoredPipeline[]) => void | Promise<void>;
  onProgress?: (doneShots: number, totalShots: number) => void;
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
    const k = p.kernels;
    const kernel = new Float64Array(k.inPhase.length);
    for (let j = k.lo; j < k.hi; j++) kernel[j] = k.inPhase[j]! * cal.axis.cos + (k.quadrature ? k.quadrature[j]! * cal.axis.sin : 0);
    return analyticBudget({
      kernel, lo: k.lo, hi: k.hi, sampleRate: c.grid.sampleRate, waveforms: c.waveforms,
      noiseVariance: whiteNoiseVariance(kernel, k.lo, k.hi, c.whiteSigma),
      rate: c.chain.rate, jumpCause: c.jumpCause, prepare: sc.prepare,
      outcomeOf: sc.states.map((s) => s.outcome),
      preparation: sc.preparationError, mapping: sc.mappingError,
      threshold: cal.rule.threshold, highIsOne: cal.rule.highIsOne,
    });
  });
}

export async function runPoints(points: readonly SweepPoint[], options: RunOptions = {}): Promise<RunResult> {
  const executor = options.executor ?? inProcessExecutor();
  const results: PointResult[] = [];
  const calibrationTasks = points.flatMap((p, i) => batchPlan(p.scenario, i, 'calibrate'));
  const calibrationBatches: ShotBatch[][] = points.map(() => []);
  for await (const b of executor.run(points, calibrationTasks)) calibrationBatches[b.point]!.push(b);
  points.forEach((p, i) => {
    const compiled = compilePoint(p.scenario);
    const calibrations = calibrate(compiled, calibrationBatches[i]!);
    results.push({
      index: i, parameters: p.parameters, scenario: p.scenario, compiled, calibrations,
      tallies: compiled.pipelines.map(() => emptyTally(p.scenario.states.length, p.scenario.outcomes.length)),
      budgets: pointBudgets(compiled, calibrations), summaries: [],
    });
  });
  const scoreTasks = points.flatMap((p, i) => batchPlan(p.scenario, i, 'score', options.shard));
  const totalShots = scoreTasks.reduce((a, t) => a + t.count, 0);
  let done = 0;
  for await (const b of executor.run(points, scoreTasks)) {
    const r = results[b.point]!;
    const scored = scoreBatch(r.compiled, r.calibrations, b);
    scored.forEach((s, p) => addToTally(r.tallies[p]!, { ...b, ...s }, SEED_BLOCK));
    if (options.onScoredBatch) await options.onScoredBatch(r, b, scored);
    done += b.count;
    options.onProgress?.(done, totalShots);
  }
  for (const r of results) {
    const sc = r.scenario;
    r.summaries = r.compiled.pipelines.map((p, i) => summarise(
      p.spec.name, sc.states.map((s) => s.name), sc.states.map((s) => s.outcome), sc.prepare,
      r.tallies[i]!, r.budgets[i]!, r.calibrations[i]!.rule.threshold, r.calibrations[i]!.rule.highIsOne,
    ));
  }
  await executor.close?.();
  return { points: results, engine: 'traces', engineReason: 'every sample of every record is synthesised and processed' };
}
