/**
 * The sequential 1/f generator (Timmer & König, Astron. Astrophys. 300, 707 (1995)) on one
 * continuous timeline, block pair after block pair: the reference the tests hold the engine's
 * random-access timeline (src/signal/flicker-timeline.ts) and its building blocks against
 * (src/signal/flicker.ts: the window, the bin powers, the block pairs).
 */
import { drawFlickerPair, FLICKER_MAX_BLOCK, FLICKER_MIN_BLOCK, flickerBinSigmas, flickerVariance, flickerWindow } from '../../src/signal/flicker.ts';
import { makeFft, nextPowerOfTwo } from '../../src/signal/fft.ts';
import type { NoiseStream } from '../../src/signal/stream.ts';

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
