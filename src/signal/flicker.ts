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
import { makeFft, nextPowerOfTwo, type Fft } from './fft.ts';
import type { NoiseStream } from './stream.ts';

/** Largest block length (FFT size) the generator will use. */
export const FLICKER_MAX_BLOCK = 2 ** 20;

/** Smallest block length the generator will use. */
export const FLICKER_MIN_BLOCK = 64;

/** Parameters of a flicker-noise source. */
export interface FlickerSpec {
  /** A in S(f) = A/f^α, unit²/Hz·Hz^α (so S(1 Hz) = A). */
  amplitude: number;
  /** α (> 0; 1 is classic 1/f). */
  exponent: number;
  /** Lower band edge in Hz (> 0). */
  fLo: number;
  /** Upper band edge in Hz (> fLo; clipped to fs/2). */
  fHi: number;
  /** Samples per second. */
  sampleRate: number;
  /** Requested block length (FFT size); default and minimum: 4·fs/fLo rounded up to a power of two. */
  blockLength?: number;
}

/** The block length and band the generator will actually use, with any warnings. */
export interface FlickerPlan {
  blockLength: number;
  fLo: number;
  fHi: number;
  warnings: string[];
}

/** A flicker-noise generator with an internal sample clock. */
export interface FlickerSource {
  /** Block length N (FFT size); blocks overlap by N/2. */
  readonly blockLength: number;
  /** Effective lower band edge (may be raised, see `warnings`). */
  readonly fLo: number;
  /** Effective upper band edge (may be clipped to fs/2). */
  readonly fHi: number;
  /** Variance of every sample, ∫S df over the effective band, unit². */
  readonly variance: number;
  /** Messages about parameters that were changed (raised fLo, clipped fHi, enlarged block). */
  readonly warnings: readonly string[];
  /** Index of the next sample on the timeline. */
  readonly position: number;
  /** Writes the next `count` samples into out[start …] and advances the clock; returns out. */
  fill(out: Float64Array, start: number, count: number): Float64Array;
  /** Adds the next `count` samples into out[start …] and advances the clock; returns out. */
  add(out: Float64Array, start: number, count: number): Float64Array;
  /** Advances the clock by `count` samples without producing them (blocks jumped over are not drawn). */
  skip(count: number): void;
}

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
 * Chooses the block length and effective band: N ≥ 4·fs/fLo, a power of two, at least
 * FLICKER_MIN_BLOCK and at most FLICKER_MAX_BLOCK. If 4·fs/fLo exceeds 2^20 (fLo below
 * 4·fs/2^20), fLo is raised to 4·fs/2^20 and a warning says so; fHi above fs/2 is clipped
 * with a warning. Throws RangeError on invalid parameters or when the raised fLo reaches fHi.
 */
export function planFlickerBlocks(spec: FlickerSpec): FlickerPlan {
  const { amplitude, exponent, sampleRate } = spec;
  if (!(amplitude >= 0) || !(exponent > 0) || !(sampleRate > 0) || !(spec.fLo > 0) || !(spec.fHi > spec.fLo)) {
    throw new RangeError(
      `flicker: need amplitude >= 0, exponent > 0, sampleRate > 0, 0 < fLo < fHi; got ${JSON.stringify(spec)}`,
    );
  }
  const warnings: string[] = [];
  let fLo = spec.fLo;
  let fHi = spec.fHi;
  const nyquist = sampleRate / 2;
  if (fHi > nyquist) {
    warnings.push(`flicker: fHi ${fHi} Hz is above fs/2 = ${nyquist} Hz; clipped to fs/2`);
    fHi = nyquist;
  }
  const needed = Math.ceil((4 * sampleRate) / fLo);
  let blockLength: number;
  if (needed > FLICKER_MAX_BLOCK) {
    const raised = (4 * sampleRate) / FLICKER_MAX_BLOCK;
    warnings.push(
      `flicker: fLo ${fLo} Hz needs blocks longer than 2^20 samples at fs = ${sampleRate} Hz; ` +
        `raised to 4·fs/2^20 = ${raised} Hz`,
    );
    fLo = raised;
    blockLength = FLICKER_MAX_BLOCK;
  } else {
    blockLength = Math.max(FLICKER_MIN_BLOCK, nextPowerOfTwo(needed));
  }
  if (spec.blockLength !== undefined) {
    const asked = spec.blockLength;
    const rounded = Math.min(FLICKER_MAX_BLOCK, nextPowerOfTwo(Math.max(1, Math.ceil(asked))));
    if (rounded < blockLength) {
      warnings.push(`flicker: block length ${asked} is shorter than 4·fs/fLo; using ${blockLength}`);
    } else {
      if (rounded !== asked) warnings.push(`flicker: block length ${asked} changed to ${rounded}`);
      blockLength = rounded;
    }
  }
  if (!(fLo < fHi)) {
    throw new RangeError(`flicker: effective band [${fLo}, ${fHi}] Hz is empty (fLo raised or fHi clipped)`);
  }
  return { blockLength, fLo, fHi, warnings };
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

/**
 * Makes a flicker-noise source on a continuous timeline starting at sample 0 (see the file
 * comment for the method). fLo below 4·fs/FLICKER_MAX_BLOCK is raised and fHi above fs/2 clipped; the
 * returned `warnings` list every change. Draws from `stream` lazily, block pair by block pair.
 */
export function makeFlickerSource(spec: FlickerSpec, stream: NoiseStream): FlickerSource {
  const plan = planFlickerBlocks(spec);
  const { blockLength: size, fLo, fHi } = plan;
  const { amplitude, exponent, sampleRate } = spec;
  const hop = size / 2;
  const partSigma = flickerBinSigmas(amplitude, exponent, fLo, fHi, sampleRate, size);
  const variance = flickerVariance(amplitude, exponent, fLo, fHi);
  // window[m] = sin(πm/N) for m = 0 … N/2; the falling weight cos(πm/N) is window[N/2 − m].
  const window = flickerWindow(size);

  const fft = makeFft(size);
  const spectrum = new Float64Array(2 * size);
  const pair = new Float64Array(2 * size);
  const carry = new Float64Array(hop);
  let pairIndex = -1;
  let carryBlock = -1;
  // Internal time starts half a block in, so sample 0 lies in blocks 0 and 1 (one FFT).
  let clock = hop;

  function drawPair(q: number): void {
    drawFlickerPair(partSigma, fft, spectrum, pair, stream);
    pairIndex = q;
  }

  /** Makes blocks h (rising) and h − 1 (falling) available for hop h. */
  function prepare(h: number): void {
    const q = Math.floor(h / 2);
    if (h % 2 === 0 && carryBlock !== h - 1) {
      // Block h − 1 is the odd (imaginary) block of the previous pair: keep its second half.
      if (pairIndex !== q - 1) drawPair(q - 1);
      for (let m = 0; m < hop; m++) carry[m] = pair[2 * (m + hop) + 1]!;
      carryBlock = h - 1;
    }
    if (pairIndex !== q) drawPair(q);
  }

  function produce(out: Float64Array, start: number, count: number, accumulate: boolean): Float64Array {
    let done = 0;
    while (done < count) {
      const h = Math.floor(clock / hop);
      const offset = clock - h * hop;
      const n = Math.min(count - done, hop - offset);
      prepare(h);
      const base = start + done;
      if (h % 2 === 0) {
        // rising: even block h = real part; falling: carried odd block h − 1.
        for (let i = 0; i < n; i++) {
          const m = offset + i;
          const v = pair[2 * m]! * window[m]! + carry[m]! * window[hop - m]!;
          out[base + i] = accumulate ? out[base + i]! + v : v;
        }
      } else {
        // rising: odd block h = imaginary part; falling: even block h − 1 = real part, second half.
        for (let i = 0; i < n; i++) {
          const m = offset + i;
          const v = pair[2 * m + 1]! * window[m]! + pair[2 * (m + hop)]! * window[hop - m]!;
          out[base + i] = accumulate ? out[base + i]! + v : v;
        }
      }
      done += n;
      clock += n;
    }
    return out;
  }

  return {
    blockLength: size,
    fLo,
    fHi,
    variance,
    warnings: plan.warnings,
    get position() {
      return clock - hop;
    },
    fill(out, start, count) {
      return produce(out, start, count, false);
    },
    add(out, start, count) {
      return produce(out, start, count, true);
    },
    skip(count) {
      clock += count;
    },
  };
}
