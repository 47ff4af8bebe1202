/**
 * Small factories for Arrow columns built from typed arrays without copying, and for fields
 * that carry their unit in metadata.
 */
import {
  Bool, Dictionary, Field, Float64, makeData, Uint8, Uint32, Utf8, vectorFromArray,
  type Data, type DataType, type Vector,
} from 'apache-arrow';

/** A field with a `unit` entry in its metadata ('' for dimensionless). */
export function unitField(name: string, type: DataType, unit: string | null, nullable = false): Field {
  const meta = new Map<string, string>();
  if (unit !== null) meta.set('unit', unit);
  return new Field(name, type, nullable, meta);
}

/** A dictionary-encoded string column type with a fixed dictionary shared by every batch. */
export interface DictionaryColumn {
  type: Dictionary<Utf8, Uint8>;
  dictionary: Vector<Utf8>;
}

export function makeDictionaryColumn(id: number, names: readonly string[]): DictionaryColumn {
  return { type: new Dictionary(new Utf8(), new Uint8(), id, false), dictionary: vectorFromArray([...names], new Utf8()) };
}

export function dictionaryData(column: DictionaryColumn, indices: Uint8Array): Data<Dictionary<Utf8, Uint8>> {
  return makeData({ type: column.type, length: indices.length, nullCount: 0, data: indices, dictionary: column.dictionary });
}

export function float64Data(values: Float64Array): Data<Float64> {
  return makeData({ type: new Float64(), length: values.length, nullCount: 0, data: values });
}

/** Float64 with NaN turned into null. */
export function nullableFloat64Data(values: Float64Array): Data<Float64> {
  const bitmap = new Uint8Array((values.length + 7) >> 3);
  let nulls = 0;
  for (let i = 0; i < values.length; i++) {
    if (Number.isNaN(values[i]!)) nulls++;
    else bitmap[i >> 3]! |= 1 << (i & 7);
  }
  return makeData({ type: new Float64(), length: values.length, nullCount: nulls, data: values, nullBitmap: nulls > 0 ? bitmap : undefined });
}

export function uint32Data(values: Uint32Array): Data<Uint32> {
  return makeData({ type: new Uint32(), length: values.length, nullCount: 0, data: values });
}

/** Booleans from 0/1 bytes, bit-packed as Arrow requires. */
export function boolData(values: Uint8Array): Data<Bool> {
  const packed = new Uint8Array((values.length + 7) >> 3);
  for (let i = 0; i < values.length; i++) if (values[i]) packed[i >> 3]! |= 1 << (i & 7);
  return makeData({ type: new Bool(), length: values.length, nullCount: 0, data: packed });
}

