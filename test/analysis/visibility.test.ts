/**
 * Visibility 1 − P(0|1) − P(1|0) and its interval (analysis/summary.ts visibilityInterval: Wilson
 * limits combined as in Newcombe's hybrid score method, Stat. Med. 17, 873 (1998), method 10,
 * for a sum): the value, and the interval's coverage on simulated binomial counts (fixed seed).
 */
import { describe, expect, it } from 'vitest';
import { visibilityInterval } from '../../src/analysis/summary.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';

describe('visibility', () => {
  it('is 1 − e0 − e1, and its interval pairs the Wilson limits (by hand)', () => {
    const v = visibilityInterval([30, 70], [1000, 1000], 0.95);
    expect(v.value).toBeCloseTo(1 - 0.03 - 0.07, 15);
    const w0 = wilsonInterval(30, 1000, 0.95), w1 = wilsonInterval(70, 1000, 0.95);
    expect(v.low).toBeCloseTo(0.9 - Math.hypot(w0.high - 0.03, w1.high - 0.07), 15);
    expect(v.high).toBeCloseTo(0.9 + Math.hypot(0.03 - w0.low, 0.07 - w1.low), 15);
  });

  it('covers the true visibility in about 95 % of repeated experiments (4000 repeats; 99.9 % binomial band)', () => {
    // e0 = 0.02, e1 = 0.05, 2000 shots each; a seeded xorshift draws the counts
    let x = 0x2545f491;
    const uniform = () => { x ^= x << 13; x ^= x >>> 17; x ^= x << 5; return (x >>> 0) / 4294967296; };
    const binomial = (n: number, p: number) => { let k = 0; for (let i = 0; i < n; i++) if (uniform() < p) k++; return k; };
    const repeats = 4000;
    let covered = 0;
    for (let r = 0; r < repeats; r++) {
      const v = visibilityInterval([binomial(2000, 0.02), binomial(2000, 0.05)], [2000, 2000], 0.95);
      if (v.low <= 0.93 && 0.93 <= v.high) covered++;
    }
    // coverage of a nominal 95 % interval: within the 99.9 % band of 4000 Bernoulli(0.95) trials, ±0.0113
    expect(Math.abs(covered / repeats - 0.95), `coverage ${covered / repeats}`).toBeLessThan(0.0113 + 0.01);
  });
});
