/**
 * Weights from labelled records (classify/labelled-weights.ts): matched weights are the mean
 * difference scaled to the boxcar separation; optimal weights solve C·w ∝ Δμ with the pooled
 * within-label covariance (Fisher, Ann. Eugen. 7, 179 (1936)); checked on synthetic records
 * with a known mean difference and strongly correlated noise (a shared offset per record).
 */
import { describe, expect, it } from 'vitest';
import { labelMeans, weightsFromLabelled } from '../../src/classify/labelled-weights.ts';
import { noiseCovariance } from '../../src/dsp/weights.ts';
import { makeSeededSource } from './seeded-normal.ts';

const bins = 6;
const delta = [1, 0.8, 0.6, 0.45, 0.3, 0.2];

function records(count: number, seed: string) {
  const rng = makeSeededSource(seed);
  const projected = new Float64Array(count * bins);
  const labels = new Uint8Array(count);
  for (let r = 0; r < count; r++) {
    const label = r % 2;
    labels[r] = label;
    const offset = 0.8 * rng.normal(); // correlated between bins
    for (let b = 0; b < bins; b++) projected[r * bins + b] = label * delta[b]! + offset + 0.3 * rng.normal();
  }
  return { projected, labels };
}

describe('weights from labelled records', () => {
  const { projected, labels } = records(4000, 'labelled-weights');

  it('label means and the matched weights follow the mean difference over the within-label variance', () => {
    const { means, counts } = labelMeans(projected, bins, labels);
    expect(counts).toEqual([2000, 2000]);
    const w = weightsFromLabelled('matched', projected, bins, labels);
    const d = means[1].map((m, b) => m - means[0][b]!);
    // the within-label variance of each bin, pooled over both labels (3998 degrees of freedom)
    const v = new Float64Array(bins);
    for (let r = 0; r < labels.length; r++) for (let b = 0; b < bins; b++) v[b] += (projected[r * bins + b]! - means[labels[r]!]![b]!) ** 2 / 3998;
    const mean = d.reduce((a, x) => a + x, 0) / bins;
    const projectedSeparation = w.reduce((a, x, b) => a + x * d[b]!, 0);
    // scaled to the boxcar separation: Σ w·Δμ = mean(Δμ) (dsp/weights.ts convention)
    expect(projectedSeparation).toBeCloseTo(mean, 12);
    for (let b = 0; b < bins; b++) expect(w[b]! / w[0]!).toBeCloseTo((d[b]! / v[b]!) / (d[0]! / v[0]!), 10);
  });

  it('optimal weights solve C·w ∝ Δμ with the pooled within-label covariance', () => {
    const w = weightsFromLabelled('optimal', projected, bins, labels);
    const { means } = labelMeans(projected, bins, labels);
    const d = means[1].map((m, b) => m - means[0][b]!);
    const pooled = new Float64Array(bins * bins);
    for (const o of [0, 1]) {
      const rows = new Float64Array(2000 * bins);
      let j = 0;
      for (let r = 0; r < labels.length; r++) if (labels[r] === o) rows.set(projected.subarray(r * bins, (r + 1) * bins), bins * j++);
      const c = noiseCovariance(rows, means[o]!, 1);
      for (let k = 0; k < bins * bins; k++) pooled[k]! += (1999 / 3998) * c[k]!;
    }
    const cw = Array.from({ length: bins }, (_, i) => w.reduce((a, x, j) => a + pooled[i * bins + j]! * x, 0));
    const ratio = cw[0]! / d[0]!;
    for (let b = 0; b < bins; b++) expect(cw[b]! / d[b]!, `bin ${b}`).toBeCloseTo(ratio, 9);
    // with a shared offset the optimal weights differ from the matched ones (they cancel the offset: Σ w ≈ 0)
    const sum = w.reduce((a, x) => a + x, 0);
    expect(Math.abs(sum)).toBeLessThan(0.2 * w.reduce((a, x) => a + Math.abs(x), 0));
  });

  it('needs both labels', () => {
    expect(() => weightsFromLabelled('matched', projected, bins, new Uint8Array(4000))).toThrow(/both outcomes/);
  });
});
