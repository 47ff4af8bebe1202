/**
 * Two-sample Kolmogorov–Smirnov test with the asymptotic p-value.
 *
 * Statistic D = sup |F₁(x) − F₂(x)| over the two empirical distribution functions.
 * p-value from the Kolmogorov distribution, Q_KS(λ) = 2 Σ_{k≥1} (−1)^{k−1} e^{−2k²λ²}
 * (Kolmogorov, Giornale dell'Istituto Italiano degli Attuari 4, 83 (1933)), at
 * λ = (√nₑ + 0.12 + 0.11/√nₑ)·D with nₑ = n·m/(n + m) (Stephens, J. R. Stat. Soc. B 32, 115
 * (1970)). For small λ the equivalent theta-function form
 * 1 − (√(2π)/λ) Σ_{k≥1} e^{−(2k−1)²π²/(8λ²)} is used, which converges fast there.
 * The approximation is good for nₑ ≳ 4 and p ≲ 0.9; it is not the exact finite-sample law.
 */

/** Result of a two-sample Kolmogorov–Smirnov test. */
export interface KsResult {
  /** D = sup |F₁ − F₂|, in [0, 1]. */
  statistic: number;
  /** Asymptotic two-sided p-value, in [0, 1] (NaN when a sample is empty). */
  pValue: number;
  /** Effective sample size nₑ = n·m/(n + m). */
  effectiveN: number;
}

/** Kolmogorov survival function Q_KS(λ) = P(K > λ), K the Kolmogorov distribution. */
export function kolmogorovTail(lambda: number): number {
  if (Number.isNaN(lambda)) return NaN;
  if (lambda <= 0) return 1;
  if (lambda < 1.18) {
    // Theta-function form of the CDF; terms fall off as e^{−(2k−1)²π²/(8λ²)}.
    const w = -(Math.PI * Math.PI) / (8 * lambda * lambda);
    let sum = 0;
    for (let k = 1; k <= 6; k++) {
      const j = 2 * k - 1;
      sum += Math.exp(w * j * j);
    }
    return Math.min(1, Math.max(0, 1 - (Math.sqrt(2 * Math.PI) / lambda) * sum));
  }
  const w = -2 * lambda * lambda;
  let sum = 0;
  let sign = 1;
  for (let k = 1; k <= 100; k++) {
    const term = Math.exp(w * k * k);
    sum += sign * term;
    if (term < 1e-17 * sum) break;
    sign = -sign;
  }
  return Math.min(1, Math.max(0, 2 * sum));
}

/** Two-sample KS statistic D (inputs are not modified; sorted copies are used; no NaN allowed). */
export function ksStatistic(first: Float64Array, second: Float64Array): number {
  const x = Float64Array.from(first).sort();
  const y = Float64Array.from(second).sort();
  const n = x.length;
  const m = y.length;
  if (n === 0 || m === 0) return NaN;
  let i = 0;
  let j = 0;
  let largest = 0;
  while (i < n && j < m) {
    const value = x[i] <= y[j] ? x[i] : y[j];
    // Step past every copy of the smaller value in both samples, so ties are handled.
    while (i < n && x[i] === value) i++;
    while (j < m && y[j] === value) j++;
    const gap = Math.abs(i / n - j / m);
    if (gap > largest) largest = gap;
  }
  return largest;
}

/** Two-sample Kolmogorov–Smirnov test: statistic, asymptotic p-value (Stephens-corrected). */
export function ksTwoSample(first: Float64Array, second: Float64Array): KsResult {
  const n = first.length;
  const m = second.length;
  const effectiveN = n + m === 0 ? 0 : (n * m) / (n + m);
  if (n === 0 || m === 0) return { statistic: NaN, pValue: NaN, effectiveN };
  const statistic = ksStatistic(first, second);
  const root = Math.sqrt(effectiveN);
  const pValue = kolmogorovTail((root + 0.12 + 0.11 / root) * statistic);
  return { statistic, pValue, effectiveN };
}
