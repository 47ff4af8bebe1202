/** Test helpers for test/dsp: fixture loading, a seeded xorshift source, and tolerance checks. */
import { readFileSync } from 'node:fs';
import { expect } from 'vitest';
import type { ComplexSeries } from '../../src/dsp/complex-response.ts';

/** Reads test/fixtures/<name>.json. */
export function loadFixture<T>(name: string): T {
  return JSON.parse(readFileSync(new URL(`../fixtures/${name}.json`, import.meta.url), 'utf8')) as T;
}

/** A complex series as written by the fixture scripts. */
export interface FixtureComplex {
  re: number[];
  im: number[];
}

/**
 * Uniform numbers in [−1, 1) from Marsaglia's xorshift32 (Marsaglia, J. Stat. Softw. 8(14), 2003),
 * shifts (13, 17, 5). Test-only: library code gets its randomness injected.
 */
export function xorshiftRecord(seed: number, length: number): Float64Array {
  let s = seed >>> 0 || 1;
  const out = new Float64Array(length);
  for (let i = 0; i < length; i++) {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    out[i] = s / 2147483648 - 1;
  }
  return out;
}

/**
 * Asserts |actual[i] − expected[i]| ≤ tol(i) for every i; on failure names the worst index with
 * input label, actual, expected, Δ and tolerance.
 */
export function expectAllClose(
  label: string,
  actual: ArrayLike<number>,
  expected: ArrayLike<number>,
  tol: (i: number) => number,
): void {
  expect(actual.length, `${label}: length`).toBe(expected.length);
  let worst = -1;
  let worstRatio = 0;
  for (let i = 0; i < expected.length; i++) {
    const delta = Math.abs(actual[i] - expected[i]);
    const ratio = excess(delta, tol(i));
    if (!(ratio <= 1) && (worst < 0 || !(ratio <= worstRatio))) {
      worst = i;
      worstRatio = ratio;
    }
  }
  const detail =
    worst < 0
      ? ''
      : `${label}[${worst}]: actual ${actual[worst]}, expected ${expected[worst]}, ` +
        `Δ ${Math.abs(actual[worst] - expected[worst])}, tol ${tol(worst)}`;
  expect(worst, detail).toBe(-1);
}

/** Asserts |actual − expected| ≤ tol for complex series, relative to |expected[i]| plus `floor`. */
export function expectComplexClose(
  label: string,
  actual: ComplexSeries,
  expected: FixtureComplex | ComplexSeries,
  relative: number,
  floor = 0,
): void {
  expect(actual.re.length, `${label}: length`).toBe(expected.re.length);
  let worst = -1;
  let worstRatio = 0;
  for (let i = 0; i < expected.re.length; i++) {
    const delta = Math.hypot(actual.re[i] - expected.re[i], actual.im[i] - expected.im[i]);
    const tol = relative * Math.hypot(expected.re[i], expected.im[i]) + floor;
    const ratio = excess(delta, tol);
    if (!(ratio <= 1) && (worst < 0 || !(ratio <= worstRatio))) {
      worst = i;
      worstRatio = ratio;
    }
  }
  const detail =
    worst < 0
      ? ''
      : `${label}[${worst}]: actual ${actual.re[worst]}${sign(actual.im[worst])}j, ` +
        `expected ${expected.re[worst]}${sign(expected.im[worst])}j, Δ/tol ${worstRatio}`;
  expect(worst, detail).toBe(-1);
}

/** Δ/tol, with 0/0 = 0 (exact match at zero tolerance) and NaN Δ = ∞. */
function excess(delta: number, tol: number): number {
  if (Number.isNaN(delta)) return Infinity;
  if (delta === 0) return 0;
  return delta / tol;
}

function sign(x: number): string {
  return x < 0 ? `${x}` : `+${x}`;
}

/** Filters `input` in consecutive chunks of the given lengths (cycled) with one carried state. */
export function filterInChunks(
  apply: (input: Float64Array, output: Float64Array, state: Float64Array) => Float64Array,
  input: Float64Array,
  state: Float64Array,
  chunkLengths: readonly number[],
): Float64Array {
  const output = new Float64Array(input.length);
  let start = 0;
  for (let c = 0; start < input.length; c++) {
    const end = Math.min(input.length, start + chunkLengths[c % chunkLengths.length]);
    apply(input.subarray(start, end), output.subarray(start, end), state);
    start = end;
  }
  return output;
}

/** Amplitude (2/N)·|Σ x[n]·e^{−j2πfn/fs}| of a tone at `f` in `x`, by a direct DFT at that one frequency. */
export function toneAmplitude(x: Float64Array, f: number, sampleRate: number): number {
  let re = 0;
  let im = 0;
  for (let n = 0; n < x.length; n++) {
    const phase = (2 * Math.PI * f * n) / sampleRate;
    re += x[n] * Math.cos(phase);
    im -= x[n] * Math.sin(phase);
  }
  return (2 * Math.hypot(re, im)) / x.length;
}
