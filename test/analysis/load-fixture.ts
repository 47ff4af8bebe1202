/** Reads a committed reference fixture from test/fixtures (made by test/fixtures/make-*.py). */
import { readFileSync } from 'node:fs';

/** Parse test/fixtures/<name>.json; the caller states the shape it expects. */
export function loadFixture<T>(name: string): T {
  const url = new URL(`../fixtures/${name}.json`, import.meta.url);
  return JSON.parse(readFileSync(url, 'utf8')) as T;
}

/** Relative difference |actual − expected| / |expected| (absolute when expected is 0). */
export function relativeError(actual: number, expected: number): number {
  const diff = Math.abs(actual - expected);
  return expected === 0 ? diff : diff / Math.abs(expected);
}

/** A one-line description of a comparison for failure messages. */
export function mismatch(input: string, actual: number, expected: number, tolerance: number): string {
  return `${input}: actual ${actual}, expected ${expected}, rel.err ${relativeError(actual, expected).toExponential(2)}, tol ${tolerance}`;
}
