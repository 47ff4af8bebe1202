/**
 * Sweep expansion: a scenario document with a `sweep` section in, one point per combination
 * out. Each point's document is the base document with the swept values put in at their key
 * paths (and the sweep section left out), resolved like any scenario, so a value that does not
 * fit (a window longer than the record, say) is an InputError naming its key path and the point.
 * Pure: no files, no randomness.
 */
import { InputError } from '../errors.ts';
import { resolveScenario } from '../scenario/resolve.ts';
import type { Scenario, SweepAxis, SweepSpec } from '../scenario/types.ts';
import type { SweepPoint } from './sweep-point.ts';

/** Index of each axis's value at every point: grid (last axis fastest) or zipped. */
export function sweepCombinations(spec: SweepSpec): number[][] {
  const sizes = spec.axes.map((a) => a.values.length);
  if (spec.combine === 'zip') return Array.from({ length: sizes[0]! }, (_, i) => sizes.map(() => i));
  const total = sizes.reduce((p, n) => p * n, 1);
  const out: number[][] = [];
  for (let k = 0; k < total; k++) {
    const idx = new Array<number>(sizes.length);
    let rest = k;
    for (let a = sizes.length - 1; a >= 0; a--) {
      idx[a] = rest % sizes[a]!;
      rest = Math.floor(rest / sizes[a]!);
    }
    out.push(idx);
  }
  return out;
}

/** How a value is put into the document: as written for a listed value, else SI with its unit. */
function documentValue(axis: SweepAxis, value: number, index: number | null): number | string {
  if (index !== null && axis.written.length > 0) return axis.written[index]!;
  return axis.unit === '' ? value : `${String(value)} ${axis.unit}`;
}

/** A copy of `doc` with `value` at `path`, creating missing mappings on the way (the sweep section dropped). */
export function substitute(doc: unknown, path: readonly (string | number)[], value: unknown): unknown {
  const copy = structuredClone(doc) as Record<string, unknown>;
  let node: Record<string | number, unknown> = copy;
  for (let i = 0; i < path.length - 1; i++) {
    const part = path[i]!;
    if (node[part] === undefined) node[part] = {};
    node = node[part] as Record<string | number, unknown>;
  }
  node[path[path.length - 1]!] = value;
  return copy;
}

function describeValue(v: number | string): string {
  return typeof v === 'string' ? JSON.stringify(v) : String(v);
}

/**
 * The point with the given SI value on every axis. `indices` gives each value's position in
 * its axis (null for a value between the listed ones, e.g. during refinement); `label` names
 * the point in messages.
 */
export function sweepPointAt(
  doc: unknown, spec: SweepSpec, file: string, values: readonly number[], indices: readonly (number | null)[], label: string,
): SweepPoint {
  let d: unknown = structuredClone(doc);
  delete (d as Record<string, unknown>).sweep;
  const written = spec.axes.map((a, i) => documentValue(a, values[i]!, indices[i]!));
  spec.axes.forEach((a, i) => { d = substitute(d, a.path, written[i]); });
  let scenario: Scenario;
  try {
    scenario = resolveScenario(d, file).scenario;
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    // the file and key path first, like every message; the point it happened at after the rest
    const where = spec.axes.map((a, i) => `${a.key} = ${describeValue(written[i]!)}`).join(', ');
    const atPoint = new InputError(e.file, e.path, 'x');
    atPoint.message = `${e.message} (at ${label}: ${where})`;
    throw atPoint;
  }
  const parameters: Record<string, number> = {};
  const units: Record<string, string> = {};
  spec.axes.forEach((a, i) => {
    parameters[a.column] = values[i]!;
    units[a.column] = a.unit;
  });
  return { parameters, units, scenario };
}

/**
 * Every point of a scenario document (a single point with no parameters when it has no sweep).
 * `scenario` is the resolved base document (it carries the checked sweep section).
 */
export function expandSweep(doc: unknown, scenario: Scenario, file: string): SweepPoint[] {
  const spec = scenario.sweep;
  if (!spec) return [{ parameters: {}, units: {}, scenario }];
  const combos = sweepCombinations(spec);
  return combos.map((idx, k) => sweepPointAt(
    doc, spec, file, idx.map((j, a) => spec.axes[a]!.values[j]!), idx, `sweep point ${k} of ${combos.length}`,
  ));
}
