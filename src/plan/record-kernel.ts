/**
 * The trace engine's per-sample loops on one point's arrays, run as WebAssembly
 * (kernels.wat): white noise onto a record, and the record's dot products with each
 * pipeline's kernels. The numbers are those of the TypeScript loops (RandomStream.addNormalsOnto,
 * dotRange, dotRangePair) to the bit; only the speed differs.
 *
 * The waveforms and kernels are copied once into the instance's memory; `record` is a view of
 * that memory, so every other stage reads and writes the record as an ordinary Float64Array.
 */
import type { RandomStream } from '../random/stream.ts';
import { instantiateKernels, LAYOUT } from './kernel-memory.ts';

interface Exports {
  addNormalsOnto(out: number, base: number, count: number, sigma: number): void;
  dot(a: number, x: number, lo: number, hi: number): void;
  dotPair(a: number, b: number, x: number, lo: number, hi: number): void;
}

/** A pipeline's kernels inside the instance (byte offsets; quadrature −1 at baseband). */
interface PlacedKernels { inPhase: number; quadrature: number; lo: number; hi: number }

export interface PipelineKernels { inPhase: Float64Array; quadrature: Float64Array | null; lo: number; hi: number }

export class RecordKernel {
  /** The record, `samples` long, in the instance's memory. */
  readonly record: Float64Array;
  private readonly exports: Exports;
  private readonly state: Int32Array;
  private readonly result: Float64Array;
  private readonly waves: number[];
  private readonly kernels: PlacedKernels[];
  private readonly recordAt: number;

  constructor(samples: number, waveforms: readonly Float64Array[], pipelines: readonly PipelineKernels[]) {
    const arrays = waveforms.length + 1 + 2 * pipelines.length;
    const { buffer, exports } = instantiateKernels(arrays * samples * 8);
    this.exports = exports as unknown as Exports;
    this.state = new Int32Array(buffer, LAYOUT.stream, 4);
    this.result = new Float64Array(buffer, LAYOUT.dotResults, 2);
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

  /** record[lo … hi) = waveform `wave` + sigma·N(0,1) from `stream` (RandomStream.addNormalsOnto). */
  noiseOntoWaveform(stream: RandomStream, wave: number, lo: number, hi: number, sigma: number): void {
    this.state.set(stream.s);
    this.exports.addNormalsOnto(this.recordAt + lo * 8, this.waves[wave]! + lo * 8, hi - lo, sigma);
    stream.s.set(this.state);
  }

  /** record[lo … hi) += sigma·N(0,1) from `stream` (RandomStream.addNormals). */
  addNoise(stream: RandomStream, lo: number, hi: number, sigma: number): void {
    if (!(sigma > 0) || hi <= lo) return;
    const at = this.recordAt + lo * 8;
    this.state.set(stream.s);
    this.exports.addNormalsOnto(at, at, hi - lo, sigma);
    stream.s.set(this.state);
  }

  /**
   * Pipeline p's integrated values of the record into out[0] (I) and out[1] (Q, 0 at baseband):
   * dotRangePair, or dotRange and 0.
   */
  values(p: number, out: Float64Array): void {
    const k = this.kernels[p]!;
    if (k.quadrature >= 0) {
      this.exports.dotPair(k.inPhase, k.quadrature, this.recordAt, k.lo, k.hi);
      out[0] = this.result[0]!;
      out[1] = this.result[1]!;
    } else {
      this.exports.dot(k.inPhase, this.recordAt, k.lo, k.hi);
      out[0] = this.result[0]!;
      out[1] = 0;
    }
  }
}
