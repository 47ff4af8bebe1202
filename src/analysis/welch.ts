/**
 * Welch power spectral density estimate (Welch, IEEE Trans. Audio Electroacoust. 15, 70 (1967)):
 * the record is cut into segments of length L overlapping by 50 %, each segment has its mean
 * removed (optional), is multiplied by a periodic Hann window w and transformed; the averaged
 * periodograms are normalised to a one-sided density in unit²/Hz:
 *
 *   S(f_k) = c_k · |X_k|² / (fs · Σ w²),   c_k = 2 for 0 < k < L/2, c_k = 1 at k = 0 and L/2,
 *
 * so that Σ_k S(f_k)·fs/L equals the mean square of the (windowed) record (Parseval), and white
 * noise of variance σ² gives S = 2σ²/fs. Same normalisation as scipy.signal.welch with
 * window='hann', noverlap=L/2, scaling='density', return_onesided=True.
 *
 * The segments may also come from many separate stretches (recorded traces cut where the level
 * changes): a {@link WelchSegmenter} adds the raw periodograms of each stretch's segments into a
 * caller's sum, and {@link welchFromSums} normalises any such sum.
 */
import { makeFft } from '../signal/fft.ts';

/** Options of {@link welchDensity}. */
export interface WelchOptions {
  /** Segment length L: a power of two ≥ 4, not longer than the record. */
  segmentLength: number;
  /** Remove each segment's mean before windowing (default true, like scipy's detrend='constant'). */
  removeMean?: boolean;
}

/** A one-sided PSD estimate on the grid f_k = k·fs/L, k = 0 … L/2. */
export interface WelchEstimate {
  /** Frequencies in Hz (length L/2 + 1). */
  frequencies: Float64Array;
  /** One-sided density in unit²/Hz (length L/2 + 1). */
  density: Float64Array;
  /** Number of segments averaged. */
  segments: number;
}

/** Cuts stretches into 50 %-overlapping Hann segments and sums their raw periodograms |X_k|². */
export interface WelchSegmenter {
  readonly segmentLength: number;
  /** The periodic Hann window (length L). */
  readonly window: Float64Array;
  /** Σ w². */
  readonly windowPower: number;
  /**
   * Adds |X_k|² (k = 0 … L/2) of every segment of x[lo, hi) into sums[offset + k] and returns the
   * number of segments (0 when the stretch is shorter than L).
   */
  addStretch(x: ArrayLike<number>, lo: number, hi: number, sums: Float64Array, offset?: number): number;
}

/** A segmenter of segment length L (a power of two ≥ 4). */
export function makeWelchSegmenter(segmentLength: number, removeMean = true): WelchSegmenter {
  const length = segmentLength;
  const fft = makeFft(length);
  const hop = length / 2;
  const half = length / 2;
  const window = new Float64Array(length);
  let windowPower = 0;
  for (let n = 0; n < length; n++) {
    const w = 0.5 - 0.5 * Math.cos((2 * Math.PI * n) / length);
    window[n] = w;
    windowPower += w * w;
  }
  const segment = new Float64Array(length);
  const spectrum = new Float64Array(length + 2);
  return {
    segmentLength, window, windowPower,
    addStretch(x, lo, hi, sums, at = 0) {
      if (hi - lo < length) return 0;
      const segments = Math.floor((hi - lo - length) / hop) + 1;
      for (let s = 0; s < segments; s++) {
        const offset = lo + s * hop;
        let mean = 0;
        if (removeMean) {
          for (let n = 0; n < length; n++) mean += x[offset + n]!;
          mean /= length;
        }
        for (let n = 0; n < length; n++) segment[n] = (x[offset + n]! - mean) * window[n]!;
        fft.realForward(segment, spectrum);
        for (let k = 0; k <= half; k++) {
          const re = spectrum[2 * k]!;
          const im = spectrum[2 * k + 1]!;
          sums[at + k] = sums[at + k]! + re * re + im * im;
        }
      }
      return segments;
    },
  };
}

/** The density from summed raw periodograms `sums` (length L/2 + 1) of `segments` segments; `sums` is scaled in place. */
export function welchFromSums(sums: Float64Array, segments: number, sampleRate: number, segmenter: Pick<WelchSegmenter, 'segmentLength' | 'windowPower'>): WelchEstimate {
  const half = segmenter.segmentLength / 2;
  const scale = 1 / (segments * sampleRate * segmenter.windowPower);
  const frequencies = new Float64Array(half + 1);
  for (let k = 0; k <= half; k++) {
    const sided = k === 0 || k === half ? 1 : 2;
    sums[k] = sums[k]! * scale * sided;
    frequencies[k] = (k * sampleRate) / segmenter.segmentLength;
  }
  return { frequencies, density: sums, segments };
}

/** Welch PSD estimate of `x` sampled at `sampleRate` (Hann window, 50 % overlap, one-sided density). */
export function welchDensity(x: Float64Array, sampleRate: number, options: WelchOptions): WelchEstimate {
  const length = options.segmentLength;
  if (length > x.length) throw new RangeError(`segment length ${length} exceeds record length ${x.length}`);
  const segmenter = makeWelchSegmenter(length, options.removeMean ?? true);
  const sums = new Float64Array(length / 2 + 1);
  const segments = segmenter.addStretch(x, 0, x.length, sums);
  return welchFromSums(sums, segments, sampleRate, segmenter);
}
