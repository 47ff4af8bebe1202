/**
 * The clean centres and σ from labelled values with relaxed and mislabelled records
 * (src/analysis/value-mixture-fit.ts), against the truth of a seeded synthetic readout: two
 * Gaussians, a ramp of records whose state changed at a uniform time in the window, and a few
 * records of the other outcome. Where the median and IQR/1.349 are pulled by several per cent,
 * the fit recovers μ and σ within a few standard errors (σ/√n for a centre, σ/√(2n) for σ).
 */
import { describe, expect, it } from 'vitest';
import { fitValueMixture } from '../../src/analysis/value-mixture-fit.ts';
import { robustSpread } from '../../src/analysis/robust-spread.ts';
import { makeStream } from '../../src/random/streams.ts';

function readout(n: number, relaxed: number, mislabelled: number, seed: number): [Float64Array, Float64Array] {
  const s = makeStream(seed, 0, 'aux', 0);
  const mu = [0, 4.6], sigma = 1;
  return [0, 1].map((label) => Float64Array.from({ length: n }, () => {
    const u = s.nextDouble();
    // label 1 relaxes toward 0 during the window; label 0 has no ramp (no excitation)
    const centre = label === 1 && u < relaxed ? mu[0]! + (mu[1]! - mu[0]!) * s.nextDouble()
      : u < relaxed + mislabelled ? mu[1 - label]! : mu[label]!;
    return centre + sigma * s.nextNormal();
  })) as [Float64Array, Float64Array];
}

describe('fitting the clean centres and σ', () => {
  it.each([[0, 0], [0.05, 0.005], [0.1, 0.01]])('relaxed %f, mislabelled %f', { timeout: 20_000 }, (relaxed, mislabelled) => {
    const n = 40000;
    const fit = fitValueMixture(readout(n, relaxed, mislabelled, 11));
    const se = 1 / Math.sqrt(n);
    expect(Math.abs(fit.outcomes[0]!.mean - 0)).toBeLessThan(5 * se);
    expect(Math.abs(fit.outcomes[1]!.mean - 4.6)).toBeLessThan(5 * se * 1.5);
    expect(Math.abs(fit.sigma - 1)).toBeLessThan(5 * se);
    expect(Math.abs(fit.separation / fit.sigma / 4.6 - 1)).toBeLessThan(0.01);
    // the ramp weight of label 1 is the relaxed fraction (its binomial SE √(p(1−p)/n) ≲ 0.0015; 0.01 is loose for the model's overlap)
    expect(Math.abs(fit.weights[1]![2] - relaxed)).toBeLessThan(0.01);
  });

  it('where the median and IQR are pulled by relaxation, the fit is not', { timeout: 20_000 }, () => {
    const values = readout(40000, 0.1, 0.01, 12);
    const robust = robustSpread(values);
    const fit = fitValueMixture(values);
    expect(Math.abs(robust.sigma - 1)).toBeGreaterThan(0.03);
    expect(Math.abs(fit.sigma - 1)).toBeLessThan(0.01);
  });
});
