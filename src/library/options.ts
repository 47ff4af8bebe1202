/**
 * Checking a library function's options: one zod strict schema per function, and every problem
 * as one line naming the option — `options.outDir: expected a folder path (string), found
 * number` — an unknown option with the nearest known one. Each schema's `error` texts say what
 * is expected; the found value is described here.
 */
import { z } from 'zod';
import { InputError, describeFound, inputErrorOf } from '../errors.ts';
import { closest } from '../scenario/suggest.ts';
import { formatPath, valueAt, type KeyPath } from '../scenario/issues.ts';

/** The words for what a value is, as a message's "found …". */
function kindOf(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'function') return 'a function';
  if (typeof v === 'object') return Object.getPrototypeOf(v) === Object.prototype ? 'a mapping' : `an object (${(v as object).constructor?.name ?? 'no class'})`;
  return typeof v;
}

/** `options.a.b[2]`: an option's key path as the scenario's messages write key paths. */
function optionName(path: KeyPath): string {
  return formatPath(['options', ...path]);
}

/** The keys the schema knows at `path` (for a suggestion). */
function keysAt(schema: z.ZodType, path: readonly PropertyKey[]): string[] {
  let s: z.ZodType = schema;
  for (const k of [...path, null]) {
    while (s instanceof z.ZodOptional) s = s.unwrap() as z.ZodType;
    if (!(s instanceof z.ZodObject)) return [];
    if (k === null) return Object.keys(s.shape);
    s = (s.shape as Record<string, z.ZodType>)[String(k)] ?? z.never();
  }
  return [];
}

function problems(fn: string, schema: z.ZodType, input: unknown, issue: z.core.$ZodIssue): InputError[] {
  const path = issue.path;
  if (issue.code === 'unrecognized_keys') {
    const known = keysAt(schema, path);
    return issue.keys.map((key) => {
      const near = closest(key, known);
      return new InputError(optionName([...path, key]), '', `unknown option of ${fn}${near === undefined ? ` (its options: ${known.join(', ')})` : ` (did you mean "${near}"?)`}`);
    });
  }
  const value = valueAt(input, path);
  // a value of the right kind but not the right sort (1.5 for a whole number) is shown itself
  const ofKind = issue.code === 'invalid_type' && issue.expected === 'int' && typeof value === 'number';
  const found = (issue.code === 'invalid_type' || issue.code === 'invalid_union') && !ofKind ? kindOf(value) : describeFound(value);
  return [new InputError(optionName(path), '', issue.message, found)];
}

/**
 * The options of `fn` checked against `schema`: the parsed options, or an InputError with one
 * line per problem.
 */
export function readOptions<T>(fn: string, schema: z.ZodType<T>, input: unknown): T {
  if (input === null || typeof input !== 'object' || Array.isArray(input)) {
    throw new InputError('options', '', `one options object for ${fn}`, kindOf(input));
  }
  const r = schema.safeParse(input);
  if (r.success) return r.data;
  throw inputErrorOf(r.error.issues.flatMap((i) => problems(fn, schema, input, i)));
}

/** What an issue's message says is expected: the schema's own `error` text. */
const expect = (text: string) => ({ error: text });

/** A path of a file or folder: a string (what it names is the use case's to check, as for the CLI). */
export function pathText(what: string) {
  return z.string(expect(what));
}

/** A whole number ≥ `min`. */
export function wholeNumber(min: number) {
  const what = `a whole number ≥ ${min}`;
  return z.number(expect(what)).int(expect(what)).min(min, expect(what));
}

/** A finite number above 0 (at least 0 with `zero`), in the unit `unit`. */
export function positiveQuantity(unit: string, zero = false) {
  const what = `a number of ${unit} ${zero ? '≥ 0' : '> 0'}`;
  const n = z.number(expect(what)).refine(Number.isFinite, expect(what));
  return zero ? n.refine((x) => x >= 0, expect(what)) : n.refine((x) => x > 0, expect(what));
}

/** A flag. */
export function flag() {
  return z.boolean(expect('true or false'));
}

/** One of a few words. */
export function choice<const W extends readonly [string, ...string[]]>(words: W) {
  return z.enum(words, expect(`one of ${words.map((w) => JSON.stringify(w)).join(', ')}`));
}

/** A callback (checked to be a function; its arguments are the caller's business). */
export function callback<F extends (...args: never[]) => unknown>(what: string) {
  return z.custom<F>((v) => typeof v === 'function', expect(`a function (${what})`));
}

/** An AbortSignal. */
export function abortSignal() {
  return z.custom<AbortSignal>((v) => v instanceof AbortSignal, expect('an AbortSignal (e.g. new AbortController().signal)'));
}
