/**
 * Data preparation for plots, pure: histogram counts, a min/max envelope that keeps the look of
 * a long trace in few points, a moving average, and slices of a sweep grid through one point.
 */

/** Counts of `values` in `bins` equal bins over [lo, hi) (values outside are dropped). */
export function histogramCounts(values: Float64Array, lo: number, hi: number, bins: number): Float64Array {
  const counts = new Float64Array(bins);
  const width = (hi - lo) / bins;
  for (let i = 0; i < values.length; i++) {
    const k = Math.floor((values[i]! - lo) / width);
    if (k >= 0 && k < bins) counts[k]!++;
    else if (values[i] === hi) counts[bins - 1]!++;
  }
  return counts;
}

/** Smallest and largest finite value over several arrays ([NaN, NaN] when there is none). */
export function extent(arrays: readonly Float64Array[]): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (const a of arrays) for (let i = 0; i < a.length; i++) {
    const v = a[i]!;
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return lo <= hi ? [lo, hi] : [NaN, NaN];
}

/**
 * At most 2·buckets points (index, value) keeping each bucket's minimum and maximum in time
 * order, so a decimated trace keeps its envelope. Short inputs come back whole.
 */
export function envelope(values: Float64Array, lo: number, hi: number, buckets: number): { index: number[]; value: number[] } {
  const index: number[] = [], value: number[] = [];
  const n = hi - lo;
  if (n <= 2 * buckets) {
    for (let k = lo; k < hi; k++) { index.push(k); value.push(values[k]!); }
    return { index, value };
  }
  for (let b = 0; b < buckets; b++) {
    const from = lo + Math.floor((b * n) / buckets), to = lo + Math.floor(((b + 1) * n) / buckets);
    let kMin = from, kMax = from;
    for (let k = from; k < to; k++) {
      if (values[k]! < values[kMin]!) kMin = k;
      if (values[k]! > values[kMax]!) kMax = k;
    }
    const [a, c] = kMin <= kMax ? [kMin, kMax] : [kMax, kMin];
    index.push(a, c);
    value.push(values[a]!, values[c]!);
  }
  return { index, value };
}

/** Centred moving average of width w over [lo, hi) (the ends average what they have), into out. */
export function movingAverage(values: Float64Array, lo: number, hi: number, w: number, out: Float64Array): Float64Array {
  const half = Math.floor(w / 2);
  const prefix = new Float64Array(hi - lo + 1);
  for (let k = lo; k < hi; k++) prefix[k - lo + 1] = prefix[k - lo]! + values[k]!;
  for (let k = lo; k < hi; k++) {
    const a = Math.max(lo, k - half), b = Math.min(hi, k - half + w);
    out[k] = (prefix[b - lo]! - prefix[a - lo]!) / (b - a);
  }
  return out;
}

/**
 * Indices of the points that lie on the line through `through` along `axis`: every other
 * axis value equal to the one at `through`.
 */
export function sliceThrough(values: readonly (readonly number[])[], through: number, axis: number): number[] {
  const ref = values[through]!;
  const out: number[] = [];
  values.forEach((v, i) => {
    if (v.every((x, a) => a === axis || x === ref[a])) out.push(i);
  });
  return out;
}
