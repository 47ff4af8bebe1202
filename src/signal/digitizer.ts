/**
 * The digitizer after the gain: clipping to its input range and, optionally, quantisation to
 * 2^bits codes (mid-rise: code c stands for low + (c + ½)·step, step = (high − low)/2^bits).
 * For noise much larger than a step the quantisation error is close to uniform on ±step/2 and
 * uncorrelated, i.e. white with variance step²/12 (Widrow, IRE Trans. Circuit Theory 3, 266
 * (1956)); the σ prediction adds that term.
 */

/** A digitizer's input range and resolution. */
export interface DigitizerTables {
  low: number;
  high: number;
  /** Number of codes 2^bits, or 0 for no quantisation (clipping only). */
  codes: number;
}

/** Quantisation step (high − low)/codes, 0 without quantisation. */
export function quantisationStep(d: DigitizerTables): number {
  return d.codes > 0 ? (d.high - d.low) / d.codes : 0;
}

/** Clips (and quantises) out[lo … hi) in place; returns the number of samples outside [low, high]. */
export function digitize(out: Float64Array, lo: number, hi: number, d: DigitizerTables): number {
  const { low, high, codes } = d;
  let clipped = 0;
  if (codes === 0) {
    for (let k = lo; k < hi; k++) {
      const x = out[k]!;
      if (x < low) { out[k] = low; clipped++; } else if (x > high) { out[k] = high; clipped++; }
    }
    return clipped;
  }
  const step = (high - low) / codes;
  const inverse = 1 / step;
  const top = codes - 1;
  for (let k = lo; k < hi; k++) {
    const x = out[k]!;
    if (x < low || x > high) clipped++;
    let c = Math.floor((x - low) * inverse);
    if (c < 0) c = 0; else if (c > top) c = top;
    out[k] = low + (c + 0.5) * step;
  }
  return clipped;
}
