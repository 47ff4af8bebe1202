/**
 * Refinement of the error minimum along one swept value: golden-section search between the
 * grid neighbours of the lowest-error point, the other swept values held at that point's.
 * Every evaluation is a new, fully simulated point (its own seed stream); the objective is the
 * simulated mean error, so the search narrows the bracket only as far as the shot noise
 * allows — the refined point is the best evaluated one, with its interval.
 * Golden-section search: Kiefer, Proc. Am. Math. Soc. 4, 502 (1953).
 */
import type { SweepSpec } from '../scenario/types.ts';
import type { RateInterval } from '../analysis/intervals.ts';

/** Points a refinement adds unless told otherwise (the CLI's `--refine-points` and the library's `refinePoints` default). */
export const DEFAULT_REFINE_POINTS = 6;

/** 1/φ = (√5 − 1)/2. */
const INVERSE_GOLDEN = (Math.sqrt(5) - 1) / 2;

/** One evaluation of the objective. */
export interface Evaluation {
  x: number;
  f: number;
}

/**
 * Golden-section search for a minimum of f on [lo, hi] with `evaluations` calls (≥ 2), in
 * log coordinates when `logScale`. Returns every evaluation in call order and the final bracket.
 */
export async function goldenSection(
  lo: number, hi: number, evaluations: number, logScale: boolean, f: (x: number) => Promise<number>,
): Promise<{ evaluations: Evaluation[]; bracket: [number, number] }> {
  const to = (x: number) => (logScale ? Math.log(x) : x);
  const from = (u: number) => (logScale ? Math.exp(u) : u);
  const done: Evaluation[] = [];
  const at = async (u: number): Promise<number> => {
    const x = from(u);
    const y = await f(x);
    done.push({ x, f: y });
    return y;
  };
  let a = to(lo), b = to(hi);
  let c = b - INVERSE_GOLDEN * (b - a), d = a + INVERSE_GOLDEN * (b - a);
  let fc = await at(c);
  if (evaluations < 2) return { evaluations: done, bracket: [from(a), from(b)] };
  let fd = await at(d);
  for (let i = 2; i < evaluations; i++) {
    if (fc <= fd) {
      b = d; d = c; fd = fc;
      c = b - INVERSE_GOLDEN * (b - a);
      fc = await at(c);
    } else {
      a = c; c = d; fc = fd;
      d = a + INVERSE_GOLDEN * (b - a);
      fd = await at(d);
    }
  }
  if (fc <= fd) b = d;
  else a = c;
  return { evaluations: done, bracket: [from(a), from(b)] };
}

/** What refinement needs of a finished grid point. */
export interface GridPointError {
  point: number;
  /** The point's SI value on every axis. */
  values: readonly number[];
  meanError: RateInterval;
}

/** A point run during refinement. */
export interface RefinedEvaluation {
  point: number;
  value: number;
  meanError: RateInterval;
}

/** The result of a refinement. */
export interface Refinement {
  key: string;
  column: string;
  axis: number;
  /** The other axes' values, held at the grid optimum's. */
  held: number[];
  /** Search interval: the grid neighbours of the optimum along the axis. */
  interval: [number, number];
  /** Final golden-section bracket. */
  bracket: [number, number];
  evaluations: RefinedEvaluation[];
  /** Lowest simulated mean error along the line (grid points on it and refinement points). */
  best: RefinedEvaluation;
  /** Whether the grid optimum sat at an end of the swept range (the minimum may lie outside). */
  atEdge: boolean;
}

/** Index of the axis `key` names (a key path or a column name); default: the only axis, else the first range. */
export function refineAxis(spec: SweepSpec, key: string | true): number {
  if (key === true) {
    if (spec.axes.length === 1) return 0;
    const range = spec.axes.findIndex((a) => a.spacing !== 'list' && !a.integer);
    return range >= 0 ? range : spec.axes.findIndex((a) => !a.integer);
  }
  return spec.axes.findIndex((a) => a.key === key || a.column === key);
}

/**
 * Refines the lowest-error grid point along axis `axis` with `evaluations` new points.
 * `runAt(values)` simulates one new point and returns its index and mean error.
 */
export async function refineMinimum(
  spec: SweepSpec, grid: readonly GridPointError[], axis: number, evaluations: number,
  runAt: (values: number[]) => Promise<{ point: number; meanError: RateInterval }>,
): Promise<Refinement> {
  const a = spec.axes[axis]!;
  let best = grid[0]!;
  for (const g of grid) if (g.meanError.rate < best.meanError.rate) best = g;
  const onLine = grid.filter((g) => g.values.every((v, i) => i === axis || v === best.values[i]));
  const xs = [...new Set(onLine.map((g) => g.values[axis]!))].sort((p, q) => p - q);
  const k = xs.indexOf(best.values[axis]!);
  const interval: [number, number] = [xs[Math.max(0, k - 1)]!, xs[Math.min(xs.length - 1, k + 1)]!];
  const held = [...best.values];
  const evaluated: RefinedEvaluation[] = [];
  const search = await goldenSection(interval[0], interval[1], evaluations, a.spacing === 'log', async (x) => {
    const values = held.map((v, i) => (i === axis ? x : v));
    const r = await runAt(values);
    evaluated.push({ point: r.point, value: x, meanError: r.meanError });
    return r.meanError.rate;
  });
  const candidates: RefinedEvaluation[] = [
    ...onLine.map((g) => ({ point: g.point, value: g.values[axis]!, meanError: g.meanError })),
    ...evaluated,
  ];
  let top = candidates[0]!;
  for (const c of candidates) if (c.meanError.rate < top.meanError.rate) top = c;
  return {
    key: a.key, column: a.column, axis, held, interval, bracket: search.bracket, evaluations: evaluated, best: top,
    atEdge: k === 0 || k === xs.length - 1,
  };
}
