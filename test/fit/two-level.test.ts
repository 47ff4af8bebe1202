/**
 * The two-level model of binned records (src/fit/two-level.ts, posteriors.ts) on synthetic
 * records drawn from a known chain: each record starts at level 0 or 1 (equal odds), the upper
 * level decays at rate γ (exponential waiting time, the two-state chain of Norris, Markov Chains
 * (1997), §2.1), and every bin adds Gaussian noise σ. Checks: γ within four Poisson standard
 * errors of the decays the records hold (γ/√J), no rate upward (negative control), the levels
 * within four standard errors although each bin's noise is as large as the separation, and one
 * level refused in one line.
 */
import { describe, expect, it } from 'vitest';
import type { BinnedRecords } from '../../src/fit/binning.ts';
import { InputError } from '../../src/errors.ts';
import { groupRecords } from '../../src/fit/estimate.ts';
import { levelsFrom, readRecords } from '../../src/fit/posteriors.ts';
import { learnTwoLevels, testRates } from '../../src/fit/two-level.ts';
import { makeStream } from '../../src/random/streams.ts';

const bins = 60, dt = 1e-6, sigma = 1;

/** Records of the chain of the file comment; returns them and the number of decays inside the records. */
function chain(count: number, gamma: number, separation: number, seed: number): { binned: BinnedRecords; decays: number } {
  const stream = makeStream(seed, 0, 'aux', 0);
  const re = new Float32Array(count * bins), im = new Float32Array(count * bins);
  let decays = 0;
  for (let r = 0; r < count; r++) {
    const upper = stream.nextDouble() < 0.5;
    // the time the record leaves the upper level: at once for a lower record, never without decay
    const jump = !upper ? 0 : gamma > 0 ? stream.nextExponential(gamma) : Infinity;
    if (upper && jump < bins * dt) decays++;
    for (let k = 0; k < bins; k++) {
      // the bin's mean: the share of the bin spent at the upper level
      const inUpper = Math.min(1, Math.max(0, (jump - k * dt) / dt));
      re[r * bins + k] = separation * inUpper + sigma * stream.nextNormal();
    }
  }
  return { binned: { count, bins, re, im, windowRe: new Float64Array(count), windowIm: new Float64Array(count), complexValued: false }, decays };
}

describe('the two-level model', () => {
  it('recovers the decay rate within four Poisson errors and finds no rate upward', () => {
    const gamma = 2e4;
    const { binned, decays } = chain(3000, gamma, 1, 5);
    const model = learnTwoLevels(binned, null, 'synthetic');
    const rates = testRates(model, dt);
    expect(rates.down.kept).toBe(true);
    expect(Math.abs(rates.down.rate - gamma), `γ ${rates.down.rate}, ${decays} decays`).toBeLessThan((4 * gamma) / Math.sqrt(decays));
    expect(rates.up.kept).toBe(false);
  });

  it('gives unbiased levels though each bin\'s noise is as large as the separation', () => {
    const { binned } = chain(3000, 2e4, 1, 6);
    const model = learnTwoLevels(binned, null, 'synthetic');
    const reading = readRecords(binned, model, groupRecords(binned.count, 64));
    const [a, b] = levelsFrom(reading.levelSums, null);
    const lower = Math.min(a.re, b.re), upper = Math.max(a.re, b.re);
    // about 1500 records × 60 bins per level: a standard error of σ/√90000 ≈ 0.0033
    expect(Math.abs(lower - 0), `lower ${lower}`).toBeLessThan(4 * 0.0033 * 1.5);
    expect(Math.abs(upper - 1), `upper ${upper}`).toBeLessThan(4 * 0.0033 * 1.5);
  });

  it('refuses records of one level in one line', () => {
    const { binned } = chain(500, 0, 0, 7);
    expect(() => learnTwoLevels(binned, null, 'flat.npy')).toThrow(InputError);
    expect(() => learnTwoLevels(binned, null, 'flat.npy')).toThrow(/^flat\.npy: expected records that show two levels .*, found one level: /);
  });
});
