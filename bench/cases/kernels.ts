/**
 * The WebAssembly kernels (src/engine/wasm) against the TypeScript code they stand in for, on
 * the benchmark workload: the same numbers (test/engine/kernels.test.ts, exact-fused.test.ts),
 * so only the time differs. Measured side by side — one round of each in turn, the ratio of the
 * medians — because this machine's speed drifts.
 */
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeExactScratch } from '../../src/engine/exact/batch.ts';
import { simulateTalliedBatch } from '../../src/engine/exact/fused.ts';
import type { FusedScoring } from '../../src/engine/exact/fused-scoring.ts';
import { RecordKernel } from '../../src/engine/wasm/record-loops.ts';
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

/** The workload scored as the benchmark's calibration would (axis I, midpoint 0.5). */
const scoring: FusedScoring = { pipelines: [{ cos: 1, sin: 0, threshold: 0.5, highIsOne: true, band: -1, lastSample: null }] };

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
    name: 'exact engine fused path (batches of four 1024-shot blocks), WebAssembly four-lane kernel against the TypeScript reference path',
    unit: 'shots/s',
    async run() {
      const wasmScratch = makeExactScratch(point), tsScratch = makeExactScratch(point);
      const batches = point.scenario.shots / point.scenario.batchSize, count = point.scenario.batchSize;
      let b = 0;
      const [wasm, ts] = sideBySide(
        () => { simulateTalliedBatch(point, 0, 'score', b++ % batches, count, scoring, wasmScratch); return count; },
        () => { simulateTalliedBatch(point, 0, 'score', b++ % batches, count, scoring, tsScratch, false); return count; },
        15, 16,
      );
      return { rate: wasm, detail: `${(wasm / ts).toFixed(2)}× the TypeScript path's ${fmt(ts)} shots/s` };
    },
  },
];
