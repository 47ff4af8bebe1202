import { describe, expect, it } from 'vitest';
import { addValue, addValues, emptyMoments, mergeMoments, variance } from '../../src/analysis/moments.ts';
import { loadFixture, mismatch, relativeError } from './load-fixture.ts';

const EPS = Number.EPSILON;

interface MomentSet {
  name: string;
  values: number[];
  mean: number;
  variance: number;
}
const fixture = loadFixture<{ sets: MomentSet[] }>('moments');
const sets = fixture.sets.map((s) => ({ ...s, data: Float64Array.from(s.values) }));

describe('one pass against exact rational arithmetic', () => {
  // reference library: exact mean and variance (Python fractions), test/fixtures/make-moments.py
  it.each(sets)('$name: mean and sample variance', ({ name, data, mean, variance: expected }) => {
    const acc = addValues(emptyMoments(), data);
    expect(acc.n).toBe(data.length);
    const sd = Math.sqrt(expected);
    // Tolerances in EPS multiples scaled by the condition number κ = 1 + |mean|/sd of the
    // variance (Chan, Golub & LeVeque, Am. Stat. 37, 242 (1983)): the offset-1e9 set has κ ≈ 1e9.
    const kappa = 1 + Math.abs(mean) / sd;
    const tolMean = 16 * EPS * (Math.abs(mean) + sd);
    expect(Math.abs(acc.mean - mean), mismatch(`${name} mean`, acc.mean, mean, tolMean)).toBeLessThan(tolMean);
    const tolVar = 32 * EPS * kappa;
    const v = variance(acc);
    expect(relativeError(v, expected), mismatch(`${name} variance`, v, expected, tolVar)).toBeLessThan(tolVar);
  });
});

describe('chunked and merged accumulation equals one pass', () => {
  it.each(sets)('$name: chunks of several sizes, merged left to right and as a tree', ({ name, data }) => {
    const whole = addValues(emptyMoments(), data);
    const scaleMean = Math.abs(whole.mean) + Math.sqrt(variance(whole));
    const kappa = 1 + Math.abs(whole.mean) / Math.sqrt(variance(whole)); // condition number, as above
    for (const chunk of [1, 7, 64, 113, data.length]) {
      const parts = [];
      for (let start = 0; start < data.length; start += chunk) {
        parts.push(addValues(emptyMoments(), data, start, Math.min(data.length, start + chunk)));
      }
      const linear = parts.reduce(mergeMoments, emptyMoments());
      let level = parts;
      while (level.length > 1) {
        const next = [];
        for (let i = 0; i < level.length; i += 2) next.push(i + 1 < level.length ? mergeMoments(level[i], level[i + 1]) : level[i]);
        level = next;
      }
      const tree = level[0];
      for (const [how, acc] of [['linear', linear], ['tree', tree]] as const) {
        const input = `${name}, chunk ${chunk}, ${how}`;
        expect(acc.n, input).toBe(whole.n);
        const tolMean = 16 * EPS * scaleMean;
        expect(Math.abs(acc.mean - whole.mean), mismatch(`${input} mean`, acc.mean, whole.mean, tolMean)).toBeLessThan(tolMean);
        const tolVar = 32 * EPS * kappa;
        expect(relativeError(variance(acc), variance(whole)), mismatch(`${input} variance`, variance(acc), variance(whole), tolVar)).toBeLessThan(tolVar);
      }
    }
  });

  it('addValue one at a time equals addValues bit for bit', () => {
    const data = sets[0].data;
    let acc = emptyMoments();
    for (let i = 0; i < data.length; i++) acc = addValue(acc, data[i]);
    expect(acc).toEqual(addValues(emptyMoments(), data));
  });
});

describe('edge cases and purity', () => {
  it('empty and single-value accumulators', () => {
    expect(variance(emptyMoments())).toBeNaN();
    const one = addValue(emptyMoments(), 4.5);
    expect(one).toEqual({ n: 1, mean: 4.5, m2: 0 });
    expect(variance(one)).toBeNaN();
    expect(variance(one, 0)).toBe(0);
    expect(mergeMoments(emptyMoments(), one)).toEqual(one);
    expect(mergeMoments(one, emptyMoments())).toEqual(one);
    expect(addValues(one, new Float64Array(3), 2, 2)).toEqual(one);
  });

  it('by hand: {1, 2, 3, 4} has mean 2.5, sample variance 5/3 and population variance 1.25', () => {
    // exact by hand
    const acc = mergeMoments(addValues(emptyMoments(), Float64Array.from([1, 2])), addValues(emptyMoments(), Float64Array.from([3, 4])));
    expect(acc.mean).toBe(2.5);
    expect(variance(acc, 0)).toBe(1.25);
    expect(Math.abs(variance(acc) - 5 / 3)).toBeLessThanOrEqual(EPS);
  });

  it('never modifies its inputs', () => {
    const a = addValues(emptyMoments(), Float64Array.from([1, 5]));
    const b = addValues(emptyMoments(), Float64Array.from([2, 9, 4]));
    const snapshot = JSON.stringify([a, b]);
    mergeMoments(a, b);
    addValue(a, 3);
    addValues(b, Float64Array.from([1]));
    expect(JSON.stringify([a, b])).toBe(snapshot);
  });
});
