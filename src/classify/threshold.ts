/**
 * Threshold decisions on an integrated (projected) value: the midpoint rule, the threshold that
 * minimises the misassignment count on two calibration samples, and the decision itself.
 *
 * Convention everywhere: with `highIsOne`, a value strictly above the threshold reports outcome 1;
 * without it, a value strictly below reports outcome 1. A value equal to the threshold reports 0.
 */

/** A threshold rule: the threshold and which side of it is outcome 1. */
export interface ThresholdRule {
  threshold: number;
  /** true: values above the threshold are outcome 1; false: values below are. */
  highIsOne: boolean;
}

/** The count-minimising threshold with the misassignments it leaves on the calibration samples. */
export interface OptimalThreshold extends ThresholdRule {
  /** Total misassigned calibration values, errors0 + errors1 (the minimum over all thresholds). */
  errors: number;
  /** values0 entries assigned outcome 1. */
  errors0: number;
  /** values1 entries assigned outcome 0. */
  errors1: number;
}

/** Midpoint rule: threshold (μ0 + μ1)/2, outcome 1 on the side of μ1 (above when μ1 ≥ μ0). */
export function midpointThreshold(mean0: number, mean1: number): ThresholdRule {
  return { threshold: 0.5 * (mean0 + mean1), highIsOne: mean1 >= mean0 };
}

/** Outcome (0 or 1) of one value under a threshold rule; a value equal to the threshold gives 0. */
export function classifyByThreshold(value: number, threshold: number, highIsOne: boolean): 0 | 1 {
  return highIsOne ? (value > threshold ? 1 : 0) : value < threshold ? 1 : 0;
}

/** Outcomes of values[i] into out[i] (same convention as `classifyByThreshold`); returns out. */
export function classifyAllByThreshold(
  values: Float64Array,
  threshold: number,
  highIsOne: boolean,
  out: Uint8Array = new Uint8Array(values.length),
): Uint8Array {
  if (highIsOne) for (let i = 0; i < values.length; i++) out[i] = values[i]! > threshold ? 1 : 0;
  else for (let i = 0; i < values.length; i++) out[i] = values[i]! < threshold ? 1 : 0;
  return out;
}

function mean(values: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < values.length; i++) sum += values[i]!;
  return sum / values.length;
}

/**
 * Threshold minimising the total misassignment count of two calibration samples
 * (values0 prepared as outcome 0, values1 as outcome 1), both orientations tried.
 * Method (common practice): sort, sweep the gaps between consecutive distinct pooled values,
 * O((n0 + n1) log(n0 + n1)). The minimum is reached on runs of consecutive gaps; the threshold is
 * the midpoint of a run. Ties between runs: a bounded run before one reaching ±∞, then the run
 * whose midpoint is nearest (μ̂0 + μ̂1)/2, then the orientation of the sample means. When the best
 * rule assigns every value to one outcome the threshold is ±Infinity. Needs n0, n1 ≥ 1, no NaN.
 */
export function optimalThreshold(values0: Float64Array, values1: Float64Array): OptimalThreshold {
  const n0 = values0.length;
  const n1 = values1.length;
  if (n0 === 0 || n1 === 0) throw new RangeError('optimalThreshold: each calibration sample needs at least one value');
  // a NaN never equals itself: the sweep below would never pass it (it used to loop for ever)
  for (const values of [values0, values1]) {
    for (let i = 0; i < values.length; i++) if (Number.isNaN(values[i]!)) throw new RangeError('optimalThreshold: a calibration value is NaN');
  }
  const sorted0 = Float64Array.from(values0).sort();
  const sorted1 = Float64Array.from(values1).sort();

  // Distinct pooled values d[0..D) and, for gap g (between d[g−1] and d[g], index g = 0..D),
  // the count of outcome-1 errors under highIsOne: errorsHigh[g] = #values1 ≤ d[g−1] + #values0 > d[g−1].
  const distinct = new Float64Array(n0 + n1);
  const errorsHigh = new Int32Array(n0 + n1 + 1);
  errorsHigh[0] = n0;
  let count = 0;
  let i0 = 0;
  let i1 = 0;
  while (i0 < n0 || i1 < n1) {
    const a = i0 < n0 ? sorted0[i0]! : Infinity;
    const b = i1 < n1 ? sorted1[i1]! : Infinity;
    const v = a < b ? a : b;
    while (i0 < n0 && sorted0[i0] === v) i0++;
    while (i1 < n1 && sorted1[i1] === v) i1++;
    distinct[count] = v;
    count++;
    errorsHigh[count] = i1 + (n0 - i0);
  }
  const total = n0 + n1;
  let best = total;
  for (let g = 0; g <= count; g++) {
    const e = errorsHigh[g]!;
    if (e < best) best = e;
    if (total - e < best) best = total - e;
  }

  const meanMid = 0.5 * (mean(values0) + mean(values1));
  const meansHighIsOne = mean(values1) >= mean(values0);
  let chosen: ThresholdRule | null = null;
  let chosenBounded = false;
  let chosenDistance = Infinity;
  for (const highIsOne of [meansHighIsOne, !meansHighIsOne]) {
    let g = 0;
    while (g <= count) {
      const e = highIsOne ? errorsHigh[g]! : total - errorsHigh[g]!;
      if (e !== best) {
        g++;
        continue;
      }
      const first = g;
      while (g + 1 <= count && (highIsOne ? errorsHigh[g + 1]! : total - errorsHigh[g + 1]!) === best) g++;
      const low = first === 0 ? -Infinity : distinct[first - 1]!;
      const high = g === count ? Infinity : distinct[g]!;
      const bounded = Number.isFinite(low) && Number.isFinite(high);
      const threshold = bounded ? 0.5 * (low + high) : Number.isFinite(low) ? Infinity : -Infinity;
      const distance = bounded ? Math.abs(threshold - meanMid) : Infinity;
      const better =
        chosen === null || (bounded && !chosenBounded) || (bounded === chosenBounded && distance < chosenDistance);
      if (better) {
        chosen = { threshold, highIsOne };
        chosenBounded = bounded;
        chosenDistance = distance;
      }
      g++;
    }
  }
  const rule = chosen!;
  let errors0 = 0;
  let errors1 = 0;
  for (let i = 0; i < n0; i++) errors0 += classifyByThreshold(values0[i]!, rule.threshold, rule.highIsOne);
  for (let i = 0; i < n1; i++) errors1 += 1 - classifyByThreshold(values1[i]!, rule.threshold, rule.highIsOne);
  return { threshold: rule.threshold, highIsOne: rule.highIsOne, errors: errors0 + errors1, errors0, errors1 };
}
