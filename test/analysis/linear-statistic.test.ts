/**
 * Prefix sums of kernel × waveform and the white-noise covariance of several kernels, against
 * the direct sums that define them (common practice, no source): a segment [a, b) contributes
 * P[b] − P[a]; Cov(Σ K_a·n, Σ K_b·n) = σ²·Σ K_a·K_b for independent n of variance σ².
 */
import { describe, expect, it } from 'vitest';
import { kernelPrefixSums, whiteCovariance } from '../../src/analysis/linear-statistic.ts';

const n = 50;
const kernel = Float64Array.from({ length: n }, (_, k) => Math.cos(0.3 * k) / n);
const wave = Float64Array.from({ length: n }, (_, k) => 1 + Math.sin(0.7 * k));

describe('linear statistic tables', () => {
  it.each([[0, 50], [5, 45], [10, 11]])('prefix sums over [%i, %i) give every segment sum', (lo, hi) => {
    const p = kernelPrefixSums(kernel, wave, lo, hi);
    expect(p.length).toBe(hi - lo + 1);
    for (const [a, b] of [[lo, hi], [lo, lo], [lo + 1, hi], [Math.floor((lo + hi) / 2), hi]] as const) {
      let direct = 0;
      for (let k = a; k < b; k++) direct += kernel[k]! * wave[k]!;
      expect(Math.abs(p[b - lo]! - p[a - lo]! - direct), `segment [${a}, ${b})`).toBeLessThanOrEqual(1e-15);
    }
  });

  it('covariance of kernels with different supports', () => {
    const other = Float64Array.from({ length: n }, (_, k) => Math.sin(0.3 * k) / n);
    const sigma = 2.5;
    const c = whiteCovariance([{ kernel, lo: 0, hi: 50 }, { kernel: other, lo: 10, hi: 30 }], sigma);
    let aa = 0, ab = 0, bb = 0;
    for (let k = 0; k < n; k++) aa += kernel[k]! ** 2;
    for (let k = 10; k < 30; k++) { ab += kernel[k]! * other[k]!; bb += other[k]! ** 2; }
    const want = [aa, ab, ab, bb].map((x) => sigma * sigma * x);
    Array.from(c).forEach((x, i) => expect(Math.abs(x - want[i]!), `entry ${i}: ${x} vs ${want[i]}`).toBeLessThanOrEqual(1e-15));
  });
});
