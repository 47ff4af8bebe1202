/**
 * The WebAssembly kernels (src/plan/kernels.wat) against the TypeScript loops they stand in
 * for, on the benchmark workload: the same numbers (test/plan/kernels.test.ts), so only the
 * time differs. Measured side by side — one round of each in turn, the ratio of the medians —
 * because this machine's speed drifts.
 */
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeExactScratch } from '../../src/engine/exact/batch.ts';
import { scratchHistory } from '../../src/engine/trace/batch.ts';
import { fastTallyBlock } from '../../src/engine/exact/fast.ts';
import { ExactKernel } from '../../src/engine/exact/kernel.ts';
import type { FusedPipeline } from '../../src/engine/exact/fused-scoring.ts';
import { RecordKernel } from '../../src/engine/wasm/record-loops.ts';
import { emptyTally } from '../../src/analysis/tally.ts';
import { dotRangePair } from '../../src/dsp/integrate.ts';
import { BlockStreams } from '../../src/random/streams.ts';
import { benchWorkload } from '../workload.ts';
import type { BenchCase } from '../harness.ts';

/** Items/s of `a` and `b`, each timed over `rounds` alternating rounds of `perRound` calls (medians). */
function sideBySide(a: () => number, b: () => number, rounds = 15, perRound = 64): [number, number] {
  const ta: number[] = [], tb: number[] = [];
  for (let r = -2; r < rounds; r++) {
    let items = 0, t0 = performance.now();
    for (let i = 0; i < perRound; i++) items += a();
    const ra = items / ((performance.now() - t0) / 1000);
    items = 0; t0 = performance.now();
    for (let i = 0; i < perRound; i++) items += b();
    const rb = items / ((performance.now() - t0) / 1000);
    if (r >= 0) { ta.push(ra); tb.push(rb); } // the first two rounds warm up
  }
  const median = (x: number[]) => x.sort((p, q) => p - q)[x.length >> 1]!;
  return [median(ta), median(tb)];
}

const point = compilePoint(benchWorkload());

/** The exact kernel on the workload, scored as the benchmark's calibration would (axis I, midpoint 0.5), and block streams. */
function exactSetUp() {
  const scratch = makeExactScratch(point);
  const h = scratchHistory(point, scratch);
  const s: FusedPipeline = { cos: 1, sin: 0, threshold: 0.5, highIsOne: true, band: -1, lastSample: null };
  const outcomeOf = Uint8Array.of(0, 1);
  const kernel = new ExactKernel(scratch.exact);
  kernel.setScoring(h, s, outcomeOf);
  return { scratch, h, s, outcomeOf, kernel, blocks: new BlockStreams(1, 0, 'score', 0) };
}

const fmt = (x: number) => `${(x / 1e6).toFixed(1)} M`;

export const cases: BenchCase[] = [
  {
    name: 'record loop (white noise onto the waveform + I/Q dot products), WebAssembly against TypeScript',
    unit: 'samples/s',
    async run() {
      const samples = point.grid.samples, k = point.pipelines[0]!.kernels, wave = point.waveforms[1]!;
      const kernel = new RecordKernel(samples, point.waveforms, [k]);
      const blocks = new BlockStreams(1, 0, 'score', 0);
      const s1 = blocks.current(), s2 = blocks.current();
      const record = new Float64Array(samples), pair = new Float64Array(2);
      const [wasm, ts] = sideBySide(
        () => { kernel.noiseOntoWaveform(s1, 1, 0, samples, 5); kernel.values(0, pair); return samples; },
        () => { s2.addNormalsOnto(record, wave, 0, samples, 5); dotRangePair(k.inPhase, k.quadrature!, record, k.lo, k.hi, pair); return samples; },
        15, 256,
      );
      return { rate: wasm, detail: `${(wasm / ts).toFixed(2)}× the TypeScript loop's ${fmt(ts)} samples/s` };
    },
  },
  {
    name: 'exact engine one-loop kernel (a 1024-shot block), WebAssembly against TypeScript',
    unit: 'shots/s',
    async run() {
      const { scratch, h, s, outcomeOf, kernel, blocks } = exactSetUp();
      const stream = blocks.current(), lane = blocks.current();
      const columns = { intended: new Uint8Array(1024), prepared: new Uint8Array(1024), initial: new Uint8Array(1024), atWindowStart: new Uint8Array(1024), atWindowEnd: new Uint8Array(1024), firstJump: new Float64Array(1024), jumpCause: new Uint8Array(1024) };
      const [wasm, ts] = sideBySide(
        () => { blocks.advanceInto(stream); blocks.laneInto(lane); kernel.tallyBlock(stream, lane, 1024, emptyTally(2, 2)); return 1024; },
        () => { blocks.advanceInto(stream); blocks.laneInto(lane); fastTallyBlock(h, scratch.exact, s, outcomeOf, stream, lane, 1024, emptyTally(2, 2), columns, scratch.store); return 1024; },
        15, 256,
      );
      return { rate: wasm, detail: `${(wasm / ts).toFixed(2)}× the TypeScript kernel's ${fmt(ts)} shots/s` };
    },
  },
  {
    name: 'exact engine four-lane kernel (four 1024-shot blocks side by side, SIMD) against the one-block WebAssembly kernel',
    unit: 'shots/s',
    async run() {
      const { kernel, blocks } = exactSetUp();
      const { streams, lanes } = kernel.fourStreams;
      const stream = blocks.current(), lane = blocks.current();
      const leaves = () => [emptyTally(2, 2), emptyTally(2, 2), emptyTally(2, 2), emptyTally(2, 2)];
      const [four, one] = sideBySide(
        () => {
          for (let k = 0; k < 4; k++) { blocks.advanceInto(streams[k]!); blocks.laneInto(lanes[k]!); }
          kernel.tallyFourBlocks(streams, lanes, 1024, leaves());
          return 4096;
        },
        () => {
          for (let k = 0; k < 4; k++) { blocks.advanceInto(stream); blocks.laneInto(lane); kernel.tallyBlock(stream, lane, 1024, emptyTally(2, 2)); }
          return 4096;
        },
        15, 64,
      );
      return { rate: four, detail: `${(four / one).toFixed(2)}× the one-block kernel's ${fmt(one)} shots/s` };
    },
  },
];
