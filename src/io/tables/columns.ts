/**
 * Small tables (summary, budget) built column by column from plain values.
 */
import { Bool, Field, Float64, makeData, RecordBatch, Schema, Struct, Table, Uint32, Utf8, vectorFromArray, type DataType } from 'apache-arrow';

export type ColumnKind = 'f64' | 'u32' | 'str' | 'bool';

export interface ColumnSpec {
  name: string;
  kind: ColumnKind;
  /** Unit for the field metadata; null for none (labels, counts, flags). */
  unit: string | null;
  values: (number | string | boolean | null)[];
}

function typeOf(kind: ColumnKind): DataType {
  return kind === 'f64' ? new Float64() : kind === 'u32' ? new Uint32() : kind === 'str' ? new Utf8() : new Bool();
}

/** A one-batch table whose fields carry units and whose schema carries `metadata`. Non-finite floats become null. */
export function buildTable(columns: readonly ColumnSpec[], metadata: Map<string, string>): Table {
  const fields = columns.map((c) => {
    const meta = new Map<string, string>();
    if (c.unit !== null) meta.set('unit', c.unit);
    return new Field(c.name, typeOf(c.kind), c.kind === 'f64' || c.values.some((v) => v === null), meta);
  });
  const length = columns[0]?.values.length ?? 0;
  const children = columns.map((c, i) => {
    const values = c.kind === 'f64' ? c.values.map((v) => (typeof v === 'number' && Number.isFinite(v) ? v : null)) : c.values;
    return vectorFromArray(values as never[], fields[i]!.type).data[0]!;
  });
  const schema = new Schema(fields, metadata);
  const data = makeData({ type: new Struct(fields), length, nullCount: 0, children });
  return new Table([new RecordBatch(schema, data)]);
}
