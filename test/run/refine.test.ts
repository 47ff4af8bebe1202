import { describe, expect, it } from 'vitest';
import { goldenSection, refineAxis, refineMinimum } from '../../src/run/refine.ts';
import type { SweepSpec } from '../../src/scenario/types.ts';

const axis = (key: string, values: number[], spacing: 'list' | 'linear' | 'log' = 'list') =>
  ({ key, path: [key], column: key, unit: 's', values, written: [], spacing, integer: false });

describe('golden-section search', () => {
  // Kiefer, Proc. Am. Math. Soc. 4, 502 (1953): the bracket shrinks by 1/φ ≈ 0.618 per evaluation
  it.each([
    ['parabola, linear coordinates', (x: number) => (x - 3.3) ** 2, 1, 8, false, 3.3],
    ['parabola in log x, log coordinates', (x: number) => Math.log(x / 2e-6) ** 2, 1e-7, 1e-4, true, 2e-6],
  ])('%s', async (_name, f, lo, hi, log, expected) => {
    const steps = 20;
    const { evaluations, bracket } = await goldenSection(lo, hi, steps, log, async (x) => f(x));
    expect(evaluations).toHaveLength(steps);
    const best = evaluations.reduce((a, b) => (b.f < a.f ? b : a));
    const shrink = 0.618034 ** (steps - 1);
    const width = log ? Math.log(hi / lo) : hi - lo;
    const tol = 2 * shrink * width;
    expect(Math.abs((log ? Math.log(best.x / expected) : best.x - expected))).toBeLessThan(tol);
    expect(bracket[0]).toBeLessThanOrEqual(expected * (1 + 1e-9));
    expect(bracket[1]).toBeGreaterThanOrEqual(expected * (1 - 1e-9));
  });
});

describe('refinement of a grid minimum', () => {
  const spec: SweepSpec = { combine: 'grid', axes: [axis('w', [1, 2, 4, 8], 'log'), axis('t', [10, 20])] };
  // error = (log2(w) − 1.3)² + 1/t: minimum along w at 2^1.3 ≈ 2.46, at t = 20
  const error = (w: number, t: number) => (Math.log2(w) - 1.3) ** 2 / 100 + 1 / t;
  const grid = spec.axes[0]!.values.flatMap((w, i) => spec.axes[1]!.values.map((t, j) => ({
    point: i * 2 + j, values: [w, t], meanError: { rate: error(w, t), low: 0, high: 1 },
  })));

  it('brackets between the grid neighbours, holds the other values, and finds a lower point', async () => {
    let next = grid.length;
    const seen: number[][] = [];
    const r = await refineMinimum(spec, grid, 0, 8, async (values) => {
      seen.push(values);
      const rate = error(values[0]!, values[1]!);
      return { point: next++, meanError: { rate, low: rate, high: rate } };
    });
    expect(r.interval).toEqual([1, 4]);
    expect(r.held[1]).toBe(20);
    expect(seen.every((v) => v[1] === 20 && v[0]! > 1 && v[0]! < 4)).toBe(true);
    expect(r.evaluations).toHaveLength(8);
    expect(r.best.point).toBeGreaterThanOrEqual(grid.length);
    expect(Math.abs(Math.log2(r.best.value) - 1.3)).toBeLessThan(0.05);
    expect(r.atEdge).toBe(false);
  });

  it('chooses the only axis, else the first range, and finds axes by key or column', () => {
    expect(refineAxis(spec, true)).toBe(0);
    expect(refineAxis({ combine: 'grid', axes: [axis('a', [1, 2]), axis('b', [1, 2], 'linear')] }, true)).toBe(1);
    expect(refineAxis(spec, 't')).toBe(1);
    expect(refineAxis(spec, 'nope')).toBe(-1);
  });
});
