/**
 * Checks on the values of a table the tool reads back: row counts, ranges (probabilities in
 * [0, 1]), finite numbers (null only where the table documents it), unique row ids, and the
 * schema metadata that says how the table was made. Each failure is one InputError naming the
 * file and the column (as the key path) and the row.
 */
import type { Schema, Table } from 'apache-arrow';
import { InputError } from '../errors.ts';
import { META_PREFIX } from './metadata.ts';

/** Bounds of a numeric column; `nullable`: null (a documented non-finite value) is allowed. */
export interface ValueRule {
  min?: number;
  max?: number;
  nullable?: boolean;
  integer?: boolean;
}

/** A probability column: in [0, 1], null where documented. */
export const PROBABILITY: ValueRule = { min: 0, max: 1, nullable: true };
/** A count column: a whole number ≥ 0. */
export const COUNT: ValueRule = { min: 0, integer: true };

/** Throws unless the table has `expected` rows. */
export function checkRowCount(path: string, table: Table, expected: number, why: string): void {
  if (table.numRows !== expected) throw new InputError(path, '', `${expected} rows (${why})`, `${table.numRows}`);
}

/** The values of column `name` as numbers (null stays null). */
export function numberColumn(path: string, table: Table, name: string): (number | null)[] {
  const c = table.getChild(name);
  if (!c) throw new InputError(path, name, `a column "${name}"`, 'no such column');
  return Array.from(c, (v: unknown) => (v === null || v === undefined ? null : Number(v)));
}

/** Throws at the first value of column `name` that breaks `rule`. */
export function checkValues(path: string, table: Table, name: string, rule: ValueRule): void {
  const values = numberColumn(path, table, name);
  values.forEach((v, row) => {
    const at = `${name}[${row}]`;
    if (v === null) {
      if (!rule.nullable) throw new InputError(path, at, 'a value', 'null');
      return;
    }
    if (!Number.isFinite(v)) throw new InputError(path, at, 'a finite number', String(v));
    if (rule.integer && !Number.isInteger(v)) throw new InputError(path, at, 'a whole number', String(v));
    if ((rule.min !== undefined && v < rule.min) || (rule.max !== undefined && v > rule.max)) {
      const range = rule.min !== undefined && rule.max !== undefined ? `in [${rule.min}, ${rule.max}]` : rule.min !== undefined ? `≥ ${rule.min}` : `≤ ${rule.max}`;
      throw new InputError(path, at, `a value ${range}`, String(v));
    }
  });
}

/** Throws at the first row whose key (the values of `columns`) repeats an earlier one. */
export function checkUniqueRows(path: string, table: Table, columns: readonly string[]): void {
  const keyColumns = columns.map((c) => {
    const v = table.getChild(c);
    if (!v) throw new InputError(path, c, `a column "${c}"`, 'no such column');
    return v;
  });
  const seen = new Map<string, number>();
  for (let row = 0; row < table.numRows; row++) {
    const key = JSON.stringify(keyColumns.map((c) => String(c.get(row))));
    const first = seen.get(key);
    if (first !== undefined) throw new InputError(path, `row ${row}`, `one row per ${columns.join(' and ')} (row ${first} has the same)`, key);
    seen.set(key, row);
  }
}

/**
 * Throws unless the schema's singleshot metadata has each of `expected`'s values, which come from
 * `source` (run.json, named in the message: either file may be the damaged one).
 */
export function checkMetadata(path: string, schema: Schema, expected: Readonly<Record<string, string | undefined>>, source: string): void {
  for (const [key, want] of Object.entries(expected)) {
    if (want === undefined) continue;
    const found = schema.metadata.get(`${META_PREFIX}${key}`);
    if (found !== want) {
      const shown = found === undefined ? 'none' : found.length > 40 ? `${JSON.stringify(found.slice(0, 37))}…` : JSON.stringify(found);
      throw new InputError(path, `metadata ${META_PREFIX}${key}`, `${want.length > 40 ? 'the value' : JSON.stringify(want)} that ${source} records`, shown);
    }
  }
}
