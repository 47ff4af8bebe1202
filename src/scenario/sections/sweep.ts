/**
 * Sweep section: scenario values to vary, each by its key path, as a list of values or a
 * range; several of them form a grid, or are zipped (taken in step) with `combine: zip`.
 *
 *   sweep:
 *     combine: grid                       # grid (default) | zip
 *     vary:
 *       - key: timing.window.length
 *         values: ["2 us", "4 us", "8 us"]
 *       - key: transitions[0].lifetime
 *         range: { from: 200 us, to: 2 ms, count: 4, spacing: log }
 *
 * This file checks the section against the rest of the document (the key exists and holds a
 * number or a quantity, the values share its dimension); `plan/sweep.ts` makes the points.
 */
import { z } from 'zod';
import type { SweepAxis, SweepSpec } from '../types.ts';
import { integer, oneOf, section } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import { formatPath, type KeyPath } from '../issues.ts';
import { frequencyAsEnergy, parseQuantity, sameDimension, UnitSyntaxError, type Dimension } from '../units.ts';

/** Most sweep points a run may have (the seeding gives each point its own stream). */
export const MAX_SWEEP_POINTS = 10_000;

/** Scenario keys that hold integers a sweep may set but never refine continuously. */
const INTEGER_KEYS = new Set(['seed', 'shots', 'calibrationShots', 'batchSize']);

/** Column names the summary and budget tables already use; a swept column avoids them. */
const RESERVED_COLUMNS = new Set([
  'point', 'pipeline', 'shots', 'state', 'cause', 'errors', 'agrees', 'analytic', 'analytic_alone', 'simulated', 'low',
  'high', 'mean_error', 'mean_error_low', 'mean_error_high', 'analytic_mean_error', 'analytic_linear_sum', 'snr',
  'analytic_snr', 'sigma', 'analytic_sigma', 'threshold', 'axis_angle', 'discard_fraction', 'agreement',
]);

const value = z.union([z.number(), z.string()], { error: () => 'a number or a quantity with a unit (e.g. "2 us")' });

const rangeSchema = section({
  from: value.meta({ description: 'First value of the range' }),
  to: value.meta({ description: 'Last value of the range' }),
  count: integer(2, MAX_SWEEP_POINTS).meta({ description: 'Number of values, ends included (at least 2)' }),
  spacing: oneOf(['linear', 'log']).optional().meta({ description: 'linear (default) or log (equal ratios; both ends > 0)' }),
});

const axisSchema = section({
  key: z
    .string({ error: () => 'a key path such as "timing.window.length" or "transitions[0].lifetime"' })
    .min(1, { error: () => 'a key path such as "timing.window.length" or "transitions[0].lifetime"' })
    .meta({ description: 'Key path of the scenario value to vary, e.g. timing.window.length or transitions[0].lifetime' }),
  values: z
    .array(value, { error: () => 'a list of values' })
    .min(1, { error: () => 'a list of at least 1 value' })
    .optional()
    .meta({ description: 'The values, each a number (SI) or a quantity with a unit' }),
  range: rangeSchema.optional().meta({ description: 'Evenly spaced values {from, to, count, spacing}' }),
});

const sweepSchema = section({
  combine: oneOf(['grid', 'zip'])
    .optional()
    .meta({ description: 'grid (default): every combination; zip: the i-th values of every entry together' }),
  vary: z
    .array(axisSchema, { error: () => 'a list of {key, values} or {key, range}' })
    .min(1, { error: () => 'a list of at least 1 entry' })
    .meta({ description: 'The values to vary, each by its key path' }),
})
  .optional()
  .meta({ description: 'Sweep: scenario values to vary; every combination (or the zipped list) is one point' });

/** Top-level keys of the sweep section. */
export const sweepShape = { sweep: sweepSchema };

/** Validated sweep keys. */
export type SweepDoc = z.output<typeof sweepSchema>;

/**
 * Reads a key path as written in a sweep: `a.b[2].c`, `prepare["two words"]`. Returns null
 * when the text is not a key path.
 */
export function parseKeyPath(text: string): (string | number)[] | null {
  const out: (string | number)[] = [];
  const re = /^(?:\.?([A-Za-z_][A-Za-z0-9_-]*)|\[(\d+)\]|\[("(?:[^"\\]|\\.)*")\])/;
  let rest = text.trim();
  let first = true;
  while (rest.length > 0) {
    const m = re.exec(rest);
    if (!m || (first && rest.startsWith('.'))) return null;
    if (m[1] !== undefined) out.push(m[1]);
    else if (m[2] !== undefined) out.push(Number(m[2]));
    else out.push(JSON.parse(m[3]!) as string);
    rest = rest.slice(m[0].length);
    first = false;
  }
  return out.length > 0 ? out : null;
}

/** A column name from a key path: letters, digits and '_' only (`transitions[0].lifetime` → `transitions_0_lifetime`). */
export function columnName(path: readonly (string | number)[]): string {
  const joined = path.map(String).join('_').replace(/[^A-Za-z0-9_]+/g, '_').replace(/_+/g, '_').replace(/^_|_$/g, '');
  const name = /^[A-Za-z_]/.test(joined) ? joined : `v_${joined}`;
  return RESERVED_COLUMNS.has(name) ? `${name}_swept` : name;
}

/** SI unit symbols of the dimensions scenario keys use (dimension vector over s, A, J, K, rad). */
const SI_UNITS: [Dimension, string][] = [
  [[0, 0, 0, 0, 0], ''],
  [[1, 0, 0, 0, 0], 's'],
  [[-1, 0, 0, 0, 0], 'Hz'],
  [[0, 1, 0, 0, 0], 'A'],
  [[-1, -1, 1, 0, 0], 'V'],
  [[0, 0, 1, 0, 0], 'J'],
  [[0, 0, 0, 1, 0], 'K'],
  [[0, 0, 0, 0, 1], 'rad'],
  [[-1, -2, 1, 0, 0], 'Ohm'],
  [[-1, 0, 1, 0, 0], 'J/s'],
  [[0.5, 1, 0, 0, 0], 'A/rtHz'],
  [[-0.5, -1, 1, 0, 0], 'V/rtHz'],
];

const BASE_SYMBOLS = ['s', 'A', 'J', 'K', 'rad'];

/** The SI unit text of a dimension ("s", "A/rtHz", or a product of base units). */
export function siUnit(dim: Dimension): string {
  const known = SI_UNITS.find(([d]) => sameDimension(d, dim));
  if (known) return known[1];
  return dim.map((p, i) => (p === 0 ? '' : p === 1 ? BASE_SYMBOLS[i] : `${BASE_SYMBOLS[i]}^${p}`)).filter(Boolean).join('*');
}

interface Read {
  value: number;
  dim: Dimension | null;
}

const ENERGY: Dimension = [0, 0, 1, 0, 0];
const FREQUENCY: Dimension = [-1, 0, 0, 0, 0];

/**
 * Energies may be written as frequencies (h·f, as every energy key accepts): when the base value
 * or any swept value is an energy, every frequency among them becomes its energy h·f.
 */
function asEnergies(reads: Read[], baseDim: Dimension | null): { reads: Read[]; baseDim: Dimension | null } {
  if (![baseDim, ...reads.map((r) => r.dim)].some((d) => d !== null && sameDimension(d, ENERGY))) return { reads, baseDim };
  return {
    baseDim: baseDim !== null && sameDimension(baseDim, FREQUENCY) ? ENERGY : baseDim,
    reads: reads.map((r) => {
      if (r.dim === null) return r;
      const q = frequencyAsEnergy({ value: r.value, dim: r.dim, plain: false });
      return { value: q.value, dim: q.dim };
    }),
  };
}

/** Reads one written value: SI number and dimension (null for a plain number). */
function readValue(v: number | string, path: KeyPath, ctx: ResolveContext): Read {
  try {
    const q = parseQuantity(v);
    return { value: q.value, dim: q.plain ? null : q.dim };
  } catch (e) {
    if (!(e instanceof UnitSyntaxError)) throw e;
    ctx.fail(path, `a number or a quantity with a unit (e.g. "2 us")`, `${ctx.found(path)} (${e.message})`);
  }
}

/** Where a key path leads in the raw document: checks containers, returns the value there (maybe undefined). */
function locate(raw: unknown, keyPath: readonly (string | number)[], at: KeyPath, ctx: ResolveContext): unknown {
  let node = raw;
  for (let i = 0; i < keyPath.length; i++) {
    const part = keyPath[i]!;
    const upTo = formatPath(keyPath.slice(0, i));
    if (typeof part === 'number') {
      if (!Array.isArray(node)) ctx.fail(at, `a key path into the scenario (${upTo} is not a list)`);
      if (part >= node.length) ctx.fail(at, `a key path into the scenario (${upTo} has ${node.length} entries)`);
      node = node[part];
    } else {
      if (node === undefined) return undefined; // a missing mapping: the point will create it
      if (node === null || typeof node !== 'object' || Array.isArray(node)) {
        ctx.fail(at, `a key path into the scenario (${upTo || 'the document'} is not a mapping)`);
      }
      node = (node as Record<string, unknown>)[part];
    }
  }
  return node;
}

/** Evenly spaced values from `from` to `to` (ends exact), linear or in equal ratios. */
export function spacedValues(from: number, to: number, count: number, spacing: 'linear' | 'log'): number[] {
  const out: number[] = [];
  for (let i = 0; i < count; i++) {
    const f = i / (count - 1);
    if (i === 0) out.push(from);
    else if (i === count - 1) out.push(to);
    else if (spacing === 'log') out.push(from * Math.exp(f * Math.log(to / from)));
    else out.push(from + f * (to - from));
  }
  return out;
}

/** Checks each entry against the document and resolves its values to SI numbers. */
export function resolveSweep(doc: SweepDoc, ctx: ResolveContext): SweepSpec | undefined {
  if (doc === undefined) return undefined;
  const combine = doc.combine ?? 'grid';
  const axes: SweepAxis[] = [];
  doc.vary.forEach((entry, i) => {
    const at = ['sweep', 'vary', i];
    const path = parseKeyPath(entry.key);
    if (path === null) ctx.fail([...at, 'key'], 'a key path such as "timing.window.length" or "transitions[0].lifetime"');
    if (path[0] === 'sweep') ctx.fail([...at, 'key'], 'a key outside the sweep section');
    if (path[0] === 'name' || path[0] === 'description') ctx.fail([...at, 'key'], 'a key that holds a number');
    const key = formatPath(path);
    const earlier = axes.findIndex((a) => a.key === key);
    if (earlier >= 0) ctx.fail([...at, 'key'], `a key not already swept (sweep.vary[${earlier}] varies ${key})`);
    const base = locate(ctx.raw, path, [...at, 'key'], ctx);
    let baseDim: Dimension | null = null;
    if (base !== undefined) {
      if (typeof base !== 'number' && typeof base !== 'string') {
        ctx.fail([...at, 'key'], `a key that holds a number or a quantity (${key} holds ${ctx.found(path)})`);
      }
      try {
        const q = parseQuantity(base);
        baseDim = q.plain ? null : q.dim;
      } catch (e) {
        if (!(e instanceof UnitSyntaxError)) throw e;
        ctx.fail([...at, 'key'], `a key that holds a number or a quantity (${key} holds ${ctx.found(path)})`);
      }
    }
    if ((entry.values === undefined) === (entry.range === undefined)) {
      ctx.fail(at, 'either values or range', entry.values === undefined ? 'neither' : 'both');
    }
    let values: number[];
    let written: (number | string)[];
    let dims: { dim: Dimension | null; at: KeyPath }[];
    let spacing: 'linear' | 'log' | 'list';
    if (entry.values !== undefined) {
      const read = asEnergies(entry.values.map((v, j) => readValue(v, [...at, 'values', j], ctx)), baseDim);
      const reads = read.reads;
      baseDim = read.baseDim;
      values = reads.map((r) => r.value);
      written = [...entry.values];
      dims = reads.map((r, j) => ({ dim: r.dim, at: [...at, 'values', j] }));
      spacing = 'list';
    } else {
      const r = entry.range!;
      spacing = r.spacing ?? 'linear';
      const read = asEnergies([readValue(r.from, [...at, 'range', 'from'], ctx), readValue(r.to, [...at, 'range', 'to'], ctx)], baseDim);
      const [from, to] = read.reads as [Read, Read];
      baseDim = read.baseDim;
      dims = [{ dim: from.dim, at: [...at, 'range', 'from'] }, { dim: to.dim, at: [...at, 'range', 'to'] }];
      if (spacing === 'log' && !(from.value > 0 && to.value > 0)) {
        ctx.fail([...at, 'range', from.value > 0 ? 'to' : 'from'], 'a value > 0 (log spacing)');
      }
      values = spacedValues(from.value, to.value, r.count, spacing);
      written = [];
    }
    // every written unit must agree with the base value's and with each other
    let dim = baseDim;
    for (const d of dims) {
      if (d.dim === null) continue;
      if (dim === null) dim = d.dim;
      else if (!sameDimension(dim, d.dim)) {
        const like = baseDim !== null ? `the scenario's ${key} (${ctx.found(path)})` : 'the first value with a unit';
        ctx.fail(d.at, `a value of the same kind as ${like}`);
      }
    }
    const column = columnName(path);
    const clash = axes.findIndex((a) => a.column === column);
    if (clash >= 0) ctx.fail([...at, 'key'], `a key whose column name differs from sweep.vary[${clash}]'s ("${column}")`);
    axes.push({
      key, path, column, unit: dim === null ? '' : siUnit(dim), values, written, spacing,
      integer: typeof path[0] === 'string' && path.length === 1 && INTEGER_KEYS.has(path[0]),
    });
  });
  if (combine === 'zip') {
    const n = axes[0]!.values.length;
    const bad = axes.findIndex((a) => a.values.length !== n);
    if (bad >= 0) {
      ctx.fail(['sweep', 'vary', bad], `as many values as sweep.vary[0] (${n}) to zip them`, `${axes[bad]!.values.length}`);
    }
  }
  const points = combine === 'zip' ? axes[0]!.values.length : axes.reduce((p, a) => p * a.values.length, 1);
  if (points > MAX_SWEEP_POINTS) ctx.fail(['sweep'], `at most ${MAX_SWEEP_POINTS} sweep points`, `${points}`);
  return { combine, axes };
}
