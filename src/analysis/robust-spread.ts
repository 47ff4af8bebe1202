/**
 * The centre and spread of each outcome's integrated values when nobody knows which records were
 * clean (recorded traces): the median and σ̂ = IQR/1.349, where IQR is the interquartile range
 * (for a normal distribution IQR = 2·z₀.₇₅·σ = 1.3490σ; e.g. NIST/SEMATECH e-Handbook of
 * Statistical Methods, §1.3.5.6 and §1.3.6.7.1). A few per cent of relaxed or mis-prepared
 * records move the quartiles by a few per cent of σ, where they would move the mean and the
 * standard deviation by their whole distance from the centre.
 */
import type { ValueSpread } from './summary.ts';

/** 2·Φ⁻¹(0.75): the interquartile range of a unit normal. */
const NORMAL_IQR = 1.3489795003921634;

/** The q-quantile of sorted values, linearly interpolated (numpy's default, "linear"). */
export function sortedQuantile(sorted: Float64Array, q: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const at = q * (n - 1);
  const lo = Math.floor(at), hi = Math.min(n - 1, lo + 1);
  return sorted[lo]! + (at - lo) * (sorted[hi]! - sorted[lo]!);
}

/** Median and IQR/1.349 of each outcome's values; σ pooled over the outcomes by their degrees of freedom. */
export function robustSpread(byOutcome: readonly [Float64Array, Float64Array]): ValueSpread {
  const outcomes = byOutcome.map((values) => {
    const sorted = Float64Array.from(values).sort();
    return { mean: sortedQuantile(sorted, 0.5), sigma: (sortedQuantile(sorted, 0.75) - sortedQuantile(sorted, 0.25)) / NORMAL_IQR, n: sorted.length };
  });
  let m2 = 0, dof = 0;
  for (const o of outcomes) {
    if (o.n < 2) continue;
    m2 += (o.n - 1) * o.sigma ** 2;
    dof += o.n - 1;
  }
  return {
    outcomes: outcomes.map((o) => ({ mean: o.mean, sigma: o.n >= 2 ? o.sigma : NaN })),
    separation: Math.abs(outcomes[1]!.mean - outcomes[0]!.mean),
    sigma: dof > 0 ? Math.sqrt(m2 / dof) : NaN,
  };
}
