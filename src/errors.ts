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

/**
 * A problem a stage finds with the scenario it runs (no calibration shot of an outcome, no noise
 * for a classifier that divides by it, a value the arithmetic cannot hold): the key path the user
 * must change and what was expected. The stage knows no file; the use case turns it into the
 * InputError naming the scenario file and the point (`toInputError`).
 */
export class ScenarioProblem extends Error {
  /** The sweep point it happened at, when the run knows it. */
  point: number | null = null;

  constructor(readonly path: readonly (string | number)[], readonly expected: string, readonly found?: string) {
    super(`${path.join('.')}: expected ${expected}${found === undefined ? '' : `, found ${found}`}`);
    this.name = 'ScenarioProblem';
  }

  /** The same problem found at pipeline `index` of a point (paths relative to the pipeline get its key). */
  inPipeline(index: number): ScenarioProblem {
    const p = new ScenarioProblem(['pipelines', index, ...this.path], this.expected, this.found);
    p.point = this.point;
    return p;
  }

  /**
   * The InputError for `file`: `pipelines[i]` becomes `processing` when the document writes its
   * one pipeline that way (`hasPipelines` false); the point is named when there are several.
   */
  toInputError(file: string, hasPipelines: boolean, points: number): InputError {
    const path = !hasPipelines && this.path[0] === 'pipelines' ? ['processing', ...this.path.slice(2)] : [...this.path];
    const text = path.map((k, i) => (typeof k === 'number' ? `[${k}]` : i === 0 ? k : `.${k}`)).join('');
    const e = new InputError(file, text, this.expected, this.found);
    // the point it happened at, after the rest (like a sweep point's validation error)
    if (this.point !== null && points > 1) e.message += ` (at sweep point ${this.point})`;
    return e;
  }
}
