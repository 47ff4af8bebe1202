/**
 * Integration weights from labelled records alone, for records whose hidden history is unknown
 * (a lab's own traces in `analyze`): the records are projected bins stored row after row
 * (count × bins) with an outcome label 0/1 per row.
 *
 * matched: w ∝ Δμ/v, Δμ = mean(label 1) − mean(label 0) per bin over the within-label variance
 *          per bin (Gambetta et al., Phys. Rev. A 76, 012325 (2007); dsp/weights.ts);
 * optimal: w ∝ C⁻¹·Δμ with C the within-label covariance pooled over both labels (Fisher's
 *          discriminant; Fisher, Ann. Eugen. 7, 179 (1936)). Without the truth, relaxation during
 *          the record is part of C here, unlike the simulator's calibration, which uses clean
 *          shots only (plan/calibrate-bins.ts).
 * Both are normalised as in dsp/weights.ts (Σ w·Δμ = mean Δμ).
 */
import { matchedWeights, noiseCovariance, optimalLinearWeights } from '../dsp/weights.ts';

/** Per-bin means of the rows of each label, and the counts. */
export function labelMeans(projected: Float64Array, bins: number, labels: Uint8Array): { means: [Float64Array, Float64Array]; counts: [number, number] } {
  const means: [Float64Array, Float64Array] = [new Float64Array(bins), new Float64Array(bins)];
  const counts: [number, number] = [0, 0];
  for (let r = 0; r < labels.length; r++) {
    const o = labels[r]!;
    if (o > 1) continue;
    counts[o]++;
    const m = means[o], base = r * bins;
    for (let b = 0; b < bins; b++) m[b]! += projected[base + b]!;
  }
  for (let o = 0; o < 2; o++) for (let b = 0; b < bins; b++) means[o]![b]! /= counts[o]!;
  return { means, counts };
}

/** Matched or optimal weights from labelled projected records (labels 0/1; other values ignored). */
export function weightsFromLabelled(kind: 'matched' | 'optimal', projected: Float64Array, bins: number, labels: Uint8Array): Float64Array {
  const { means, counts } = labelMeans(projected, bins, labels);
  if (counts[0] === 0 || counts[1] === 0) throw new RangeError('weights need labelled records of both outcomes');
  const delta = Float64Array.from(means[1], (m, b) => m - means[0][b]!);
  if (kind === 'matched') return matchedWeights(delta, pooledVariance(projected, bins, labels, means, counts));
  const pooled = new Float64Array(bins * bins);
  let dof = 0;
  for (let o = 0; o < 2; o++) {
    if (counts[o]! < 2) continue;
    const rows = new Float64Array(counts[o]! * bins);
    let j = 0;
    for (let r = 0; r < labels.length; r++) if (labels[r] === o) rows.set(projected.subarray(r * bins, (r + 1) * bins), bins * j++);
    const c = noiseCovariance(rows, means[o]!, 1);
    for (let k = 0; k < bins * bins; k++) pooled[k]! += (counts[o]! - 1) * c[k]!;
    dof += counts[o]! - 1;
  }
  if (dof <= bins) throw new RangeError(`optimal weights need more labelled records than bins (${dof} degrees of freedom for ${bins} bins)`);
  for (let k = 0; k < bins * bins; k++) pooled[k]! /= dof;
  return optimalLinearWeights(delta, pooled);
}

/** Per-bin variance within each label about its mean, pooled over both labels. */
function pooledVariance(projected: Float64Array, bins: number, labels: Uint8Array, means: [Float64Array, Float64Array], counts: [number, number]): Float64Array {
  const v = new Float64Array(bins);
  for (let r = 0; r < labels.length; r++) {
    const o = labels[r]!;
    if (o > 1) continue;
    for (let b = 0; b < bins; b++) v[b] += (projected[r * bins + b]! - means[o]![b]!) ** 2;
  }
  const dof = Math.max(1, counts[0] + counts[1] - 2);
  for (let b = 0; b < bins; b++) v[b]! /= dof;
  return v;
}
