/**
 * From zod issues and key paths to one-line `InputError`s: `FILE: key.path: expected …, found …`.
 */
import type { z } from 'zod';
import { describeFound, InputError, inputErrorOf } from '../errors.ts';

/** A key path inside a document: keys and list indices. */
export type KeyPath = readonly (string | number | symbol)[];

const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_-]*$/;

/** Formats a key path the way messages show it: `states[1].level`, `prepare["two words"]`. */
export function formatPath(path: KeyPath): string {
  let out = '';
  for (const part of path) {
    if (typeof part === 'number') out += `[${part}]`;
    else if (typeof part === 'string' && IDENTIFIER.test(part) && part.length <= 40) out += out ? `.${part}` : part;
    else {
      // a key can be any length; a message names it by its first 40 characters
      const key = String(part);
      out += `[${JSON.stringify(key.length > 40 ? `${key.slice(0, 37)}...` : key)}]`;
    }
  }
  return out;
}

/** The value at `path` inside a plain document, or undefined. */
export function valueAt(doc: unknown, path: KeyPath): unknown {
  let node = doc;
  for (const part of path) {
    if (node === null || typeof node !== 'object') return undefined;
    node = (node as Record<string | number | symbol, unknown>)[part as string];
  }
  return node;
}

/** Plain-English names of the types zod reports as expected. */
const TYPE_NAMES: Record<string, string> = {
  string: 'a string',
  number: 'a number',
  int: 'an integer',
  boolean: 'true or false',
  object: 'a mapping',
  record: 'a mapping',
  array: 'a list',
};

/** Message for built-in zod issues that no field gave its own text (used as the parse error map). */
export function fallbackMessage(iss: z.core.$ZodRawIssue): string {
  switch (iss.code) {
    case 'invalid_type':
      return TYPE_NAMES[iss.expected] ?? `a ${iss.expected}`;
    case 'too_small':
      if (iss.origin === 'array') return `a list of at least ${iss.minimum} entries`;
      if (iss.origin === 'string') return 'a non-empty string';
      return `a number ${iss.inclusive ? '≥' : '>'} ${iss.minimum}`;
    case 'too_big':
      if (iss.origin === 'array') return `a list of at most ${iss.maximum} entries`;
      return `a number ${iss.inclusive ? '≤' : '<'} ${iss.maximum}`;
    case 'invalid_value':
      return `one of ${iss.values.map((v) => JSON.stringify(v)).join(', ')}`;
    default:
      return 'a valid value';
  }
}

type Issue = z.core.$ZodIssue & { input?: unknown; params?: { found?: string } };

/** Whether a union branch failed at its very root on type or value (the branch does not apply). */
function isMismatch(iss: Issue): boolean {
  if (iss.path.length > 0) return false;
  if (iss.code === 'invalid_type' || iss.code === 'invalid_value') return true;
  if (iss.code === 'invalid_union') return iss.errors.every((branch) => branch.some((b) => isMismatch(b as Issue)));
  return false;
}

/**
 * Picks the issue to report, descending into the union branch that matched best (no
 * root mismatch, fewest issues); returns it with its full path.
 */
function deepest(iss: Issue, prefix: KeyPath): { issue: Issue; path: KeyPath } {
  const path = [...prefix, ...iss.path];
  if (iss.code !== 'invalid_union') return { issue: iss, path };
  let best: Issue[] | undefined;
  for (const branch of iss.errors as Issue[][]) {
    if (branch.some(isMismatch)) continue;
    if (best === undefined || branch.length < best.length) best = branch;
  }
  if (best === undefined || best.length === 0) return { issue: iss, path };
  return deepest(ordered(best)[0]!, path);
}

/** Unknown keys first (a misspelt key also explains a "missing" one), otherwise zod's order. */
function ordered(issues: Issue[]): Issue[] {
  return [...issues].sort((a, b) => Number(b.code === 'unrecognized_keys') - Number(a.code === 'unrecognized_keys'));
}

/** The InputErrors of one zod issue for `file` (an issue of unknown keys gives one per key). */
function issueErrors(file: string, issue: Issue, path: KeyPath): InputError[] {
  if (issue.code === 'unrecognized_keys') {
    // fields.ts `section` writes one line of message per unknown key
    const lines = issue.message.split('\n');
    return issue.keys.map((key, i) => new InputError(file, formatPath([...path, key]), lines[i] ?? lines[0]!, 'an unknown key'));
  }
  if (issue.params?.found !== undefined) return [new InputError(file, formatPath(path), issue.message, issue.params.found)];
  const found = issue.input === undefined ? 'nothing (the key is required)' : describeFound(issue.input);
  return [new InputError(file, formatPath(path), issue.message, found)];
}

/**
 * Every problem of a failed parse, one InputError each (the same message once). A required key
 * reported missing from a mapping that also has an unknown key is left out: the misspelt key
 * explains it.
 */
export function zodErrorToInputErrors(file: string, error: z.ZodError): InputError[] {
  const found = (error.issues as Issue[]).map((iss) => deepest(iss, []));
  const withUnknown = new Set(found.filter((f) => f.issue.code === 'unrecognized_keys').map((f) => formatPath(f.path)));
  const kept = found.filter((f) => !(f.issue.code !== 'unrecognized_keys' && f.issue.input === undefined && f.path.length > 0 && withUnknown.has(formatPath(f.path.slice(0, -1)))));
  // one value can fail several checks (an integer's range and kind, a range and the magnitude
  // bound): the first says what to change, so one problem per key
  const seen = new Set<string>();
  return kept.flatMap((f) => issueErrors(file, f.issue, f.path)).filter((e) => !seen.has(e.path) && seen.add(e.path));
}

/** The first key of a formatted key path (`states[1].level` → `states`, `["a b"].c` → `a b`). */
function firstKey(path: string): string {
  const m = /^([^.[]+)|^\["((?:[^"\\]|\\.)*)"\]/.exec(path);
  if (!m) return '';
  return m[1] ?? (JSON.parse(`"${m[2]}"`) as string);
}

/** Problems in the order of the document's top-level keys (problems of the whole file first; otherwise as found). */
export function inDocumentOrder(errors: readonly InputError[], doc: unknown): InputError[] {
  const order = doc !== null && typeof doc === 'object' && !Array.isArray(doc) ? Object.keys(doc) : [];
  const rank = (e: InputError) => {
    if (e.path === '') return -1;
    const i = order.indexOf(firstKey(e.path));
    return i < 0 ? order.length : i;
  };
  return errors.map((e, i) => ({ e, i })).sort((a, b) => rank(a.e) - rank(b.e) || a.i - b.i).map((x) => x.e);
}

/** The InputError of a failed parse: every problem, one line each (InputErrors when there are several). */
export function zodErrorToInputError(file: string, error: z.ZodError): InputError {
  return inputErrorOf(zodErrorToInputErrors(file, error));
}
