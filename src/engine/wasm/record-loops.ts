/**
 * The trace engine's per-sample loops on one point's arrays: white noise onto a record, and the
 * record's dot products with each pipeline's kernels. `RecordKernel` runs them as WebAssembly
 * (source/record.ts); `TypeScriptRecordLoops` runs the TypeScript loops (RandomStream.addNormalsOnto,
 * dotRange, dotRangePair), which are the reference, and which serve records too long for a
 * WebAssembly memory. Both give the same numbers to the bit; only the speed differs.
 *
 * RecordKernel copies the waveforms and kernels once into its instance's memory; `record` is a
 * view of that memory, so every other stage reads and writes the record as an ordinary
 * Float64Array.
 *
 * A record of several channels (baseband I and Q) is stored channel-major, channels × samples
 * (signal/carrier.ts), and so are the waveforms and kernels: a value is the sum of each channel's
 * dot products over its [lo, hi), channel 0 first.
 */
import { dotRange, dotRangePair } from '../../dsp/integrate.ts';
import type { RandomStream } from '../../random/stream.ts';
import { f64Slot, i32Slot, LAYOUT } from './layout.ts';
import { instantiateKernels, kernelsAvailable, MAX_KERNEL_BYTES } from './memory.ts';

interface Exports {
  addNormalsOnto(out: number, base: number, count: number, sigma: number): void;
  dot(a: number, x: number, lo: number, hi: number): void;
  dotPair(a: number, b: number, x: number, lo: number, hi: number): void;
}

/** A pipeline's kernels inside the instance (byte offsets; quadrature −1 at baseband). */
interface PlacedKernels { inPhase: number; quadrature: number; lo: number; hi: number }

export interface PipelineKernels { inPhase: Float64Array; quadrature: Float64Array | null; lo: number; hi: number }

/** The record loops of one point (either implementation). */
export interface RecordLoops {
  /** The record, channels × samples long. */
  readonly record: Float64Array;
  noiseOntoWaveform(stream: RandomStream, wave: number, lo: number, hi: number, sigma: number): void;
  /** record[lo … hi) += sigma·N(0,1) from `stream` (RandomStream.addNormals); nothing when sigma ≤ 0. */
  addNoise(stream: RandomStream, lo: number, hi: number, sigma: number): void;
  /** Pipeline p's integrated values into out[0] (I) and out[1] (Q, 0 at baseband), summed over the channels. */
  values(p: number, out: Float64Array): void;
}

/** Bytes of a RecordKernel's arrays (waveforms, I and Q kernels per pipeline, record), each `entries` long. */
function kernelBytes(entries: number, states: number, pipelines: number): number {
  return (states + 1 + 2 * pipelines) * entries * 8;
}

/**
 * The record loops of a point whose record has `channels` channels of `samples` samples:
 * WebAssembly, or TypeScript when the arrays would not fit in a WebAssembly memory (`maxBytes`,
 * MAX_KERNEL_BYTES by default) or WebAssembly is unavailable.
 */
export function makeRecordLoops(
  samples: number, waveforms: readonly Float64Array[], pipelines: readonly PipelineKernels[], maxBytes = MAX_KERNEL_BYTES, channels = 1,
): RecordLoops {
  return kernelsAvailable() && kernelBytes(channels * samples, waveforms.length, pipelines.length) <= maxBytes
    ? new RecordKernel(samples, waveforms, pipelines, channels)
    : new TypeScriptRecordLoops(samples, waveforms, pipelines, channels);
}

/** The TypeScript loops, the reference of RecordKernel. */
export class TypeScriptRecordLoops implements RecordLoops {
  readonly record: Float64Array;
  /** One channel's values, added to the first's. */
  private readonly more = new Float64Array(2);

  constructor(
    private readonly samples: number, private readonly waveforms: readonly Float64Array[], private readonly pipelines: readonly PipelineKernels[],
    channels = 1,
  ) {
    this.record = new Float64Array(channels * samples);
  }

  noiseOntoWaveform(stream: RandomStream, wave: number, lo: number, hi: number, sigma: number): void {
    stream.addNormalsOnto(this.record, this.waveforms[wave]!, lo, hi - lo, sigma);
  }

  addNoise(stream: RandomStream, lo: number, hi: number, sigma: number): void {
    if (sigma > 0 && hi > lo) stream.addNormals(this.record, lo, hi - lo, sigma);
  }

  values(p: number, out: Float64Array): void {
    const k = this.pipelines[p]!;
    this.channelValues(k, 0, out);
    for (let at = this.samples; at < this.record.length; at += this.samples) {
      this.channelValues(k, at, this.more);
      out[0] += this.more[0]!;
      out[1] += this.more[1]!;
    }
  }

  /** The values of the channel that starts at entry `at`. */
  private channelValues(k: PipelineKernels, at: number, out: Float64Array): void {
    if (k.quadrature) dotRangePair(k.inPhase, k.quadrature, this.record, at + k.lo, at + k.hi, out);
    else {
      out[0] = dotRange(k.inPhase, this.record, at + k.lo, at + k.hi);
      out[1] = 0;
    }
  }
}

/** The WebAssembly loops (source/record.ts addNormalsOnto, dot, dotPair). */
export class RecordKernel implements RecordLoops {
  /** The record, `samples` long, in the instance's memory. */
  readonly record: Float64Array;
  private readonly exports: Exports;
  private readonly state: Int32Array;
  private readonly result: Float64Array;
  private readonly waves: number[];
  private readonly kernels: PlacedKernels[];
  private readonly recordAt: number;
  /** Entries per channel, and the record's channels. */
  private readonly samples: number;
  private readonly channels: number;

  constructor(perChannel: number, waveforms: readonly Float64Array[], pipelines: readonly PipelineKernels[], channels = 1) {
    const samples = channels * perChannel;
    this.samples = perChannel;
    this.channels = channels;
    const { buffer, exports } = instantiateKernels(kernelBytes(samples, waveforms.length, pipelines.length));
    this.exports = exports as unknown as Exports;
    this.state = i32Slot(buffer, 'stream');
    this.result = f64Slot(buffer, 'dotResults');
    let next: number = LAYOUT.arrays;
    const place = (values: Float64Array | null): number => {
      const at = next;
      next += samples * 8;
      if (values) new Float64Array(buffer, at, samples).set(values.subarray(0, samples));
      return at;
    };
    this.waves = waveforms.map(place);
    this.kernels = pipelines.map((k) => ({ inPhase: place(k.inPhase), quadrature: k.quadrature ? place(k.quadrature) : -1, lo: k.lo, hi: k.hi }));
    this.recordAt = place(null);
    this.record = new Float64Array(buffer, this.recordAt, samples);
  }

  noiseOntoWaveform(stream: RandomStream, wave: number, lo: number, hi: number, sigma: number): void {
    this.state.set(stream.s);
    this.exports.addNormalsOnto(this.recordAt + lo * 8, this.waves[wave]! + lo * 8, hi - lo, sigma);
    stream.s.set(this.state);
  }

  addNoise(stream: RandomStream, lo: number, hi: number, sigma: number): void {
    if (!(sigma > 0) || hi <= lo) return;
    const at = this.recordAt + lo * 8;
    this.state.set(stream.s);
    this.exports.addNormalsOnto(at, at, hi - lo, sigma);
    stream.s.set(this.state);
  }

  values(p: number, out: Float64Array): void {
    const k = this.kernels[p]!;
    this.channelValues(k, 0);
    out[0] = this.result[0]!;
    out[1] = k.quadrature >= 0 ? this.result[1]! : 0;
    for (let c = 1; c < this.channels; c++) {
      this.channelValues(k, c * this.samples);
      out[0] += this.result[0]!;
      out[1] += k.quadrature >= 0 ? this.result[1]! : 0;
    }
  }

  /** The dot products of the channel that starts at entry `at`, into the result slot. */
  private channelValues(k: PlacedKernels, at: number): void {
    if (k.quadrature >= 0) this.exports.dotPair(k.inPhase, k.quadrature, this.recordAt, at + k.lo, at + k.hi);
    else this.exports.dot(k.inPhase, this.recordAt, at + k.lo, at + k.hi);
  }
}
