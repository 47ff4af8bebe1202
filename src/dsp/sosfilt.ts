/**
 * Filtering by a cascade of second-order sections, Direct Form II transposed per section (the
 * structure and state layout of scipy.signal's `sosfilt`; Oppenheim & Schafer, *Discrete-Time
 * Signal Processing*, 3rd ed., 2010, ch. 6).
 *
 * Inner kernel: assumes a valid `sos` (rows b0 b1 b2 a0 a1 a2 with a0 = 1, as the designs in
 * this folder produce) and a state of length 2 × sections; no checks in the loop.
 */

/** Zero initial state for `sections` second-order sections: Float64Array(2 × sections), layout [z0, z1] per section. */
export function makeSectionState(sections: number): Float64Array {
  return new Float64Array(2 * sections);
}

/**
 * Filters `input` through the sections of `sos` into `output` (same length; may be `input`
 * itself) and returns `output`. `state` holds the delay registers before the first sample and is
 * overwritten with those after the last one, so consecutive calls continue one record.
 */
export function applySections(
  sos: Float64Array,
  input: Float64Array,
  output: Float64Array,
  state: Float64Array,
): Float64Array {
  const sections = state.length >> 1;
  const length = input.length;
  if (sections === 0 && output !== input) output.set(input);
  for (let s = 0; s < sections; s++) {
    const r = 6 * s;
    const b0 = sos[r];
    const b1 = sos[r + 1];
    const b2 = sos[r + 2];
    const a1 = sos[r + 4];
    const a2 = sos[r + 5];
    let z0 = state[2 * s];
    let z1 = state[2 * s + 1];
    // Section 0 reads the input; later sections work in place on the output.
    const source = s === 0 ? input : output;
    for (let i = 0; i < length; i++) {
      const x = source[i];
      const y = b0 * x + z0;
      z0 = b1 * x - a1 * y + z1;
      z1 = b2 * x - a2 * y;
      output[i] = y;
    }
    state[2 * s] = z0;
    state[2 * s + 1] = z1;
  }
  return output;
}
