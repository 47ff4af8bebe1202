/**
 * The structure of tallies.json, checked whole before a merge uses it (tallies.ts reads it): every
 * point with its index, batch range, calibrations, tally-tree nodes and paired counts, every count
 * a whole number ≥ 0, every moment finite, every array of the length its point needs. A problem
 * is one InputError naming the key path.
 */
import { InputError, describeFound } from '../errors.ts';
import { CAUSES } from '../analysis/causes.ts';

type Path = string;

function fail(file: string, path: Path, expected: string, found: unknown): never {
  throw new InputError(file, path, expected, describeFound(found));
}

function object(file: string, path: Path, v: unknown): Record<string, unknown> {
  if (v === null || typeof v !== 'object' || Array.isArray(v) || ArrayBuffer.isView(v)) fail(file, path, 'an object', v);
  return v as Record<string, unknown>;
}

function list(file: string, path: Path, v: unknown): unknown[] {
  if (!Array.isArray(v)) fail(file, path, 'a list', v);
  return v as unknown[];
}

function count(file: string, path: Path, v: unknown): number {
  if (typeof v !== 'number' || !Number.isInteger(v) || v < 0 || v > Number.MAX_SAFE_INTEGER) fail(file, path, 'a whole number ≥ 0', v);
  return v as number;
}

function finite(file: string, path: Path, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) fail(file, path, 'a finite number', v);
  return v as number;
}

/** A typed array of `length` counts (whole numbers ≥ 0). */
function counts(file: string, path: Path, v: unknown, length: number): void {
  if (!(v instanceof Float64Array) || v.length !== length) fail(file, path, `a list of ${length} counts`, v);
  (v as Float64Array).forEach((x, i) => count(file, `${path}[${i}]`, x));
}

/** Checks one tally (states × outcomes, moments of each state). */
function checkTally(file: string, path: Path, v: unknown): { states: number; outcomes: number } {
  const t = object(file, path, v);
  const states = count(file, `${path}.states`, t.states), outcomes = count(file, `${path}.outcomes`, t.outcomes);
  if (states < 2 || states > 64 || outcomes !== 2) fail(file, `${path}.states`, '2 to 64 states and 2 outcomes', `${states} and ${outcomes}`);
  counts(file, `${path}.assignments`, t.assignments, states * outcomes);
  counts(file, `${path}.causes`, t.causes, states * CAUSES.length);
  counts(file, `${path}.discarded`, t.discarded, states);
  counts(file, `${path}.discardedWrong`, t.discardedWrong, states);
  const clean = list(file, `${path}.clean`, t.clean);
  if (clean.length !== states) fail(file, `${path}.clean`, `moments of each of the ${states} states`, clean);
  clean.forEach((m, i) => {
    const o = object(file, `${path}.clean[${i}]`, m);
    count(file, `${path}.clean[${i}].n`, o.n);
    finite(file, `${path}.clean[${i}].mean`, o.mean);
    if (finite(file, `${path}.clean[${i}].m2`, o.m2) < 0) fail(file, `${path}.clean[${i}].m2`, 'a sum of squares ≥ 0', o.m2);
  });
  return { states, outcomes };
}

/** Checks one point's calibration of one pipeline (what merge rebuilds the point from). */
function checkCalibration(file: string, path: Path, v: unknown): void {
  const c = object(file, path, v);
  const axis = object(file, `${path}.axis`, c.axis);
  const cos = finite(file, `${path}.axis.cos`, axis.cos), sin = finite(file, `${path}.axis.sin`, axis.sin);
  if (Math.abs(Math.hypot(cos, sin) - 1) > 1e-9) fail(file, `${path}.axis`, 'a unit vector {cos, sin}', `length ${Math.hypot(cos, sin)}`);
  const rule = object(file, `${path}.rule`, c.rule);
  if (typeof rule.threshold !== 'number' || Number.isNaN(rule.threshold)) fail(file, `${path}.rule.threshold`, 'a number (±∞ allowed)', rule.threshold);
  if (typeof rule.highIsOne !== 'boolean') fail(file, `${path}.rule.highIsOne`, 'true or false', rule.highIsOne);
  const means = list(file, `${path}.outcomeMeans`, c.outcomeMeans);
  if (means.length !== 2 || means.some((x) => typeof x !== 'number')) fail(file, `${path}.outcomeMeans`, 'two numbers', means);
  if (c.weights !== null && !(c.weights instanceof Float64Array && c.weights.every(Number.isFinite))) fail(file, `${path}.weights`, 'null or a list of finite weights', c.weights);
  if (finite(file, `${path}.bandHalfWidth`, c.bandHalfWidth) < 0) fail(file, `${path}.bandHalfWidth`, 'a half-width ≥ 0', c.bandHalfWidth);
}

/**
 * Checks the whole structure of decoded tallies (see the file comment); `countKeys` are the
 * per-point counts a run may save (tallies.ts SUMMED_POINT_COUNTS).
 */
export function checkTallies(file: string, v: unknown, countKeys: readonly string[]): void {
  const t = object(file, '', v);
  for (const k of ['version', 'engine', 'scenario']) if (typeof t[k] !== 'string') fail(file, k, 'a string', t[k]);
  count(file, 'seed', t.seed);
  const points = list(file, 'points', t.points);
  let lastIndex = -1;
  points.forEach((pv, k) => {
    const at = `points[${k}]`;
    const p = object(file, at, pv);
    const index = count(file, `${at}.index`, p.index);
    if (index <= lastIndex) fail(file, `${at}.index`, `a point after point ${lastIndex}`, index);
    lastIndex = index;
    const batches = list(file, `${at}.batches`, p.batches);
    if (batches.length !== 2) fail(file, `${at}.batches`, 'a range [first, end)', batches);
    if (count(file, `${at}.batches[0]`, batches[0]) > count(file, `${at}.batches[1]`, batches[1])) fail(file, `${at}.batches`, 'first ≤ end', batches);
    const calibrations = list(file, `${at}.calibrations`, p.calibrations);
    calibrations.forEach((c, i) => checkCalibration(file, `${at}.calibrations[${i}]`, c));
    const stacks = list(file, `${at}.stacks`, p.stacks);
    if (stacks.length !== calibrations.length || stacks.length === 0) fail(file, `${at}.stacks`, `one stack per pipeline (${calibrations.length})`, stacks);
    stacks.forEach((st, i) => list(file, `${at}.stacks[${i}]`, st).forEach((nv, j) => {
      const np = `${at}.stacks[${i}][${j}]`;
      const node = object(file, np, nv);
      if (count(file, `${np}.level`, node.level) > 52) fail(file, `${np}.level`, 'a level ≤ 52', node.level);
      count(file, `${np}.index`, node.index);
      checkTally(file, `${np}.tally`, node.tally);
    }));
    const pairs = list(file, `${at}.pairs`, p.pairs);
    const n = stacks.length;
    if (pairs.length !== (n * (n - 1)) / 2) fail(file, `${at}.pairs`, `one entry per pair of the ${n} pipelines`, pairs);
    pairs.forEach((pv2, i) => {
      const pp = object(file, `${at}.pairs[${i}]`, pv2);
      const a = count(file, `${at}.pairs[${i}].a`, pp.a), b = count(file, `${at}.pairs[${i}].b`, pp.b);
      if (!(a < b && b < n)) fail(file, `${at}.pairs[${i}]`, `a pair a < b < ${n}`, `${a}, ${b}`);
      const c = object(file, `${at}.pairs[${i}].counts`, pp.counts);
      for (const key of ['bothWrong', 'onlyAWrong', 'onlyBWrong', 'n']) count(file, `${at}.pairs[${i}].counts.${key}`, c[key]);
    });
    const extra = object(file, `${at}.counts`, p.counts);
    for (const [key, x] of Object.entries(extra)) {
      if (!countKeys.includes(key)) fail(file, `${at}.counts.${key}`, `one of the counts ${countKeys.join(', ')}`, key);
      count(file, `${at}.counts.${key}`, x);
    }
  });
}
