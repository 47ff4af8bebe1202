/**
 * 1/f^α (flicker) noise on a continuous timeline, by the method of Timmer & König
 * (Astron. Astrophys. 300, 707 (1995)): Fourier amplitudes with Gaussian real and imaginary
 * parts of variance ∝ S(f) at every frequency of a block, one inverse FFT (fft.js) per block.
 *
 * Target: one-sided PSD S(f) = A/f^α (unit²/Hz) for fLo ≤ f ≤ fHi, zero outside.
 *
 * Blocks and joins. A single block is periodic, and blocks drawn independently and simply
 * concatenated would make a step at every join and destroy correlations across it. Here the
 * timeline is covered by blocks of length N that overlap by N/2 (block j spans [jN/2, jN/2 + N)),
 * each weighted by the amplitude window a(n) = sin(πn/N), n ∈ [0, N). Each sample is the sum of
 * two blocks, weights sin(πm/N) and cos(πm/N) (m its offset in the newer block):
 *   - the window is 0 at both ends of every block, so a block's periodic wrap-around is never
 *     seen and the output has no steps;
 *   - the blocks are independent and zero-mean, so the variance at any sample is
 *     (sin² + cos²)·σ² = σ² exactly: the window is power-complementary, which is what independent
 *     blocks need (an amplitude-complementary window such as sin², Hann, would lose up to half
 *     the power mid-join: sin⁴ + cos⁴ ≥ ½);
 *   - averaged over time, the autocovariance R(τ) of one block is multiplied by the window's
 *     normalised autocorrelation c(τ) (c(0) = 1), i.e. the spectrum is smoothed by a positive
 *     kernel of unit area and width ≈ fs/N. For a power law the relative change of S over that
 *     width is ≈ α·(fs/N)/f, and the smoothing's effect is second order in it; with
 *     N ≥ 4·fs/fLo the kernel is narrower than fLo/4, so the level in [fLo, fHi] is preserved
 *     (edges excepted) while the total power is preserved exactly.
 *
 * Bin powers. Instead of S(f_k)·Δf, each bin gets the exact integral of S over the bin
 * [f_k − Δf/2, f_k + Δf/2] ∩ [fLo, fHi], so the variance of the output equals ∫S df exactly
 * (see {@link flickerVariance}) and each bin's level is S(f_k) to second order in Δf/f.
 *
 * Two blocks per FFT: a complex spectrum with independent circular Gaussian coefficients of
 * power P(|f_k|) at every bin k (no Hermitian symmetry) transforms into a complex series whose
 * real and imaginary parts are two independent real series with the target spectrum (because
 * P is even in f); block 2q is the real part and block 2q+1 the imaginary part of FFT number q.
 *
 * Determinism: a block pair is drawn from the stream when a sample it covers is first
 * requested, pairs in increasing order. `skip` draws nothing for pairs it jumps over whole.
 * So the values depend only on which samples were requested, not on how the calls were
 * chunked; and because the blocks are independent, the joint distribution of the requested
 * samples is the same as if every block had been drawn (skipping is exact in distribution).
 *
 * Memory: about 60·N bytes (≈ 63 MB at the 2^20 cap), dominated by the FFT buffers. The engine
 * uses the random-access, multi-rate timeline of flicker-timeline.ts, whose blocks are small.
 */
import type { Fft } from './fft.ts';
import type { NoiseStream } from './stream.ts';

/** Largest block length (FFT size) the generator will use. */
export const FLICKER_MAX_BLOCK = 2 ** 20;

/** Smallest block length the generator will use. */
export const FLICKER_MIN_BLOCK = 64;




/**
 * ∫ A f^−α df over [a, b] (0 < a ≤ b), unit²: A(b^(1−α) − a^(1−α))/(1−α), A·ln(b/a) at α = 1
 * (evaluated with expm1 so that α near 1 keeps its precision).
 */
export function flickerVariance(amplitude: number, exponent: number, a: number, b: number): number {
  if (!(b > a)) return 0;
  const logRatio = Math.log(b / a);
  const beta = 1 - exponent;
  if (Math.abs(beta * logRatio) < 1e-12) return amplitude * logRatio;
  return (amplitude * Math.pow(a, beta) * Math.expm1(beta * logRatio)) / beta;
}


/**
 * Per-bin standard deviation of the real and of the imaginary part of the random spectrum of a
 * block of length `size` at `sampleRate`, indexed by |k| ≤ N/2: bin k gets the exact integral of
 * A/f^α over [f_k − Δf/2, f_k + Δf/2] ∩ [fLo, fHi] times `weight(f_k)` (a power gain, e.g.
 * |H(f)|² of a filter the noise passes; default 1). A bin 0 < k < N/2 contributes
 * P_k/2 + P_(N−k)/2 = P_k to the variance of the real part; bins 0 and N/2 have no partner, so
 * they carry twice their band integral to contribute it once.
 */
export function flickerBinSigmas(
  amplitude: number, exponent: number, fLo: number, fHi: number, sampleRate: number, size: number,
  weight?: (f: number) => number,
): Float64Array {
  const hop = size / 2;
  const binWidth = sampleRate / size;
  const partSigma = new Float64Array(hop + 1);
  for (let k = 0; k <= hop; k++) {
    const lo = Math.max(fLo, (k - 0.5) * binWidth);
    const hi = Math.min(fHi, (k + 0.5) * binWidth, sampleRate / 2);
    let power = flickerVariance(amplitude, exponent, lo, hi);
    if (power > 0 && weight) power *= weight(k * binWidth);
    if (k === 0 || k === hop) power *= 2;
    partSigma[k] = Math.sqrt(power / 2);
  }
  return partSigma;
}

/** The rising half of the cross-fade window: window[m] = sin(πm/N), m = 0 … N/2 (window[N/2] = 1). */
export function flickerWindow(size: number): Float64Array {
  const hop = size / 2;
  const window = new Float64Array(hop + 1);
  for (let m = 0; m <= hop; m++) window[m] = Math.sin((Math.PI * m) / size);
  window[hop] = 1;
  return window;
}

/**
 * Draws one block pair: normals from `stream` scaled by `partSigma`, one forward FFT into `pair`
 * (interleaved; real parts = even block, imaginary parts = odd block). `spectrum` is scratch of
 * length 2N. With a bulk `fillNormals` the stream gives all 2N normals at once (bin by bin, real
 * part then imaginary part); otherwise they are drawn one by one, only for bins with power.
 */
export function drawFlickerPair(
  partSigma: Float64Array, fft: Fft, spectrum: Float64Array, pair: Float64Array, stream: NoiseStream,
): Float64Array {
  const size = fft.size;
  const hop = size / 2;
  if (stream.fillNormals) {
    stream.fillNormals(spectrum, 0, 2 * size);
    for (let k = 0; k < size; k++) {
      const sigma = partSigma[k <= hop ? k : size - k]!;
      spectrum[2 * k] *= sigma;
      spectrum[2 * k + 1] *= sigma;
    }
    return fft.complexForward(spectrum, pair);
  }
  for (let k = 0; k < size; k++) {
    const sigma = partSigma[k <= hop ? k : size - k]!;
    if (sigma > 0) {
      spectrum[2 * k] = sigma * stream.nextNormal();
      spectrum[2 * k + 1] = sigma * stream.nextNormal();
    } else {
      spectrum[2 * k] = 0;
      spectrum[2 * k + 1] = 0;
    }
  }
  return fft.complexForward(spectrum, pair);
}

