/**
 * Thin wrapper over fft.js (radix-4 Cooley–Tukey; Cooley & Tukey, Math. Comput. 19, 297 (1965))
 * with reusable buffers, so callers never touch its interleaved-array conventions.
 *
 * Conventions: forward transform X_k = Σ_n x_n e^(−2πi kn/N) (no scaling); the inverse
 * includes the 1/N factor. Complex arrays are interleaved [re0, im0, re1, im1, …].
 * The size must be a power of two ≥ 4 (fft.js requires a power of two > 1; its real
 * transform needs at least 4). Inner kernels: inputs are assumed valid beyond that check.
 */
import FFT from 'fft.js';

/** A reusable FFT of one size: real→complex half spectrum and complex↔complex transforms. */
export interface Fft {
  /** Transform length N (a power of two). */
  readonly size: number;
  /**
   * Spectrum of a real block: reads input[offset … offset+N), writes bins 0 … N/2 interleaved
   * into out (length ≥ N + 2) and returns out. The bins above N/2 are the conjugates.
   */
  realForward(input: ArrayLike<number>, out: Float64Array, offset?: number): Float64Array;
  /** Forward complex transform of interleaved `input` (length 2N) into `out` (length 2N, distinct). */
  complexForward(input: Float64Array, out: Float64Array): Float64Array;
  /** Inverse complex transform (with 1/N) of interleaved `input` into `out` (distinct). */
  complexInverse(input: Float64Array, out: Float64Array): Float64Array;
}

/** True when n is a power of two ≥ 1. */
export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 1 && (n & (n - 1)) === 0 && n <= 2 ** 30;
}

/** Smallest power of two ≥ n (n ≥ 1, up to 2^30). */
export function nextPowerOfTwo(n: number): number {
  let p = 1;
  while (p < n && p < 2 ** 30) p *= 2;
  return p;
}

/** Makes a reusable FFT of the given power-of-two size (≥ 4); allocates its buffers once. */
export function makeFft(size: number): Fft {
  if (!isPowerOfTwo(size) || size < 4) throw new RangeError(`FFT size must be a power of two >= 4, got ${size}`);
  const engine = new FFT(size);
  // Buffers of the real transform, allocated on first use (complex-only users never pay).
  let realIn: Float64Array | null = null;
  let full: Float64Array | null = null;
  return {
    size,
    realForward(input, out, offset = 0) {
      if (realIn === null || full === null) {
        realIn = new Float64Array(size);
        full = new Float64Array(2 * size);
      }
      for (let i = 0; i < size; i++) realIn[i] = input[offset + i]!;
      // fft.js fills bins 0 … N/2 correctly and uses the rest of `full` as scratch.
      engine.realTransform(full, realIn);
      const last = size + 2;
      for (let i = 0; i < last; i++) out[i] = full[i]!;
      return out;
    },
    complexForward(input, out) {
      engine.transform(out, input);
      return out;
    },
    complexInverse(input, out) {
      engine.inverseTransform(out, input);
      return out;
    },
  };
}
