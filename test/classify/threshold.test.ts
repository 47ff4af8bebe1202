import { describe, expect, it } from 'vitest';
import {
  classifyAllByThreshold,
  classifyByThreshold,
  midpointThreshold,
  optimalThreshold,
} from '../../src/classify/threshold.ts';
import { makeSeededSource } from './seeded-normal.ts';

const f64 = (values: number[]): Float64Array => Float64Array.from(values);

describe('midpointThreshold', () => {
  it.each([
    [0, 2, 1, true],
    [2, 0, 1, false],
    [-0.75, 0.25, -0.25, true], // exact in binary floating point
    [0.5, 0.5, 0.5, true],
  ])('means %s, %s → threshold %s, highIsOne %s', (mean0, mean1, threshold, highIsOne) => {
    expect(midpointThreshold(mean0, mean1)).toEqual({ threshold, highIsOne });
  });
});

describe('classifyByThreshold', () => {
  it.each([
    [1.5, 1, true, 1],
    [0.5, 1, true, 0],
    [1, 1, true, 0], // equal to the threshold: outcome 0
    [0.5, 1, false, 1],
    [1.5, 1, false, 0],
    [1, 1, false, 0],
    [5, -Infinity, true, 1],
    [5, Infinity, true, 0],
  ] as const)('value %s, threshold %s, highIsOne %s → %s', (value, threshold, highIsOne, outcome) => {
    expect(classifyByThreshold(value, threshold, highIsOne)).toBe(outcome);
    expect(classifyAllByThreshold(f64([value]), threshold, highIsOne)[0]).toBe(outcome);
  });
});

describe('optimalThreshold on constructed data', () => {
  // Expected values worked out by hand from the error count in every gap (comments).
  it.each([
    // separated: the only zero-error run is (2, 5)
    ['separated', [0, 1, 2], [5, 6, 7], 3.5, true, 0, 0],
    ['separated, inverted', [5, 6, 7], [0, 1, 2], 3.5, false, 0, 0],
    // counts per gap (highIsOne): 5 4 3 2 3 2 3 4 3 4 5; runs (2, 2.5) and (3, 4) tie at 2;
    // the means' midpoint is (2.4 + 5.3)/2 = 3.85, nearer 3.5 than 2.25
    ['overlap, two tied runs', [0, 1, 2, 3, 6], [2.5, 4, 5, 7, 8], 3.5, true, 1, 1],
    // value 2 in both samples: gaps (1, 2) and (2, 3) both count 1 and merge into one run (1, 3)
    ['shared value', [1, 1, 2], [2, 3, 3], 2, true, 0, 1],
    // bounded runs (0, 1) with highIsOne and (1, 2) with low side one, equally far from the
    // means' midpoint 1: the means' orientation (μ1 ≥ μ0 → highIsOne) wins
    ['orientation tie', [0, 2], [1], 0.5, true, 1, 0],
    // nothing separates: every threshold gives 1 error; all values go to outcome 1
    ['identical samples', [1], [1], -Infinity, true, 1, 0],
  ])('%s', (_name, v0, v1, threshold, highIsOne, errors0, errors1) => {
    const result = optimalThreshold(f64(v0), f64(v1));
    expect(result).toEqual({ threshold, highIsOne, errors: errors0 + errors1, errors0, errors1 });
  });

  it('rejects an empty sample', () => {
    expect(() => optimalThreshold(f64([]), f64([1]))).toThrow(RangeError);
    expect(() => optimalThreshold(f64([1]), f64([]))).toThrow(RangeError);
  });

  // Reference: exhaustive search over every candidate threshold (each pooled value, each midpoint
  // between consecutive pooled values, ±∞) in both orientations (common practice, no source).
  function exhaustiveMinimum(v0: Float64Array, v1: Float64Array): number {
    const pooled = Array.from(v0).concat(Array.from(v1)).sort((a, b) => a - b);
    const candidates = [-Infinity, Infinity, ...pooled];
    for (let i = 0; i + 1 < pooled.length; i++) candidates.push(0.5 * (pooled[i]! + pooled[i + 1]!));
    let best = Infinity;
    for (const t of candidates) {
      for (const high of [true, false]) {
        let e = 0;
        for (const v of v0) e += classifyByThreshold(v, t, high);
        for (const v of v1) e += 1 - classifyByThreshold(v, t, high);
        best = Math.min(best, e);
      }
    }
    return best;
  }

  it.each(['a', 'b', 'c', 'd', 'e', 'f'])('random overlapping samples (seed %s) reach the exhaustive minimum', (seed) => {
    const source = makeSeededSource(`threshold ${seed}`);
    const n0 = 20 + Math.floor(source.uniform() * 40);
    const n1 = 20 + Math.floor(source.uniform() * 40);
    // Rounded to a grid of 0.25 so that ties and shared values occur.
    const draw = (mean: number) => Math.round(4 * (mean + source.normal())) / 4;
    const v0 = Float64Array.from({ length: n0 }, () => draw(0));
    const v1 = Float64Array.from({ length: n1 }, () => draw(1.2));
    const result = optimalThreshold(v0, v1);
    const expected = exhaustiveMinimum(v0, v1);
    expect(result.errors, `n0 ${n0} n1 ${n1} threshold ${result.threshold}`).toBe(expected);
    // The reported counts are those of the returned rule.
    let e0 = 0;
    let e1 = 0;
    for (const v of v0) e0 += classifyByThreshold(v, result.threshold, result.highIsOne);
    for (const v of v1) e1 += 1 - classifyByThreshold(v, result.threshold, result.highIsOne);
    expect([result.errors0, result.errors1]).toEqual([e0, e1]);
    expect(result.highIsOne).toBe(true);
  });
});
