/**
 * Reading singleshot's own Arrow tables back, safely: a missing, empty, truncated, foreign or
 * wrongly shaped file is an `InputError` that names the file (and the column), never a stack
 * trace from inside apache-arrow. Every command that reads tables (merge, report, analyze,
 * rerun) goes through `readArrowFile`.
 */
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { RecordBatchReader, tableFromIPC, Type, type Schema, type Table } from 'apache-arrow';
import { InputError } from '../errors.ts';
import { verifyArrowBytes, verifyArrowStructure } from './arrow-verify.ts';
import { META_PREFIX } from './metadata.ts';

/** Magic bytes at both ends of an Arrow IPC file ("ARROW1"). */
const MAGIC = new TextEncoder().encode('ARROW1');
/** Smallest possible Arrow IPC file: magic + padding + footer length + magic. */
const MIN_FILE_BYTES = 8 + 4 + 6;

/** What kind of values a required column must hold. */
export type ColumnKind = 'number' | 'string' | 'bool' | 'any';

/** A column that must be present: its name, or its name and the kind of its values. */
export type ColumnRequirement = string | { name: string; kind: ColumnKind };

/** Largest table file read whole into memory by default (bigger ones are refused, not attempted). */
export const MAX_TABLE_BYTES = 2 ** 31 - 1;

function bytesEqual(a: Uint8Array, offset: number, b: Uint8Array): boolean {
  for (let i = 0; i < b.length; i++) if (a[offset + i] !== b[i]) return false;
  return true;
}

/** Reads a file's bytes; a missing, unreadable or oversized file is an InputError. */
function readBytes(path: string, maxBytes: number): Uint8Array {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError(path, '', 'an Arrow table file', 'no such file');
    if (code === 'EACCES' || code === 'EPERM') throw new InputError(path, '', 'a readable Arrow table file', 'no permission to read it');
    if (code === 'EISDIR') throw new InputError(path, '', 'an Arrow table file', 'a folder');
    throw e;
  }
  try {
    const info = fstatSync(fd);
    if (info.isDirectory()) throw new InputError(path, '', 'an Arrow table file', 'a folder');
    if (info.size > maxBytes) throw new InputError(path, '', `an Arrow table file of at most ${maxBytes} bytes`, `${info.size} bytes`);
    const bytes = new Uint8Array(info.size);
    let off = 0;
    while (off < bytes.length) {
      const n = readSync(fd, bytes, off, bytes.length - off, off);
      if (n === 0) break;
      off += n;
    }
    return off === bytes.length ? bytes : bytes.subarray(0, off);
  } catch (e) {
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'EISDIR') throw new InputError(path, '', 'an Arrow table file', 'a folder');
    throw e;
  } finally {
    closeSync(fd);
  }
}

function kindOf(typeId: Type): ColumnKind {
  switch (typeId) {
    case Type.Float: case Type.Int: case Type.Decimal: return 'number';
    case Type.Utf8: case Type.LargeUtf8: case Type.Dictionary: return 'string';
    case Type.Bool: return 'bool';
    default: return 'any';
  }
}

/**
 * Parses Arrow IPC file bytes into a Table; the bytes must be a complete Arrow *file* (magic at
 * both ends), not a stream or a truncated file. `path` names the file in messages.
 */
export function tableFromArrowBytes(bytes: Uint8Array, path: string): Table {
  if (bytes.length === 0) throw new InputError(path, '', 'an Arrow table file', 'an empty file (0 bytes)');
  if (!bytesEqual(bytes, 0, MAGIC)) {
    throw new InputError(path, '', 'an Arrow table file (starting with "ARROW1")', 'a file in another format');
  }
  if (bytes.length < MIN_FILE_BYTES || !bytesEqual(bytes, bytes.length - MAGIC.length, MAGIC)) {
    throw new InputError(path, '', 'a complete Arrow table file', `a truncated file (${bytes.length} bytes, no closing footer)`);
  }
  // bounds on every count and offset before apache-arrow trusts them (a damaged length would hang it)
  verifyArrowBytes(path, bytes);
  let table: Table;
  try {
    table = tableFromIPC(bytes);
    // touch every batch so a damaged body fails here, not later in the caller
    for (const batch of table.batches) void batch.numRows;
  } catch (e) {
    const reason = e instanceof Error ? e.message.split('\n')[0]! : String(e);
    throw new InputError(path, '', 'a readable Arrow table file', `a damaged file (${reason.slice(0, 120)})`);
  }
  return table;
}

/** Checks the schema of a table against the expected table name and columns (InputError otherwise). */
function checkSchema(path: string, schema: Schema, expectedTable: string, requiredColumns: readonly ColumnRequirement[]): void {
  if (expectedTable !== '') {
    const found = schema.metadata.get(`${META_PREFIX}table`);
    if (found !== expectedTable) {
      throw new InputError(path, '', `a singleshot ${expectedTable} table`,
        found === undefined ? 'an Arrow file without singleshot metadata' : `a ${JSON.stringify(found).slice(0, 40)} table`);
    }
  }
  for (const req of requiredColumns) {
    const { name, kind } = typeof req === 'string' ? { name: req, kind: 'any' as const } : req;
    const field = schema.fields.find((f) => f.name === name);
    if (!field) throw new InputError(path, name, `a column "${name}"`, 'no such column');
    if (kind !== 'any') {
      const actual = kindOf(field.type.typeId);
      if (actual !== kind) throw new InputError(path, name, `a column of ${kind} values`, `${String(field.type)} values`);
    }
  }
}

/**
 * Checks a (possibly huge) table file without reading it whole, for commands that stream it:
 * both magic markers, a readable schema with the expected table name and columns. Damage in the
 * middle of the body shows only when the batches are read.
 */
export async function checkArrowFile(path: string, expectedTable: string, requiredColumns: readonly ColumnRequirement[] = []): Promise<Schema> {
  let handle;
  try {
    handle = await open(path, 'r');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError(path, '', 'an Arrow table file', 'no such file');
    if (code === 'EACCES' || code === 'EPERM') throw new InputError(path, '', 'a readable Arrow table file', 'no permission to read it');
    throw e;
  }
  try {
    const { size } = await handle.stat();
    if (size === 0) throw new InputError(path, '', 'an Arrow table file', 'an empty file (0 bytes)');
    const head = new Uint8Array(MAGIC.length);
    const tail = new Uint8Array(MAGIC.length);
    await handle.read(head, 0, head.length, 0);
    await handle.read(tail, 0, tail.length, Math.max(0, size - MAGIC.length));
    if (!bytesEqual(head, 0, MAGIC)) throw new InputError(path, '', 'an Arrow table file (starting with "ARROW1")', 'a file in another format');
    if (size < MIN_FILE_BYTES || !bytesEqual(tail, 0, MAGIC)) {
      throw new InputError(path, '', 'a complete Arrow table file', `a truncated file (${size} bytes, no closing footer)`);
    }
    verifyArrowStructure(path, (offset, length) => {
      const buffer = new Uint8Array(length);
      readSync(handle.fd, buffer, 0, length, offset);
      return buffer;
    }, size);
    let schema: Schema;
    try {
      const reader = await RecordBatchReader.from(handle);
      await reader.open();
      schema = reader.schema;
    } catch (e) {
      const reason = e instanceof Error ? e.message.split('\n')[0]! : String(e);
      throw new InputError(path, '', 'a readable Arrow table file', `a damaged file (${reason.slice(0, 120)})`);
    }
    checkSchema(path, schema, expectedTable, requiredColumns);
    return schema;
  } finally {
    await handle.close();
  }
}

/**
 * Reads one of singleshot's tables: `expectedTable` is its `singleshot.table` metadata
 * ("shots", "summary", "budget", …; '' accepts any Arrow file) and `requiredColumns` the
 * columns the caller reads. Any problem is an InputError naming the file, and the column
 * (as the key path) when one is missing or of the wrong kind.
 */
export function readArrowFile(
  path: string, expectedTable: string, requiredColumns: readonly ColumnRequirement[] = [],
  maxBytes = MAX_TABLE_BYTES,
): Table {
  const table = tableFromArrowBytes(readBytes(path, maxBytes), path);
  checkSchema(path, table.schema, expectedTable, requiredColumns);
  return table;
}

/** The `singleshot.*` schema metadata of a table as a plain object (prefix removed). */
export function singleshotMetadata(table: Table): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of table.schema.metadata) if (k.startsWith(META_PREFIX)) out[k.slice(META_PREFIX.length)] = v;
  return out;
}
