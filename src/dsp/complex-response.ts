/**
 * A complex-valued series stored as two parallel typed arrays: the shape of every frequency
 * response (and of the pole/zero lists) produced by the filter designs in this folder.
 */

/** Complex values as parallel real and imaginary parts (same length). */
export interface ComplexSeries {
  re: Float64Array;
  im: Float64Array;
}

/** Allocates a zero-filled complex series of `length` values. */
export function makeComplexSeries(length: number): ComplexSeries {
  return { re: new Float64Array(length), im: new Float64Array(length) };
}

/** Writes |z| of every value of `series` into `output` (same length) and returns it. */
export function complexMagnitude(series: ComplexSeries, output: Float64Array): Float64Array {
  const { re, im } = series;
  for (let i = 0; i < re.length; i++) output[i] = Math.hypot(re[i], im[i]);
  return output;
}
