/**
 * An error in something the user gave us (a scenario, a table, an option).
 * The CLI prints `message` as one line and exits with code 2; no stack trace.
 */
export class InputError extends Error {
  /** File (or option) the problem is in. */
  readonly file: string;
  /** Key path inside it, e.g. `states[1].level`; '' when the whole file is at fault. */
  readonly path: string;

  constructor(file: string, path: string, expected: string, found?: string) {
    const where = path ? `${file}: ${path}` : file;
    super(found === undefined ? `${where}: ${expected}` : `${where}: expected ${expected}, found ${found}`);
    this.name = 'InputError';
    this.file = file;
    this.path = path;
  }
}

/** Most problems of one input reported at once; a last line counts the rest. */
export const MAX_REPORTED_ERRORS = 20;

/**
 * Several problems of one input at once: `message` holds one line per problem, each the message
 * of its InputError (`file: key.path: expected …, found …`), at most MAX_REPORTED_ERRORS of them
 * and then a line `file: N more problems not shown`; `file` and `path` are the first problem's.
 */
export class InputErrors extends InputError {
  readonly errors: readonly InputError[];

  constructor(list: readonly InputError[]) {
    const errors = flatten(list);
    const first = errors[0]!;
    super(first.file, first.path, '');
    this.name = 'InputErrors';
    this.errors = errors;
    const lines = errors.slice(0, MAX_REPORTED_ERRORS).map((e) => e.message);
    const more = errors.length - MAX_REPORTED_ERRORS;
    if (more > 0) lines.push(`${first.file}: ${more} more problem${more === 1 ? '' : 's'} not shown`);
    this.message = lines.join('\n');
  }
}

function flatten(errors: readonly InputError[]): InputError[] {
  return errors.flatMap((e) => (e instanceof InputErrors ? e.errors : [e]));
}

/** The error to throw for a non-empty list of problems: the one problem itself, or all of them. */
export function inputErrorOf(errors: readonly InputError[]): InputError {
  const all = flatten(errors);
  return all.length === 1 ? all[0]! : new InputErrors(all);
}

/** Short, safe description of a found value for error messages. */
export function describeFound(value: unknown): string {
  if (value === undefined) return 'nothing';
  if (value === null) return 'null';
  if (typeof value === 'string') return JSON.stringify(value.length > 40 ? value.slice(0, 37) + '...' : value);
  if (typeof value === 'number' || typeof value === 'boolean') return String(value);
  if (Array.isArray(value)) return `a list of ${value.length}`;
  if (typeof value === 'object') return 'a mapping';
  return typeof value;
}
