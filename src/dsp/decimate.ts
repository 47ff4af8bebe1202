/**
 * Sample-rate reduction by an integer factor: plain picking (after the caller's anti-alias
 * filter) and boxcar averaging over non-overlapping blocks.
 *
 * Inner kernels: assume an integer factor ≥ 1 and an output long enough (see the length helpers);
 * no checks in the loops. Chunked use stays aligned when every chunk length is a multiple of
 * `factor`.
 */

/** Number of samples `decimate` writes: ⌈length/factor⌉ (indices 0, factor, 2·factor, …). */
export function decimatedLength(length: number, factor: number): number {
  return Math.ceil(length / factor);
}

/**
 * Writes input[0], input[factor], input[2·factor], … into `output` (at least
 * `decimatedLength(input.length, factor)` long; may be `input` itself) and returns `output`.
 */
export function decimate(input: Float64Array, factor: number, output: Float64Array): Float64Array {
  const count = decimatedLength(input.length, factor);
  for (let i = 0, j = 0; i < count; i++, j += factor) output[i] = input[j];
  return output;
}

/** Number of samples `averageDown` writes: ⌊length/factor⌋ (an incomplete last block is dropped). */
export function averagedLength(length: number, factor: number): number {
  return Math.floor(length / factor);
}

/**
 * Writes the mean of each block input[i·factor … i·factor + factor − 1] into output[i] (at least
 * `averagedLength(input.length, factor)` long; may be `input` itself) and returns `output`.
 * Equivalent to a boxcar FIR of `factor` taps followed by picking every factor-th sample.
 */
export function averageDown(input: Float64Array, factor: number, output: Float64Array): Float64Array {
  const count = averagedLength(input.length, factor);
  for (let i = 0, j = 0; i < count; i++) {
    let sum = 0;
    for (let end = j + factor; j < end; j++) sum += input[j];
    output[i] = sum / factor;
  }
  return output;
}

/**
 * Anti-alias low-pass cutoff for decimation by `factor` from `sampleRate` (Hz):
 * 0.8 · (sampleRate / factor) / 2, i.e. 80 % of the new Nyquist frequency, leaving a transition
 * band for the filter to roll off before the first alias. // common practice, no source
 */
export function antiAliasCutoff(sampleRate: number, factor: number): number {
  return (0.8 * sampleRate) / (2 * factor);
}
