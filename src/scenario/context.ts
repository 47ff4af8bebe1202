/**
 * What a section resolver needs besides its own part of the document: the file name for
 * messages, the raw document (to quote what was found), the state names once known, and
 * the list that collects warnings.
 */
import { describeFound, InputError } from '../errors.ts';
import { didYouMean } from './suggest.ts';
import { formatPath, valueAt, type KeyPath } from './issues.ts';

/** Shared state of one resolution: file, raw document, state names, warnings. */
export class ResolveContext {
  /** One line each: `FILE: key.path: text`. */
  readonly warnings: string[] = [];
  /** State names in file order, set by the states section. */
  stateNames: string[] = [];

  constructor(
    readonly file: string,
    readonly raw: unknown,
  ) {}

  /** How the raw value at `path` reads in a message. */
  found(path: KeyPath): string {
    return describeFound(valueAt(this.raw, path));
  }

  /** Throws the InputError for `path`; `found` defaults to the raw value there. */
  fail(path: KeyPath, expected: string, found?: string): never {
    throw new InputError(this.file, formatPath(path), expected, found ?? this.found(path));
  }

  /** Records a warning about `path`. */
  warn(path: KeyPath, text: string): void {
    this.warnings.push(`${this.file}: ${formatPath(path)}: ${text}`);
  }

  /** Index of the state called `name`; an error at `path` (with a suggestion) if there is none. */
  stateIndex(name: string, path: KeyPath, found?: string): number {
    const i = this.stateNames.indexOf(name);
    if (i < 0) {
      const names = this.stateNames.map((n) => `"${n}"`).join(', ');
      this.fail(path, `the name of a state (${names})${didYouMean(name, this.stateNames)}`, found !== undefined && found.length <= 60 ? found : describeFound(name));
    }
    return i;
  }
}
