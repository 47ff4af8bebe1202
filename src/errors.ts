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
