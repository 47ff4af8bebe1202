/**
 * The `run` job as a library function: scenario file in, tables in a folder out.
 * The folder is locked for the whole run and written through its staging folder
 * (io/output-dir.ts): shots.arrow streams batch by batch, summary.arrow, budget.arrow and
 * tallies.json follow, then run.json and report.html; only then are the files moved into the
 * folder (run.json last). An interrupted or failed run leaves the folder as it was.
 */
import { join } from 'node:path';
import { InputError, ScenarioProblem } from '../errors.ts';
import { loadScenarioDocument, loadScenarioFile, type LoadedScenario } from '../scenario/load.ts';
import type { ScenarioOverrides } from '../scenario/overrides.ts';
import type { SweepSpec } from '../scenario/types.ts';
import { runPoints, type RunOptions, type RunResult } from '../run/run-points.ts';
import type { BatchExecutor } from '../run/executor.ts';
import type { SweepPoint } from '../run/sweep-point.ts';
import { ArrowFileStream } from '../io/arrow-sink.ts';
import { withParquetCopies } from '../io/parquet-copy.ts';
import { writeManifest } from '../io/manifest.ts';
import { tableMetadata, type RunProvenance } from '../io/metadata.ts';
import { OutputFolder, type CommandInput } from '../io/output-dir.ts';
import { shotRecordBatches, shotsLayout } from '../io/tables/shots.ts';
import { traceRecordBatch, tracesLayout, type TracesLayout } from '../io/tables/traces.ts';
import { estimateRun, keptTracesEstimate, type RunEstimate } from '../run/estimate.ts';
import { freeResources, guardResources, type FreeResources } from './resource-guard.ts';
import { abortSignalName, checkpoint, interruptibleExecutor, RunInterrupted } from '../run/interrupt.ts';
import { inProcessExecutor } from '../run/executor.ts';
import { expandSweep } from '../run/sweep.ts';
import { DEFAULT_REFINE_POINTS } from '../run/refine.ts';
import { checkRefineRequest, refineWithin, type RefineRequest, type RefineOutcome } from './refine-run.ts';
import { writeReport } from './report.ts';
import { resolveEngine } from '../run/run-points.ts';
import type { EngineChoice, EngineRequest } from '../engine/choose.ts';
import { defaultWorkers, workerPoolExecutor } from '../run/pool.ts';
import { batchCount, shardRange } from '../run/batches.ts';
import { writeResultTables } from './result-tables.ts';
import { runTallies, TALLIES, writeTallies } from './tallies.ts';

export interface RunToDirectoryOptions extends ScenarioOverrides {
  /** The scenario file; with `scenarioDocument`, only the name messages give the document. */
  scenarioPath: string;
  /** The scenario as a parsed document (what a scenario file holds): no file is read. */
  scenarioDocument?: unknown;
  outDir: string;
  force?: boolean;
  /** Write shots.arrow (default true). */
  shotsTable?: boolean;
  shard?: { index: number; count: number };
  executor?: BatchExecutor;
  /** Shots done of the phase's total after every batch: 'calibrating', then 'simulating'. */
  onProgress?: RunOptions['onProgress'];
  onWarning?: (message: string) => void;
  /** Stream every scored shot's record (raw) or demodulated I/Q (baseband) to traces.arrow. */
  keepTraces?: 'raw' | 'baseband';
  /** Aborting it stops the run at the next batch (RunInterrupted; run.json stays complete: false). */
  signal?: AbortSignal;
  /** Called with the resource estimate before anything is written. */
  onEstimate?: (estimate: RunEstimate) => void;
  /** What is free for the run (default: measured); the guard refuses more unless `force`. */
  free?: FreeResources;
  /** Refine the lowest-error point along one swept value with extra points (golden section). */
  refine?: RefineRequest;
  /** Write report.html after the tables (default true). */
  report?: boolean;
  /** Also write every table as Parquet (X.parquet beside X.arrow). */
  parquet?: boolean;
  /** Engine: exact, traces or auto (default traces here; `runScenario` in src/library, which the CLI calls, passes its default, auto). */
  engine?: EngineRequest;
  /** Further files or folders the command reads, which the output folder must not be or hold (rerun's folder). */
  inputs?: readonly CommandInput[];
  /**
   * Simulation threads; ignored when `executor` is given. Default: every physical core for a trace-engine
   * run estimated to take over POOL_MIN_SECONDS, else 1 (this thread) — starting a worker costs
   * about a second, and the exact engine's time goes mostly into scoring on this thread.
   */
  workers?: number;
}

export interface RunToDirectoryResult {
  result: RunResult;
  provenance: RunProvenance;
  files: string[];
  warnings: string[];
  /** What refinement did, when asked. */
  refinement?: RefineOutcome;
  /** Path of report.html, or null when not written. */
  report?: string | null;
  /** The scenario's sweep section (absent when nothing is swept). */
  sweep?: SweepSpec;
}

/** Runs estimated shorter than this (s) stay on one thread unless `workers` is given. */
export const POOL_MIN_SECONDS = 2;
/** ... and so do runs whose batches are estimated shorter than this (s). */
export const POOL_MIN_BATCH_SECONDS = 5e-3;


/** Batches estimated longer than this (s) run on a worker even on one thread, so that a signal is heard at once. */
export const LONG_BATCH_SECONDS = 1;

/** The simulation threads a run starts: `count` workers when `pool`, else this thread alone. */
interface SimulationThreads {
  count: number;
  pool: boolean;
}

/**
 * How many simulation threads will start: the given count, or every physical core for a long run of
 * long batches; never more than there are scored batches; none with an executor given.
 */
function simulationThreads(o: RunToDirectoryOptions, e: RunEstimate, scoredBatches: number): SimulationThreads {
  if (o.executor) return { count: 1, pool: false };
  const perBatch = e.seconds / Math.max(1, scoredBatches);
  const asked = o.workers ?? (e.seconds > POOL_MIN_SECONDS && perBatch > POOL_MIN_BATCH_SECONDS ? defaultWorkers() : 1);
  const count = Math.max(1, Math.min(asked, scoredBatches));
  // this thread must stay free to hear SIGINT: a batch of seconds goes to a worker
  return { count, pool: count > 1 || perBatch > LONG_BATCH_SECONDS };
}

/**
 * Refuses a shard that is not a part of N (1 ≤ K ≤ N), or one that would score no shot at all:
 * a part scores whole batches, so with more parts than a point has batches some parts get none
 * of it (that is fine while they get batches of other points).
 */
function checkShard(shard: { index: number; count: number }, points: readonly SweepPoint[]): void {
  const { index, count } = shard;
  if (!(Number.isInteger(index) && Number.isInteger(count) && index >= 0 && index < count)) {
    throw new InputError('--shard', '', 'K/N with 1 ≤ K ≤ N', `${index + 1}/${count}`);
  }
  const scored = points.reduce((n, p) => {
    const [first, end] = shardRange(batchCount(p.scenario, 'score'), shard);
    return n + (end - first);
  }, 0);
  if (scored === 0) {
    const most = Math.max(...points.map((p) => batchCount(p.scenario, 'score')));
    throw new InputError('--shard', '', `a part that scores shots (a part scores whole batches; the points have at most ${most} scored batch${most === 1 ? '' : 'es'}: split into at most ${most} parts)`, `part ${index + 1} of ${count}, which would score none`);
  }
}

/** The sweep points of a loaded scenario, as `run` makes them (merge rebuilds points this way). */
export function expandPoints(loaded: Awaited<ReturnType<typeof loadScenarioFile>>, file: string): SweepPoint[] {
  return expandSweep(loaded.doc, loaded.scenario, file);
}

export async function runToDirectory(o: RunToDirectoryOptions): Promise<RunToDirectoryResult> {
  const overrides = { shots: o.shots, seed: o.seed };
  const loaded = o.scenarioDocument === undefined
    ? await loadScenarioFile(o.scenarioPath, overrides)
    : loadScenarioDocument(o.scenarioDocument, o.scenarioPath, overrides);
  loaded.warnings.forEach((w) => o.onWarning?.(w));
  const points = expandPoints(loaded, o.scenarioPath);
  if (o.refine) checkRefineRequest(o.refine, loaded, o.scenarioPath, o.shard);
  if (o.shard) checkShard(o.shard, points);
  // the engine is chosen before anything is estimated or written: the estimate depends on it,
  // and every table's metadata names it and why
  const choice = resolveEngine(points, o.engine, o.keepTraces);
  if (o.keepTraces && o.engine === 'auto' && choice.engine === 'traces' && resolveEngine(points, 'auto').engine === 'exact') {
    // the engine stays auto's choice for the options given; say that keeping traces made it
    const w = `--keep-traces: without it, --engine auto would run this scenario on the exact engine; keeping traces needs every record, so this run uses the trace engine — the same statistics, other random draws, so its numbers differ from a run without --keep-traces (run both with --engine traces to compare them shot for shot)`;
    loaded.warnings.push(w);
    o.onWarning?.(w);
  }
  const scoredBatches = points.reduce((n, p) => n + batchCount(p.scenario, 'score'), 0);
  const estimateWith = (threads: number, pool: boolean) => estimateRun(points.map((p) => p.scenario), {
    shotsTable: o.shotsTable !== false, shard: o.shard, workers: threads, pool, engine: choice.engine, report: o.report !== false,
    traces: o.keepTraces ? keptTracesEstimate(points[0]!.scenario, o.keepTraces) : undefined,
  });
  // the estimate counts only the threads that will start (decided on the one-thread estimate)
  const oneThread = estimateWith(1, false);
  const threads = simulationThreads(o, oneThread, scoredBatches);
  const estimate = threads.pool ? estimateWith(threads.count, true) : oneThread;
  o.onEstimate?.(estimate);
  guardResources(o.scenarioPath, estimate, o.free ?? freeResources(o.outDir), o.force ?? false);
  if (o.signal?.aborted) throw new RunInterrupted(abortSignalName(o.signal), `${o.outDir} was not touched`);
  const out = OutputFolder.open(o.outDir, {
    force: o.force ?? false, command: 'run',
    inputs: [...(o.scenarioDocument === undefined ? [{ path: o.scenarioPath, kind: 'file' as const }] : []), ...(o.inputs ?? [])],
  });
  try {
    const done = await runIntoFolder(o, out, loaded, points, choice, threads);
    if (o.signal) await checkpoint(o.signal);
    out.publish();
    return { ...done, report: done.report === null ? null : join(o.outDir, 'report.html') };
  } catch (e) {
    out.discard();
    if (e instanceof RunInterrupted) throw new RunInterrupted(e.signal, `${o.outDir} was left as it was`);
    if (e instanceof ScenarioProblem) throw e.toInputError(o.scenarioPath, hasPipelinesKey(loaded.doc), points.length);
    throw out.userError(e);
  }
}

/** Whether the scenario document writes its pipelines as a `pipelines` list (else `processing`). */
function hasPipelinesKey(doc: unknown): boolean {
  return doc !== null && typeof doc === 'object' && 'pipelines' in doc;
}

/** Runs the points and writes every file into the output folder's staging folder. */
async function runIntoFolder(
  o: RunToDirectoryOptions, out: OutputFolder, loaded: LoadedScenario, points: SweepPoint[], choice: EngineChoice, threads: SimulationThreads,
): Promise<RunToDirectoryResult> {
  const first = points[0]!.scenario;
  const shard = o.shard ? `${o.shard.index + 1}/${o.shard.count}` : '1/1';
  // a refinement is recorded (tables and run.json) so that `rerun` can make it again
  const refine = o.refine ? { key: o.refine.key, points: o.refine.points ?? DEFAULT_REFINE_POINTS } : undefined;
  const provenance: RunProvenance = {
    scenario: loaded.canonical, seed: first.seed, engine: choice.engine, engineReason: choice.reason, shard,
    ...(refine ? { refine: JSON.stringify(refine) } : {}),
  };
  const files: string[] = [];
  const pool = threads.pool ? workerPoolExecutor(threads.count) : null;
  const executor = o.executor ?? pool ?? inProcessExecutor();
  const outcomeOf = first.states.map((s) => s.outcome);
  const layout = shotsLayout(first, tableMetadata('shots', provenance));
  const shots = o.shotsTable === false ? null : new ArrowFileStream(out.file('shots.arrow'), layout.schema);
  // traces.arrow opens once the calibration (stored in its metadata) is known
  const traces: { stream: ArrowFileStream; layout: TracesLayout }[] = [];
  const onScoredBatch: RunOptions['onScoredBatch'] = shots || o.keepTraces ? (p, b, scored) => {
    if (shots) for (const rb of shotRecordBatches(layout, b, scored, outcomeOf)) shots.write(rb);
    // refinement points come after the calibrations traces.arrow records: they keep no traces
    if (p.index < points.length) for (const t of traces) t.stream.write(traceRecordBatch(t.layout, b, outcomeOf));
  } : undefined;
  let result: RunResult;
  let refinement: RefineOutcome | undefined;
  try {
    result = await runPoints(points, {
      executor: o.signal ? interruptibleExecutor(executor, o.signal) : executor, engine: choice, shard: o.shard, onProgress: o.onProgress,
      keepTraces: o.keepTraces,
      onCalibrated: o.keepTraces ? (calibrated) => {
        const tl = tracesLayout(first, o.keepTraces!, calibrated[0]?.compiled.grid.samples ?? 0, tableMetadata('traces', provenance), calibrated);
        traces.push({ stream: new ArrowFileStream(out.file('traces.arrow'), tl.schema), layout: tl });
      } : undefined,
      onScoredBatch,
    });
    if (o.refine) refinement = await refineWithin(o.refine, loaded, o.scenarioPath, points, result, { onScoredBatch, signal: o.signal, onProgress: o.onProgress, shard: o.shard });
    shots?.finish();
    for (const t of traces) t.stream.finish();
  } catch (e) {
    shots?.abort();
    for (const t of traces) t.stream.abort();
    throw e;
  } finally {
    await pool?.close();
  }
  if (shots) files.push('shots.arrow');
  if (traces.length > 0) files.push('traces.arrow');
  provenance.engine = result.engine;
  for (const p of result.points) {
    // noise/sensor: a clipping digitizer makes the values non-linear in the noise
    if (p.clippedSamples) {
      const w = `point ${p.index}: the digitizer clipped ${p.clippedSamples} scored record samples (see signal.digitizer); the predicted σ does not include clipping`;
      loaded.warnings.push(w);
      o.onWarning?.(w);
    }
  }
  const unit = first.signal.unit;
  const sweptUnits = points[0]!.units ?? {};
  files.push(...writeResultTables(out.work, result.points, provenance, unit, sweptUnits));
  // what `merge` needs to rebuild these tables from shards, bit for bit
  const ranges = result.points.map((p) => shardRange(batchCount(p.scenario, 'score'), o.shard));
  writeTallies(out.work, runTallies(result.points, ranges, { seed: first.seed, engine: result.engine, scenario: loaded.canonical }));
  files.push(TALLIES);
  if (o.parquet) files.splice(0, files.length, ...(await withParquetCopies(out.work, files)));
  writeManifest(out.work, { complete: true, seed: first.seed, engine: result.engine, engineReason: result.engineReason, shard, files, scenario: loaded.canonical, ...(refine ? { refine } : {}) });
  let report: string | null = null;
  if (o.report !== false) {
    if (o.signal) await checkpoint(o.signal);
    report = (await writeReport(out.work, out.file('report.html'), o.signal)).path;
  }
  return { result, provenance, files, warnings: loaded.warnings, refinement, report, sweep: loaded.scenario.sweep };
}
