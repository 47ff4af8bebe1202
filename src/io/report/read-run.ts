/**
 * Reads a finished run folder for the report: run.json (must say complete), the summary and
 * budget tables, the scenario from their schema metadata, and — streamed batch by batch, only
 * the rows of one point — the integrated values in shots.arrow.
 */
import { createReadStream } from 'node:fs';
import { join } from 'node:path';
import { RecordBatchReader, type Table } from 'apache-arrow';
import { readArrowFile } from '../arrow-read.ts';
import { InputError } from '../../errors.ts';
import { readManifest } from '../manifest.ts';
import { checkValues } from '../table-checks.ts';
import { checkBudgetTable, checkSummaryTable } from './check-run-tables.ts';
import { META_PREFIX } from '../metadata.ts';
import type { PointRow } from '../../analysis/operating-point.ts';
import type { RateInterval } from '../../analysis/intervals.ts';
import { resolveScenario } from '../../scenario/resolve.ts';
import type { Scenario } from '../../scenario/types.ts';

/** One summary row (a point and a pipeline). */
export interface SummaryRow extends PointRow {
  shots: number;
  analyticSnr: number;
  sigma: number;
  analyticSigma: number;
  threshold: number;
  axisAngle: number;
  agreement: boolean;
  /** Fraction of shots discarded by post-selection (NaN when the table has no such column). */
  discardFraction: number;
  states: { name: string; error: RateInterval; analytic: number }[];
}

/** One budget row (a point, pipeline, state or "all", and cause or "total"). */
export interface BudgetRow {
  point: number;
  pipeline: string;
  state: string;
  cause: string;
  analytic: number;
  simulated: RateInterval;
  errors: number;
  shots: number;
  agrees: boolean;
}

/** What the report knows about a run folder before it looks at shots. */
export interface RunTables {
  dir: string;
  /** Schema metadata of summary.arrow (scenario, seed, version, engine, shard). */
  provenance: { scenario: string; seed: string; version: string; engine: string; shard: string };
  /** The scenario document as run (parsed from the canonical JSON) and its resolution. */
  doc: unknown;
  scenario: Scenario;
  summary: SummaryRow[];
  budget: BudgetRow[];
  hasShots: boolean;
  hasTraces: boolean;
  /** Columns of summary.arrow, in order (for hooks that look for optional data). */
  summaryColumns: string[];
  /** Names of every .arrow table in the folder's manifest. */
  files: string[];
}

function readTable(dir: string, name: string, table: string, columns: readonly string[]): Table {
  return readArrowFile(join(dir, name), table, columns);
}

/** Column values as plain numbers (null → NaN). */
function numbers(path: string, t: Table, name: string): number[] {
  const c = t.getChild(name);
  if (!c) throw new InputError(path, name, `a column "${name}"`, 'no such column');
  return Array.from(c, (v) => (v === null ? NaN : Number(v)));
}

function strings(path: string, t: Table, name: string): string[] {
  const c = t.getChild(name);
  if (!c) throw new InputError(path, name, `a column "${name}"`, 'no such column');
  return Array.from(c, (v) => String(v));
}

/** Points of a scenario's sweep grid (1 without a sweep). */
function gridPoints(s: Scenario): number {
  const axes = s.sweep?.axes ?? [];
  if (axes.length === 0) return 1;
  return s.sweep!.combine === 'zip' ? axes[0]!.values.length : axes.reduce((p, a) => p * a.values.length, 1);
}

function booleans(t: Table, name: string): boolean[] {
  const c = t.getChild(name);
  return c ? Array.from(c, (v) => v === true) : new Array<boolean>(t.numRows).fill(true);
}

/** Reads the folder's tables; refuses a folder whose run did not finish. */
export function readRunTables(dir: string): RunTables {
  const manifest = readManifest(dir, true);
  const summaryTable = readTable(dir, 'summary.arrow', 'summary', ['point', 'pipeline', 'shots', 'mean_error', 'mean_error_low', 'mean_error_high', 'analytic_mean_error', 'snr', 'threshold']);
  const budgetTable = readTable(dir, 'budget.arrow', 'budget', ['point', 'pipeline', 'state', 'cause', 'analytic', 'simulated', 'low', 'high']);
  const meta = summaryTable.schema.metadata;
  const get = (k: string) => meta.get(`${META_PREFIX}${k}`) ?? '';
  const canonical = get('scenario');
  const source = join(dir, 'summary.arrow');
  if (!canonical) throw new InputError(source, '', 'a summary table with the scenario in its schema metadata');
  let doc: unknown;
  try {
    doc = JSON.parse(canonical);
  } catch {
    throw new InputError(source, '', 'valid scenario JSON in the schema metadata');
  }
  const { scenario } = resolveScenario(doc, `${source} (embedded scenario)`);
  const axes = scenario.sweep?.axes ?? [];
  const states = scenario.states.map((s) => s.name);
  const shape = { points: gridPoints(scenario), refined: manifest.refine?.points ?? 0, pipelines: scenario.pipelines.map((p) => p.name), states, outcomes: scenario.outcomes };
  const points = checkSummaryTable(source, summaryTable, shape);
  checkBudgetTable(join(dir, 'budget.arrow'), budgetTable, shape, points);
  for (const a of axes) checkValues(source, summaryTable, a.column, {});

  const n = summaryTable.numRows;
  const col = (name: string) => numbers(source, summaryTable, name);
  const point = col('point'), shots = col('shots');
  const pipeline = strings(source, summaryTable, 'pipeline');
  const swept = axes.map((a) => col(a.column));
  const [me, meLow, meHigh, am] = ['mean_error', 'mean_error_low', 'mean_error_high', 'analytic_mean_error'].map(col);
  const [snr, asnr, sigma, asigma, threshold, angle] = ['snr', 'analytic_snr', 'sigma', 'analytic_sigma', 'threshold', 'axis_angle'].map(col);
  const perState = states.map((st) => ['', '_low', '_high'].map((s) => col(`error_${st}${s}`)).concat([col(`analytic_error_${st}`)]));
  const agreement = booleans(summaryTable, 'agreement');
  const discard = summaryTable.getChild('discard_fraction') ? col('discard_fraction') : new Array<number>(n).fill(NaN);
  const summary: SummaryRow[] = [];
  for (let i = 0; i < n; i++) {
    summary.push({
      point: point[i]!, pipeline: pipeline[i]!, shots: shots[i]!,
      parameters: Object.fromEntries(axes.map((a, k) => [a.column, swept[k]![i]!])),
      meanError: { rate: me![i]!, low: meLow![i]!, high: meHigh![i]! }, analyticMean: am![i]!,
      snr: snr![i]!, analyticSnr: asnr![i]!, sigma: sigma![i]!, analyticSigma: asigma![i]!,
      threshold: threshold![i]!, axisAngle: angle![i]!, agreement: agreement[i]!, discardFraction: discard[i]!,
      states: states.map((name, s) => ({
        name, error: { rate: perState[s]![0]![i]!, low: perState[s]![1]![i]!, high: perState[s]![2]![i]! }, analytic: perState[s]![3]![i]!,
      })),
    });
  }

  const budgetPath = join(dir, 'budget.arrow');
  const bcol = (name: string) => numbers(budgetPath, budgetTable, name);
  const bPoint = bcol('point'), bAnalytic = bcol('analytic'), bSim = bcol('simulated'), bLow = bcol('low'), bHigh = bcol('high');
  const bErrors = bcol('errors'), bShots = bcol('shots');
  const bPipeline = strings(budgetPath, budgetTable, 'pipeline'), bState = strings(budgetPath, budgetTable, 'state'), bCause = strings(budgetPath, budgetTable, 'cause');
  const bAgrees = booleans(budgetTable, 'agrees');
  const budget: BudgetRow[] = [];
  for (let i = 0; i < budgetTable.numRows; i++) {
    budget.push({
      point: bPoint[i]!, pipeline: bPipeline[i]!, state: bState[i]!, cause: bCause[i]!, analytic: bAnalytic[i]!,
      simulated: { rate: bSim[i]!, low: bLow[i]!, high: bHigh[i]! }, errors: bErrors[i]!, shots: bShots[i]!, agrees: bAgrees[i]!,
    });
  }
  return {
    dir,
    provenance: { scenario: canonical, seed: get('seed'), version: get('version'), engine: get('engine'), shard: get('shard') },
    doc, scenario, summary, budget,
    // only what run.json lists (and the checksums cover) is read
    hasShots: manifest.files.includes('shots.arrow'),
    hasTraces: manifest.files.includes('traces.arrow'),
    summaryColumns: summaryTable.schema.fields.map((f) => f.name),
    files: manifest.files,
  };
}

/**
 * Integrated values of one point and pipeline from shots.arrow, grouped by intended state;
 * `between` runs after every record batch (the caller's chance to stop).
 */
export async function readPointValues(
  dir: string, point: number, pipeline: string, stateNames: readonly string[], between?: () => Promise<void>,
): Promise<Float64Array[]> {
  const path = join(dir, 'shots.arrow');
  try {
    return await pointValues(path, point, pipeline, stateNames, between);
  } catch (e) {
    if (e instanceof InputError || (e instanceof Error && e.name === 'RunInterrupted')) throw e;
    // the file was checked against run.json; a reader failure means bytes made to pass that check
    throw new InputError(path, '', 'a readable Arrow table file', `a damaged file (${String((e as Error).message).split('\n')[0]!.slice(0, 100)})`);
  }
}

async function pointValues(
  path: string, point: number, pipeline: string, stateNames: readonly string[], between?: () => Promise<void>,
): Promise<Float64Array[]> {
  const parts: number[][] = stateNames.map(() => []);
  const reader = await RecordBatchReader.from(createReadStream(path));
  for await (const batch of reader) {
    await between?.();
    const pointCol = batch.getChild('point');
    const pipeCol = batch.getChild('pipeline');
    const stateCol = batch.getChild('prepared');
    const valueCol = batch.getChild('value');
    if (!pointCol || !pipeCol || !stateCol || !valueCol) throw new InputError(path, '', 'the columns point, pipeline, prepared and value');
    const points = pointCol.toArray() as Uint32Array;
    const pipeData = pipeCol.data[0]!;
    if (!pipeData.dictionary || !stateCol.data[0]?.dictionary) throw new InputError(path, '', 'dictionary-encoded pipeline and prepared columns');
    const pipeNames = (pipeData.dictionary.toArray() as string[]);
    const wanted = pipeNames.indexOf(pipeline);
    const pipeIdx = pipeData.values as Uint8Array;
    const stateData = stateCol.data[0]!;
    const stateNamesHere = stateData.dictionary!.toArray() as string[];
    const toState = stateNamesHere.map((s) => stateNames.indexOf(s));
    const stateIdx = stateData.values as Uint8Array;
    const values = valueCol.toArray() as Float64Array;
    for (let i = 0; i < points.length; i++) {
      if (points[i] !== point || pipeIdx[i] !== wanted) continue;
      const s = toState[stateIdx[i]!];
      if (!Number.isFinite(values[i]!)) throw new InputError(path, `value[${i}]`, 'a finite integrated value', String(values[i]));
      if (s !== undefined && s >= 0) parts[s]!.push(values[i]!);
    }
  }
  return parts.map((p) => Float64Array.from(p));
}
