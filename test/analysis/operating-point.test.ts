import { describe, expect, it } from 'vitest';
import { lowerError, operatingPoints, type PointRow } from '../../src/analysis/operating-point.ts';

const row = (point: number, rate: number, snr: number, low = rate * 0.8, high = rate * 1.2, pipeline = 'main'): PointRow => ({
  point, pipeline, parameters: { w: point }, meanError: { rate, low, high }, analyticMean: rate, snr,
});

describe('operating points', () => {
  it.each([
    {
      name: 'error and SNR optima differ',
      rows: [row(0, 3e-2, 4), row(1, 1e-3, 8), row(2, 3e-3, 12)],
      lowest: 1, highest: 2, differ: true, indistinguishable: [],
    },
    {
      name: 'the same point',
      rows: [row(0, 3e-2, 4), row(1, 1e-3, 12)],
      lowest: 1, highest: 1, differ: false, indistinguishable: [],
    },
    {
      name: 'overlapping intervals are reported',
      rows: [row(0, 1.1e-3, 4, 0.7e-3, 1.6e-3), row(1, 1.0e-3, 5, 0.6e-3, 1.5e-3), row(2, 5e-3, 6, 4e-3, 6e-3)],
      lowest: 1, highest: 2, differ: true, indistinguishable: [0],
    },
    {
      name: 'non-finite SNR is skipped',
      rows: [row(0, 1e-3, NaN), row(1, 2e-3, 3)],
      lowest: 0, highest: 1, differ: true, indistinguishable: [],
    },
  ])('$name', ({ rows, lowest, highest, differ, indistinguishable }) => {
    const [op] = operatingPoints(rows);
    expect(op!.lowestError.point).toBe(lowest);
    expect(op!.highestSnr!.point).toBe(highest);
    expect(op!.differ).toBe(differ);
    expect(op!.indistinguishable).toEqual(indistinguishable);
  });

  it('ties on the simulated rate fall to the analytic value, then the lower index', () => {
    const a = { ...row(3, 0, 1), analyticMean: 2e-6 };
    const b = { ...row(4, 0, 1), analyticMean: 1e-6 };
    expect(lowerError(b, a)).toBe(true);
    expect(lowerError(row(1, 0, 1), row(2, 0, 1))).toBe(true);
  });

  it('answers per pipeline', () => {
    const ops = operatingPoints([row(0, 1e-3, 5), row(1, 2e-3, 6), row(0, 4e-3, 9, 3e-3, 5e-3, 'other'), row(1, 1e-3, 2, 8e-4, 1.2e-3, 'other')]);
    expect(ops.map((o) => [o.pipeline, o.lowestError.point, o.highestSnr!.point])).toEqual([['main', 0, 1], ['other', 1, 0]]);
  });
});
