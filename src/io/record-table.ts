/**
 * Reading user records for `analyze`: an Arrow IPC file (or stream) with one column of sample
 * lists — FixedSizeList or List of Float32/Float64, one record per row, all of one length —
 * an optional label column, and schema metadata. Every problem is an InputError that names the
 * file and the column (CLI exit 2).
 */
import { readFileSync, statSync } from 'node:fs';
import { tableFromIPC, Type, type Table, type Vector } from 'apache-arrow';
import { InputError } from '../errors.ts';
import { verifyArrowBytes } from './arrow-verify.ts';

/** Largest sample magnitude accepted (the signal range of scenarios: processing then stays finite). */
export const MAX_SAMPLE = 1e100;

/** The records of a table, validated: row r's samples are `row(r, out)`. */
export interface RecordColumn {
  name: string;
  rows: number;
  samples: number;
  /** Copies row r's samples into out (length ≥ samples) as Float64 and returns out. */
  row(r: number, out: Float64Array): Float64Array;
}

/** Reads an Arrow table file; InputError when missing or not Arrow. */
export function readArrowTable(path: string): Table {
  let bytes: Buffer;
  try {
    if (statSync(path).isDirectory()) throw new InputError(path, '', 'an Arrow table file', 'a directory');
    bytes = readFileSync(path);
  } catch (e) {
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(path, '', 'an Arrow table file', code === 'ENOENT' ? 'no such file' : `an unreadable file (${code ?? 'error'})`);
  }
  // a file (magic at both ends) or a stream; bounds on its metadata before apache-arrow reads it
  const magic = [0x41, 0x52, 0x52, 0x4f, 0x57, 0x31];
  const isFile = bytes.length >= 18 && magic.every((m, i) => bytes[i] === m) && magic.every((m, i) => bytes[bytes.length - 6 + i] === m);
  if (magic.every((m, i) => bytes[i] === m) && !isFile) throw new InputError(path, '', 'a complete Arrow table file', `a truncated file (${bytes.length} bytes, no closing footer)`);
  try {
    verifyArrowBytes(path, bytes, !isFile);
  } catch (e) {
    // not a file, and not a stream either: say what was expected
    if (!isFile && e instanceof InputError) throw new InputError(path, '', 'an Arrow IPC file (.arrow) with a column of sample lists', 'something that is not an Arrow table');
    throw e;
  }
  try {
    const table = tableFromIPC(bytes);
    if (table.schema.fields.length === 0) throw new Error('no columns');
    return table;
  } catch {
    throw new InputError(path, '', 'an Arrow IPC file (.arrow) with a column of sample lists', 'something that is not an Arrow table');
  }
}

function columnNames(table: Table): string {
  return table.schema.fields.map((f) => f.name).join(', ');
}

/** The column `name` or an InputError listing the columns there are. */
function column(path: string, table: Table, name: string, what: string): Vector {
  const vector = table.getChild(name);
  if (vector === null) throw new InputError(path, `column "${name}"`, `${what} (the table has ${columnNames(table)})`, 'no such column');
  return vector;
}

function typeText(t: { toString(): string }): string {
  return String(t);
}

/** The validated sample column `name` of `table`. */
export function recordColumn(path: string, table: Table, name: string): RecordColumn {
  const vector = column(path, table, name, 'a column of sample lists');
  const type = vector.type;
  const at = `column "${name}"`;
  const expected = 'a fixed-size list or list of Float32 or Float64 samples';
  const isList = type.typeId === Type.FixedSizeList || type.typeId === Type.List;
  const child = isList ? type.children[0]!.type : null;
  if (!isList || child === null || child.typeId !== Type.Float) throw new InputError(path, at, expected, typeText(type));
  if (vector.nullCount > 0) throw new InputError(path, at, 'a record in every row', `${vector.nullCount} empty (null) rows`);
  // chunks: values (flat) and offsets per row
  const chunks = vector.data.map((d) => {
    const values = d.children[0]!.values as Float32Array | Float64Array;
    const start = d.children[0]!.offset;
    return { data: d, values, start };
  });
  let samples = -1;
  const rowStart: { chunk: number; offset: number }[] = [];
  chunks.forEach(({ data, values, start }, c) => {
    for (let i = 0; i < data.length; i++) {
      let begin: number, end: number;
      if (type.typeId === Type.FixedSizeList) {
        const size = (type as unknown as { listSize: number }).listSize;
        begin = (data.offset + i) * size;
        end = begin + size;
      } else {
        const offsets = data.valueOffsets as Int32Array;
        begin = offsets[data.offset + i]!;
        end = offsets[data.offset + i + 1]!;
      }
      // a damaged file may point outside its values: refuse rather than read past them
      if (!(Number.isInteger(begin) && Number.isInteger(end) && begin >= 0 && end >= begin && start + end <= values.length)) {
        throw new InputError(path, at, 'records that lie inside the column\'s values', `row ${rowStart.length} pointing at samples [${begin}, ${end}) of ${values.length - start}`);
      }
      for (let k = begin; k < end; k++) {
        const x = values[start + k]!;
        if (!(Math.abs(x) <= MAX_SAMPLE)) throw new InputError(path, at, `finite samples of magnitude at most ${MAX_SAMPLE}`, `${x} in row ${rowStart.length}`);
      }
      const length = end - begin;
      if (samples < 0) samples = length;
      else if (length !== samples) {
        throw new InputError(path, at, `records of one length (row 0 has ${samples} samples)`, `ragged lists: row ${rowStart.length} has ${length}`);
      }
      rowStart.push({ chunk: c, offset: begin });
    }
  });
  if (rowStart.length === 0) throw new InputError(path, at, 'at least one record', 'an empty table');
  if (samples < 1) throw new InputError(path, at, 'records of at least one sample', 'empty lists');
  return {
    name, rows: rowStart.length, samples,
    row(r, out) {
      const { chunk, offset } = rowStart[r]!;
      const { values, start } = chunks[chunk]!;
      for (let k = 0; k < samples; k++) out[k] = values[start + offset + k]!;
      return out;
    },
  };
}

/**
 * The label column `name` as outcome indices per row (255 = no label: a null): integers 0/1,
 * booleans, or strings/dictionary labels mapped through `outcomes` (outcome 0 first).
 */
export function labelColumn(path: string, table: Table, name: string, outcomes: readonly string[] | null): Uint8Array {
  const vector = column(path, table, name, 'a label column');
  const at = `column "${name}"`;
  const out = new Uint8Array(vector.length);
  const t = vector.type.typeId;
  const textual = t === Type.Utf8 || t === Type.LargeUtf8 || t === Type.Dictionary;
  if (textual && outcomes === null) {
    throw new InputError(path, at, 'integer 0/1 or boolean labels, or string labels with "outcomes: [label0, label1]" in the pipeline file or singleshot.outcomes in the metadata', typeText(vector.type));
  }
  if (!textual && t !== Type.Int && t !== Type.Bool) {
    throw new InputError(path, at, 'labels: integers 0/1, booleans or strings', typeText(vector.type));
  }
  for (let i = 0; i < vector.length; i++) {
    const v: unknown = vector.get(i);
    if (v === null || v === undefined) {
      out[i] = 255;
      continue;
    }
    let o: number;
    if (textual) o = outcomes!.indexOf(String(v));
    else if (typeof v === 'boolean') o = v ? 1 : 0;
    else o = Number(v);
    if (o !== 0 && o !== 1) {
      const allowed = textual ? outcomes!.map((x) => JSON.stringify(x)).join(' or ') : '0 or 1';
      throw new InputError(path, at, `labels ${allowed}`, `${JSON.stringify(typeof v === 'bigint' ? Number(v) : v)} in row ${i}`);
    }
    out[i] = o;
  }
  return out;
}

/** An integer column (e.g. "point") as numbers, or null when absent. */
export function optionalIntegerColumn(table: Table, name: string): Float64Array | null {
  const vector = table.getChild(name);
  if (vector === null || vector.type.typeId !== Type.Int) return null;
  return Float64Array.from({ length: vector.length }, (_, i) => Number(vector.get(i)));
}

/** A number from the schema metadata (`key`), or null when absent or not a finite number. */
export function metadataNumber(table: Table, key: string): number | null {
  const v = table.schema.metadata.get(key);
  if (v === undefined) return null;
  const x = Number(v);
  return Number.isFinite(x) ? x : null;
}
