/**
 * The tables `analyze` writes about the records themselves, for the report:
 * - noise.arrow: the records' noise spectrum (engine/recorded/spectrum.ts) in the columns the
 *   report's noise view reads — component, frequency (Hz), psd (unit²/Hz);
 * - traces.arrow: a few example records (EXAMPLES of each labelled outcome, or 2·EXAMPLES
 *   unlabelled) as Float64 lists — `record`, or `in_phase`/`quadrature` for complex records —
 *   with their row (shot) and label (prepared), and the timing the report draws them on.
 */
import { Field, FixedSizeList, Float64, makeData, RecordBatch, Schema, Struct, Uint32, Utf8, vectorFromArray } from 'apache-arrow';
import { tableToIPC, Table } from 'apache-arrow';
import { writeFileAtomic } from '../atomic-file.ts';
import { float64Data, makeDictionaryColumn, uint32Data, unitField } from '../arrow-columns.ts';
import { META_PREFIX } from '../metadata.ts';
import type { RecordSet } from '../records/record-set.ts';

/** Example records of each labelled outcome. */
export const EXAMPLES = 3;

/** The spectrum as the noise view reads it (engine/recorded/spectrum.ts's RecordsSpectrum). */
export interface SpectrumRows {
  frequencies: Float64Array;
  groups: readonly { outcome: number | null; records: number; density: Float64Array }[];
}

/** noise.arrow: one row per group and frequency (zero left out: a log axis cannot show it; so is the Nyquist bin, which the one-sided density counts once). */
export function writeRecordedNoise(path: string, metadata: Map<string, string>, s: SpectrumRows, outcomes: readonly string[], unit: string): void {
  const component: string[] = [], frequency: number[] = [], psd: number[] = [];
  for (const g of s.groups) {
    const name = g.outcome === null ? `records (${g.records})` : `records labelled ${outcomes[g.outcome]} (${g.records})`;
    for (let k = 1; k < s.frequencies.length - 1; k++) {
      component.push(name);
      frequency.push(s.frequencies[k]!);
      psd.push(g.density[k]!);
    }
  }
  const fields = [unitField('component', new Utf8(), null), unitField('frequency', new Float64(), 'Hz'), unitField('psd', new Float64(), unit ? `${unit}^2/Hz` : '1/Hz')];
  const schema = new Schema(fields, metadata);
  const children = [vectorFromArray(component, new Utf8()).data[0]!, float64Data(Float64Array.from(frequency)), float64Data(Float64Array.from(psd))];
  const batch = new RecordBatch(schema, makeData({ type: new Struct(fields), length: component.length, nullCount: 0, children }));
  writeFileAtomic(path, tableToIPC(new Table([batch]), 'file'));
}

/** The rows drawn as examples: the first EXAMPLES of each labelled outcome, or the first 2·EXAMPLES. */
function exampleRows(rows: number, labels: Uint8Array | null): number[] {
  if (!labels) return Array.from({ length: Math.min(rows, 2 * EXAMPLES) }, (_, r) => r);
  const picked: number[] = [];
  for (const o of [0, 1]) {
    let taken = 0;
    for (let r = 0; r < rows && taken < EXAMPLES; r++) if (labels[r] === o) { picked.push(r); taken++; }
  }
  return picked.sort((a, b) => a - b);
}

/** traces.arrow of an analysis (see the file comment). */
export function writeExampleRecords(
  path: string, metadata: Map<string, string>, records: RecordSet, labels: Uint8Array | null, outcomes: readonly string[], unit: string,
  timing: { sampleRate: number; windowStart: number; windowLength: number },
): void {
  const rows = exampleRows(records.rows, labels);
  const n = records.samples, count = rows.length;
  const i = new Float64Array(count * n), q = records.complex ? new Float64Array(count * n) : null;
  const bufI = new Float64Array(n), bufQ = records.complex ? new Float64Array(n) : null;
  rows.forEach((r, j) => {
    records.row(r, bufI, bufQ);
    i.set(bufI, j * n);
    if (q) q.set(bufQ!, j * n);
  });
  const dict = makeDictionaryColumn(1, outcomes);
  const list = () => new FixedSizeList(n, new Field('sample', new Float64(), false));
  const recordFields = q ? [unitField('in_phase', list(), unit), unitField('quadrature', list(), unit)] : [unitField('record', list(), unit)];
  const meta = new Map(metadata);
  const put = (k: string, v: string) => meta.set(`${META_PREFIX}${k}`, v);
  put('trace_kind', 'recorded');
  put('sample_rate', String(timing.sampleRate));
  put('window_start', String(timing.windowStart));
  put('window_length', String(timing.windowLength));
  put('outcomes', JSON.stringify(outcomes));
  const fields = [unitField('shot', new Uint32(), null), unitField('prepared', dict.type, null, true), ...recordFields];
  const schema = new Schema(fields, meta);
  const label = Uint8Array.from(rows, (r) => (labels ? (labels[r] === 255 ? 0 : labels[r]!) : 0));
  const valid = new Uint8Array((count + 7) >> 3);
  let nulls = 0;
  rows.forEach((r, j) => {
    if (labels && labels[r] !== 255) valid[j >> 3]! |= 1 << (j & 7);
    else nulls++;
  });
  const listData = (values: Float64Array, field: Field) => makeData({
    type: field.type as FixedSizeList<Float64>, length: count, nullCount: 0,
    child: makeData({ type: new Float64(), length: count * n, nullCount: 0, data: values }),
  });
  const children = [
    uint32Data(Uint32Array.from(rows)),
    makeData({ type: dict.type, length: count, nullCount: nulls, nullBitmap: nulls > 0 ? valid : undefined, data: label, dictionary: dict.dictionary }),
    ...(q ? [listData(i, recordFields[0]!), listData(q, recordFields[1]!)] : [listData(i, recordFields[0]!)]),
  ];
  const batch = new RecordBatch(schema, makeData({ type: new Struct(fields), length: count, nullCount: 0, children }));
  writeFileAtomic(path, tableToIPC(new Table([batch]), 'file'));
}
