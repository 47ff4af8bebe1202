/**
 * From zod issues and key paths to one-line `InputError`s: `FILE: key.path: expected …, found …`.
 */
import type { z } from 'zod';
import { describeFound, InputError } from '../errors.ts';

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

/** Turns one zod issue into an InputError for `file`. */
export function issueToInputError(file: string, first: z.core.$ZodIssue): InputError {
  const { issue, path } = deepest(first as Issue, []);
  if (issue.code === 'unrecognized_keys') {
    return new InputError(file, formatPath([...path, issue.keys[0]!]), issue.message, 'an unknown key');
  }
  if (issue.params?.found !== undefined) return new InputError(file, formatPath(path), issue.message, issue.params.found);
  const found = issue.input === undefined ? 'nothing (the key is required)' : describeFound(issue.input);
  return new InputError(file, formatPath(path), issue.message, found);
}

/** The InputError for the first issue of a failed parse (unknown keys reported first). */
export function zodErrorToInputError(file: string, error: z.ZodError): InputError {
  return issueToInputError(file, ordered(error.issues as Issue[])[0]!);
}
