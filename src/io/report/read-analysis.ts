/**
 * The tables of an `analyze` folder as its report reads them: the summary row (summary.arrow,
 * present when the records had labels), each labelled outcome's integrated values and (I, Q)
 * from shots.arrow (calibration rows and unlabelled rows apart), and the example records of
 * traces.arrow. Each read checks the columns it needs and names the file when one is missing.
 */
import { createReadStream, existsSync } from 'node:fs';
import { join } from 'node:path';
import { RecordBatchReader, type Table } from 'apache-arrow';
import { InputError } from '../../errors.ts';
import { readArrowFile } from '../arrow-read.ts';
import { META_PREFIX } from '../metadata.ts';

/** The summary row of an analysis: every column by name (numbers; null where the table has null). */
export type AnalysisSummary = Record<string, number | string | boolean | null>;

/** The values of one group of rows. */
export interface GroupValues {
  value: Float64Array;
  inPhase: Float64Array;
  quadrature: Float64Array;
}

/** Integrated values from shots.arrow: per labelled outcome (scored rows), and the unlabelled rows. */
export interface AnalysisValues {
  pipeline: string;
  unit: string;
  labelled: GroupValues[];
  unlabelled: GroupValues;
  calibrationRows: number;
}

/** The one summary row, or null when the folder has no summary (no labels). */
export function readAnalysisSummary(dir: string): AnalysisSummary | null {
  const path = join(dir, 'summary.arrow');
  if (!existsSync(path)) return null;
  const table = readArrowFile(path, 'summary', ['pipeline', 'shots', 'mean_error', 'snr', 'threshold']);
  if (table.numRows !== 1) throw new InputError(path, '', 'one row (an analysis runs one pipeline)', `${table.numRows} rows`);
  const row: AnalysisSummary = {};
  for (const f of table.schema.fields) {
    const v = table.getChild(f.name)!.get(0) as unknown;
    row[f.name] = v === null || typeof v === 'string' || typeof v === 'boolean' ? v : Number(v);
  }
  return row;
}

/** The unit of a column of `table` ('' when it states none). */
export function unitOf(table: Table, column: string): string {
  return table.schema.fields.find((f) => f.name === column)?.metadata.get('unit') ?? '';
}

/** The integrated values of shots.arrow, grouped (see AnalysisValues), streamed batch by batch. */
export async function readAnalysisValues(dir: string, outcomes: readonly string[]): Promise<AnalysisValues> {
  const file = join(dir, 'shots.arrow');
  if (!existsSync(file)) throw new InputError(file, '', 'the shots table of the analysis', 'no such file');
  const groups = [...outcomes.map(() => ({ v: [] as number[], i: [] as number[], q: [] as number[] })), { v: [] as number[], i: [] as number[], q: [] as number[] }];
  let pipeline = '', unit = '', calibrationRows = 0;
  const reader = await RecordBatchReader.from(createReadStream(file));
  for await (const batch of reader) {
    const [prepared, calibration, value, inPhase, quadrature, pipe] = ['prepared', 'calibration', 'value', 'in_phase', 'quadrature', 'pipeline'].map((c) => batch.getChild(c));
    if (!prepared || !calibration || !value || !inPhase || !quadrature || !pipe) {
      throw new InputError(file, '', 'the columns prepared, calibration, value, in_phase, quadrature and pipeline (an analysis\'s shots table)', 'others');
    }
    pipeline ||= String(pipe.get(0) ?? '');
    unit ||= batch.schema.fields.find((f) => f.name === 'value')?.metadata.get('unit') ?? '';
    for (let k = 0; k < batch.numRows; k++) {
      if (calibration.get(k)) { calibrationRows++; continue; }
      const label = prepared.get(k) as string | null;
      const g = groups[label === null ? outcomes.length : Math.max(0, outcomes.indexOf(label))]!;
      g.v.push(Number(value.get(k)));
      g.i.push(Number(inPhase.get(k)));
      g.q.push(Number(quadrature.get(k)));
    }
  }
  const pack = (g: (typeof groups)[number]): GroupValues => ({ value: Float64Array.from(g.v), inPhase: Float64Array.from(g.i), quadrature: Float64Array.from(g.q) });
  return { pipeline, unit, labelled: groups.slice(0, outcomes.length).map(pack), unlabelled: pack(groups[outcomes.length]!), calibrationRows };
}

/** The example records of traces.arrow: each record (I, or I then Q for complex records) with its row and label. */
export interface ExampleRecords {
  sampleRate: number;
  window: [number, number];
  unit: string;
  channels: number;
  records: { shot: number; label: string | null; samples: Float64Array }[];
}

export function readExampleRecords(dir: string): ExampleRecords | null {
  const path = join(dir, 'traces.arrow');
  if (!existsSync(path)) return null;
  const table = readArrowFile(path, 'traces', ['shot', 'prepared']);
  const meta = (k: string) => Number(table.schema.metadata.get(`${META_PREFIX}${k}`));
  const sampleRate = meta('sample_rate'), start = meta('window_start'), length = meta('window_length');
  if (!(sampleRate > 0) || !(start >= 0) || !(length > 0)) throw new InputError(path, `metadata ${META_PREFIX}sample_rate`, 'the records\' sample rate and window', 'none');
  const complex = table.getChild('in_phase') !== null;
  const columns = complex ? ['in_phase', 'quadrature'] : ['record'];
  const lists = columns.map((c) => {
    const v = table.getChild(c);
    if (v === null) throw new InputError(path, `column "${c}"`, 'the example records', 'no such column');
    return v;
  });
  const records = Array.from({ length: table.numRows }, (_, r) => {
    const parts = lists.map((l) => Float64Array.from((l.get(r) as { toArray(): ArrayLike<number> }).toArray()));
    const samples = new Float64Array(parts.reduce((a, p) => a + p.length, 0));
    let at = 0;
    for (const p of parts) { samples.set(p, at); at += p.length; }
    return { shot: Number(table.getChild('shot')!.get(r)), label: table.getChild('prepared')!.get(r) as string | null, samples };
  });
  return { sampleRate, window: [start, start + length], unit: unitOf(table, columns[0]!), channels: columns.length, records };
}
