import { describe, expect, it } from 'vitest';
import { envelope, extent, histogramCounts, movingAverage, sliceThrough } from '../../src/analysis/plot-data.ts';

describe('plot data', () => {
  it('counts values into equal bins, the top edge in the last bin', () => {
    const v = Float64Array.from([0, 0.1, 0.49, 0.5, 0.99, 1, -0.1, 1.2]);
    expect(Array.from(histogramCounts(v, 0, 1, 2))).toEqual([3, 3]);
  });

  it('finds the extent over arrays, skipping non-finite values', () => {
    expect(extent([Float64Array.from([1, NaN, 3]), Float64Array.from([-2, Infinity])])).toEqual([-2, 3]);
    expect(extent([new Float64Array(0)])).toEqual([NaN, NaN]);
  });

  it('keeps the minimum and maximum of each bucket in time order', () => {
    const v = Float64Array.from({ length: 100 }, (_, k) => (k % 10 === 3 ? 5 : k % 10 === 7 ? -5 : 0));
    const e = envelope(v, 0, 100, 10);
    expect(e.index).toHaveLength(20);
    expect(e.value.filter((x) => x === 5)).toHaveLength(10);
    expect(e.value.filter((x) => x === -5)).toHaveLength(10);
    for (let i = 1; i < e.index.length; i++) expect(e.index[i]).toBeGreaterThan(e.index[i - 1]!);
    expect(envelope(v, 10, 20, 10).index).toEqual([10, 11, 12, 13, 14, 15, 16, 17, 18, 19]);
  });

  it('averages a centred window (a sine over whole periods averages to zero; common practice, no source)', () => {
    const n = 200, period = 20;
    const v = Float64Array.from({ length: n }, (_, k) => 3 + Math.sin((2 * Math.PI * k) / period));
    const out = movingAverage(v, 0, n, period, new Float64Array(n));
    for (let k = period; k < n - period; k++) expect(Math.abs(out[k]! - 3)).toBeLessThan(1e-12);
  });

  it('slices a grid through one point along one axis', () => {
    const values = [[1, 10], [1, 20], [2, 10], [2, 20], [3, 10], [3, 20]];
    expect(sliceThrough(values, 3, 0)).toEqual([1, 3, 5]);
    expect(sliceThrough(values, 3, 1)).toEqual([2, 3]);
  });
});
