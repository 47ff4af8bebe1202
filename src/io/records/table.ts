/**
 * Records in an Arrow table — read from an Arrow IPC file (arrow.ts) or from Parquet
 * (parquet.ts) — as a record set: a column of sample lists (`record` by default), or two such
 * columns `in_phase` and `quadrature` for complex records (what `run --keep-traces baseband`
 * writes); labels from a column; the attributes from the schema metadata (`singleshot.sample_rate`,
 * `…carrier_frequency`, `…carrier_phase`, `…window_start`, `…window_length`, `…unit`, else the
 * records column's `unit`).
 */
import type { Table } from 'apache-arrow';
import { InputError } from '../../errors.ts';
import { META_PREFIX } from '../metadata.ts';
import { labelColumn, metadataNumber, optionalIntegerColumn, recordColumn } from '../record-table.ts';
import type { LabelSet, RecordAttributes, RecordSet } from './record-set.ts';

/** The schema metadata's attributes of the records; the unit, when the schema has none, from the records column's own field metadata (as `run --keep-traces` writes it). */
function attributesOf(table: Table, column: string): RecordAttributes {
  const at: RecordAttributes = {};
  const put = (key: keyof RecordAttributes, name: string) => {
    const v = metadataNumber(table, `${META_PREFIX}${name}`);
    if (v !== null) (at as Record<string, number>)[key] = v;
  };
  put('sampleRate', 'sample_rate');
  put('carrierFrequency', 'carrier_frequency');
  put('carrierPhase', 'carrier_phase');
  put('windowStart', 'window_start');
  put('windowLength', 'window_length');
  const unit = table.schema.metadata.get(`${META_PREFIX}unit`) ?? table.schema.fields.find((f) => f.name === column)?.metadata.get('unit');
  if (unit !== undefined) at.unit = unit;
  return at;
}

/**
 * The records of `table` from `source`: column `column`, else `record`, else the pair
 * `in_phase`/`quadrature`; samples times `scale`.
 */
export function tableRecords(source: string, table: Table, column: string | undefined, scale: number): RecordSet {
  const has = (name: string) => table.getChild(name) !== null;
  const pair = column === undefined && !has('record') && has('in_phase') && has('quadrature');
  const attributes = attributesOf(table, pair ? 'in_phase' : column ?? 'record');
  const beside = { metadata: table.schema.metadata, column: (name: string) => optionalIntegerColumn(table, name) };
  if (pair) {
    const i = recordColumn(source, table, 'in_phase'), q = recordColumn(source, table, 'quadrature');
    if (q.samples !== i.samples) throw new InputError(source, 'column "quadrature"', `records of ${i.samples} samples like in_phase`, `${q.samples}`);
    return {
      source, rows: i.rows, samples: i.samples, complex: true, attributes, ...beside,
      row(r, outI, outQ) {
        i.row(r, outI);
        if (outQ) q.row(r, outQ);
        if (scale !== 1) for (let k = 0; k < i.samples; k++) { outI[k]! *= scale; if (outQ) outQ[k]! *= scale; }
      },
      close() {},
    };
  }
  const c = recordColumn(source, table, column ?? 'record');
  return {
    source, rows: c.rows, samples: c.samples, complex: false, attributes, ...beside,
    row(r, outI) {
      c.row(r, outI);
      if (scale !== 1) for (let k = 0; k < c.samples; k++) outI[k]! *= scale;
    },
    close() {},
  };
}

/** The labels of column `name` (outcome names from `outcomes`, or the metadata's `singleshot.outcomes`). */
export function tableLabels(source: string, table: Table, name: string, outcomes: readonly string[] | null): LabelSet {
  const stored = table.schema.metadata.get(`${META_PREFIX}outcomes`);
  let names = outcomes ? [...outcomes] : null;
  if (!names && stored !== undefined) {
    try {
      const parsed = JSON.parse(stored) as unknown;
      if (Array.isArray(parsed) && parsed.length === 2) names = parsed.map(String);
    } catch { /* the column's own labels then */ }
  }
  return { source: `${source}:${name}`, values: labelColumn(source, table, name, names), names: names ?? ['0', '1'] };
}
