/**
 * `runScenario`: simulate a scenario and write its tables to a folder — the `run` command as a
 * function, with the command's defaults (src/library/defaults.ts).
 */
import { z } from 'zod';
import { runToDirectory, type RunToDirectoryResult } from '../app/run-to-directory.ts';
import type { RunEstimate } from '../run/estimate.ts';
import type { RunPhase } from '../run/run-points.ts';
import { MAX_SHARDS } from '../io/manifest.ts';
import { DEFAULTS, ENGINES, type EngineName } from './defaults.ts';
import { abortSignal, callback, choice, flag, pathText, readOptions, wholeNumber } from './options.ts';
import { scenarioOption, scenarioSource, type ScenarioDocument } from './scenario-input.ts';

/** The options of `runScenario` (the `run` command's, by the same defaults). */
export interface RunScenarioOptions {
  /**
   * The scenario: a file path (YAML or JSON), or the document itself as a plain object (what a
   * scenario file holds); messages name an object `(scenario object)`. Required.
   */
  scenario: string | ScenarioDocument;
  /** Folder for the tables; must be empty unless `force`. Required. */
  outDir: string;
  /** Scored shots per point, replacing the scenario's `shots` (a count ≥ 1). Default: the scenario's. */
  shots?: number;
  /** Run seed, replacing the scenario's `seed` (a whole number ≥ 0). Default: the scenario's. */
  seed?: number;
  /**
   * Run only one part of the shots: part `index` (from 0) of `count` (the CLI's `--shard K/N`
   * is `{ index: K − 1, count: N }`); merge the parts with `mergeRunFolders`. Default: all shots.
   */
  shard?: { index: number; count: number };
  /** Write shots.arrow (one row per scored shot). Default true. */
  shotsTable?: boolean;
  /** Also write traces.arrow: every scored record, `raw` or demodulated `baseband` I/Q. Default: none. */
  keepTraces?: 'raw' | 'baseband';
  /** Replace the files of a non-empty `outDir`, and run even if the estimate exceeds free memory or disk. Default false. */
  force?: boolean;
  /**
   * After a sweep, add golden-section points along one swept value to refine the error minimum:
   * its key path, or `true` for the only or first range. Default: no refinement.
   */
  refine?: string | true;
  /** Points `refine` adds (2 to 64). Default 6; ignored without `refine`. */
  refinePoints?: number;
  /** Write report.html. Default true. */
  report?: boolean;
  /** Also write every table as Parquet (X.parquet beside X.arrow). Default false. */
  parquet?: boolean;
  /** `exact` (each integrated value from its exact distribution), `traces` (every sample), or `auto` (exact when valid). Default `auto`. */
  engine?: EngineName;
  /**
   * Simulation threads (a count ≥ 1). Default: every physical core for a run estimated over 2 s whose
   * batches take over 5 ms, else 1 (this thread).
   */
  workers?: number;
  /**
   * Called as batches finish, with the shots done and the shots in all of the phase: first the
   * calibration shots (`'calibrating'`), then the scored shots (`'simulating'`).
   */
  onProgress?: (done: number, total: number, phase: RunPhase) => void;
  /** Called with each warning (about the scenario or the run), one line each. */
  onWarning?: (message: string) => void;
  /** Called with the resource estimate (seconds, memory and disk bytes) before anything is written. */
  onEstimate?: (estimate: RunEstimate) => void;
  /** Aborting it stops the run at the next batch (a RunInterrupted error); the folder is left as it was. */
  signal?: AbortSignal;
}

/** What `runScenario` did: the result per point and pipeline, the files written, warnings, report path. */
export type RunScenarioResult = RunToDirectoryResult;

const shard = z.strictObject({
  index: wholeNumber(0),
  count: wholeNumber(1).max(MAX_SHARDS, { error: `a whole number from 1 to ${MAX_SHARDS}` }),
}, { error: 'a part { index, count } (index from 0)' });

const schema: z.ZodType<RunScenarioOptions> = z.strictObject({
  scenario: scenarioOption,
  outDir: pathText('a folder path (string)'),
  shots: wholeNumber(1).optional(),
  seed: wholeNumber(0).max(Number.MAX_SAFE_INTEGER, { error: 'a whole number ≥ 0 (a safe integer)' }).optional(),
  shard: shard.optional(),
  shotsTable: flag().optional(),
  keepTraces: choice(['raw', 'baseband']).optional(),
  force: flag().optional(),
  refine: z.union([z.string(), z.literal(true)], { error: 'a swept key path (string) or true' }).optional(),
  refinePoints: wholeNumber(1).optional(),
  report: flag().optional(),
  parquet: flag().optional(),
  engine: choice(ENGINES).optional(),
  workers: wholeNumber(1).optional(),
  onProgress: callback<(done: number, total: number, phase: RunPhase) => void>('(done, total, phase) => void').optional(),
  onWarning: callback<(message: string) => void>('(message) => void').optional(),
  onEstimate: callback<(estimate: RunEstimate) => void>('(estimate) => void').optional(),
  signal: abortSignal().optional(),
});

/**
 * Simulates a scenario and writes its tables (shots.arrow, summary.arrow, budget.arrow,
 * tallies.json, run.json, report.html) to `outDir`: the `run` command. The same scenario, seed
 * and options give the same bytes as the command line. Problems with the options or the
 * scenario are `InputError`s (one line per problem).
 */
export async function runScenario(options: RunScenarioOptions): Promise<RunScenarioResult> {
  const o = readOptions('runScenario', schema, options);
  const source = scenarioSource(o.scenario);
  return runToDirectory({
    scenarioPath: source.path, scenarioDocument: source.document,
    outDir: o.outDir, shots: o.shots, seed: o.seed, shard: o.shard,
    shotsTable: o.shotsTable ?? DEFAULTS.shotsTable, keepTraces: o.keepTraces, force: o.force ?? DEFAULTS.force,
    refine: o.refine === undefined ? undefined : { key: o.refine, points: o.refinePoints ?? DEFAULTS.refinePoints },
    report: o.report ?? DEFAULTS.report, parquet: o.parquet ?? DEFAULTS.parquet, engine: o.engine ?? DEFAULTS.engine,
    workers: o.workers, onProgress: o.onProgress, onWarning: o.onWarning, onEstimate: o.onEstimate, signal: o.signal,
  });
}
