/**
 * One batch of shots through the trace engine: hidden-state history, raw record, and the
 * integrated I/Q of every pipeline. Columnar output, one typed array per quantity.
 */
import { makePathBuffer, type PathBuffer } from '../../physics/chain.ts';
import { BlockStreams, SEED_BLOCK, type StreamPurpose } from '../../random/streams.ts';
import type { RandomStream } from '../../random/stream.ts';
import { writeSignal } from '../../signal/trace.ts';
import { writeRespondedSignal } from '../../signal/response.ts';
import { digitize } from '../../signal/digitizer.ts';
import { makeNoiseRuntime, type NoiseRuntime } from '../../signal/noise-runtime.ts';
import { makeRecordLoops, type RecordLoops } from '../wasm/record-loops.ts';
import type { CompiledPoint } from '../compile-point.ts';
import { historyTables, makePathStore, sampleHistories, type HistoryColumns, type HistoryTables, type PathStore } from '../../physics/history.ts';
import { makeShotCollector, type KeptTraces } from './collect.ts';
import type { KeptBins } from '../../dsp/process-record.ts';

/** The truth and the integrated values of a batch of shots. */
export interface ShotBatch extends HistoryColumns {
  point: number;
  purpose: StreamPurpose;
  batch: number;
  /** Index of the batch's first shot within its point and purpose. */
  firstShot: number;
  count: number;
  /** Per pipeline: integrated I and Q. */
  values: { inPhase: Float64Array; quadrature: Float64Array }[];
  /** Per pipeline: the decimated bins of every shot, where calibration or scoring needs them (collect.ts). */
  records?: (KeptBins | null)[];
  /** Every scored shot's record, when the scenario asks to keep traces (collect.ts). */
  traces?: KeptTraces;
  /** Record samples the digitizer clipped in this batch (present when the point has a digitizer). */
  clippedSamples?: number;
}

/** Scratch buffers reused across batches of one point (no per-shot allocation). */
export interface BatchScratch {
  /** The record of the shot being simulated (the kernel's, once the trace engine has run). */
  record: Float64Array;
  /** The per-sample loops on `kernelOf`'s waveforms and kernels (made on first use). */
  kernel?: RecordLoops;
  kernelOf?: CompiledPoint;
  path: PathBuffer;
  /** The jumps of one seeding block's shots (histories are drawn a block at a time). */
  store: PathStore;
  /** History tables of `point` (rebuilt if the scratch is used with another point). */
  history: HistoryTables;
  point: CompiledPoint;
  /** Slow-noise runtimes (timeline caches) of `noiseOf`, by point index and purpose. */
  noise?: Map<string, NoiseRuntime>;
  noiseOf?: CompiledPoint;
}

/** The slow-noise runtime of a point and purpose, kept in the scratch (its caches serve later batches). */
export function noiseRuntime(point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, scratch: BatchScratch): NoiseRuntime {
  if (scratch.noiseOf !== point || !scratch.noise) {
    scratch.noise = new Map();
    scratch.noiseOf = point;
  }
  const key = `${pointIndex}/${purpose}`;
  let r = scratch.noise.get(key);
  if (!r) {
    r = makeNoiseRuntime(point.noise, point.scenario.seed, pointIndex, purpose);
    scratch.noise.set(key, r);
  }
  return r;
}

export function makeScratch(point: CompiledPoint): BatchScratch {
  return {
    record: new Float64Array(point.channels * point.grid.samples), path: makePathBuffer(), store: makePathStore(SEED_BLOCK),
    history: historyTables(point), point,
  };
}

/** The scratch's history tables, rebuilt when it last served another point. */
export function scratchHistory(point: CompiledPoint, scratch: BatchScratch): HistoryTables {
  if (scratch.point !== point) {
    scratch.point = point;
    scratch.history = historyTables(point);
  }
  return scratch.history;
}

/** An empty batch of `count` shots with every column allocated. */
export function makeShotBatch(point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, batch: number, count: number): ShotBatch {
  return {
    point: pointIndex, purpose, batch, firstShot: batch * point.scenario.batchSize, count,
    intended: new Uint8Array(count), prepared: new Uint8Array(count), initial: new Uint8Array(count),
    atWindowStart: new Uint8Array(count), atWindowEnd: new Uint8Array(count),
    firstJump: new Float64Array(count), jumpCause: new Uint8Array(count),
    values: point.pipelines.map(() => ({ inPhase: new Float64Array(count), quadrature: new Float64Array(count) })),
  };
}

/**
 * Calls `body(streams, from, to)` for each seeding block of a batch: shots [from, to) of the batch
 * are one block and draw, in order, from that block's stream, streams[0] (see random/streams.ts);
 * with `lanes` 2, the block's second lane is streams[1] (the second channel's noise of a
 * baseband I and Q record, signal/injection.ts).
 */
export function forEachBlock(
  batch: ShotBatch, seed: number, body: (streams: readonly RandomStream[], from: number, to: number) => void, lanes = 1,
): void {
  const blocks = new BlockStreams(seed, batch.point, batch.purpose, batch.firstShot / SEED_BLOCK);
  // one stream object per lane for the whole batch, moved to each block's start: the generator's
  // rejection scratch (grown to a record's length) is then allocated once per batch, not per block
  const streams = Array.from({ length: lanes }, () => blocks.current());
  for (let from = 0; from < batch.count; from += SEED_BLOCK) {
    if (from > 0) blocks.advanceInto(streams[0]!);
    if (lanes > 1) blocks.laneInto(streams[1]!);
    body(streams, from, Math.min(batch.count, from + SEED_BLOCK));
  }
}

/** Copies shot j's jumps from a block's path store into a path buffer. */
export function loadPath(store: PathStore, j: number, path: PathBuffer): void {
  const a = store.offset[j]!, b = store.offset[j + 1]!;
  if (b - a > path.times.length) {
    path.times = new Float64Array(2 * (b - a));
    path.entered = new Uint8Array(2 * (b - a));
  }
  for (let k = a; k < b; k++) {
    path.times[k - a] = store.times[k]!;
    path.entered[k - a] = store.entered[k]!;
  }
  path.jumps = b - a;
}

/** The scratch's record loops for `point` (made again for another point); the record becomes theirs. */
export function scratchKernel(point: CompiledPoint, scratch: BatchScratch): RecordLoops {
  if (scratch.kernelOf !== point || !scratch.kernel) {
    scratch.kernel = makeRecordLoops(point.grid.samples, point.waveforms, point.pipelines.map((p) => p.kernels), undefined, point.channels);
    scratch.kernelOf = point;
    scratch.record = scratch.kernel.record;
  }
  return scratch.kernel;
}

/**
 * Runs shots [batch·batchSize, batch·batchSize + count) of one point and purpose through the
 * trace engine. Each seeding block first draws its shots' histories (history.ts), then, shot by
 * shot, the record's noise; the result does not depend on the batch size (a multiple of
 * SEED_BLOCK). A record of two channels (baseband I and Q) is written channel by channel, the
 * second channel's white and per-shot noise drawn from the block's second lane, so the first
 * channel draws exactly what a one-channel record draws.
 */
export function simulateBatch(
  point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, batch: number, count: number,
  scratch: BatchScratch = makeScratch(point),
): ShotBatch {
  const out = makeShotBatch(point, pointIndex, purpose, batch, count);
  const tables = scratchHistory(point, scratch);
  const kernel = scratchKernel(point, scratch);
  const { record, path, store } = scratch;
  const fs = point.grid.sampleRate;
  const lo = point.synthLo, hi = point.synthHi;
  const { channels } = point, samples = point.grid.samples;
  const collector = makeShotCollector(point, pointIndex, purpose, out.firstShot, count);
  // noise beyond white (noise/sensor hook): slow noise from its own streams, response, digitizer
  const { response, digitizer } = point.noise;
  const slow = point.noise.kinds.length > 0 ? noiseRuntime(point, pointIndex, purpose, scratch) : null;
  let clipped = 0;
  const pair = new Float64Array(2);
  forEachBlock(out, point.scenario.seed, (streams, from, to) => {
    sampleHistories(tables, streams[0]!, out, from, to, store);
    for (let i = from; i < to; i++) {
      loadPath(store, i - from, path);
      // the common shot (no jump, nothing but white noise): signal and noise in one pass
      const plain = !response && !slow && path.jumps === 0 && point.whiteSigma > 0;
      for (let c = 0; c < channels; c++) {
        const at = c * samples;
        if (plain) kernel.noiseOntoWaveform(streams[c]!, out.initial[i]!, at + lo, at + hi, point.whiteSigma);
        else if (response) writeRespondedSignal(record, lo, hi, point.levelWaves, response, out.initial[i]!, path, fs, at);
        else writeSignal(record, lo, hi, point.waveforms, out.initial[i]!, path, fs, at);
      }
      if (slow) {
        // noise with a linear path (1/f) goes into the record only when the digitizer needs it
        // there; otherwise it enters each value through that path (signal/noise-runtime.ts)
        slow.shot(out.firstShot + i);
        slow.addToRecord(record, lo, hi);
        if (digitizer) slow.addLinearToRecord(record, lo, hi);
      }
      if (!plain) for (let c = 0; c < channels; c++) kernel.addNoise(streams[c]!, c * samples + lo, c * samples + hi, point.whiteSigma);
      if (slow) slow.addShotNoise(record, lo, hi, streams);
      if (digitizer) for (let c = 0; c < channels; c++) clipped += digitize(record, c * samples + lo, c * samples + hi, digitizer);
      const carried = slow !== null && slow.hasLinear && digitizer === null;
      for (let p = 0; p < point.pipelines.length; p++) {
        kernel.values(p, pair);
        out.values[p]!.inPhase[i] = pair[0]! + (carried ? slow.linearValue(p, false) : 0);
        out.values[p]!.quadrature[i] = point.pipelines[p]!.kernels.quadrature ? pair[1]! + (carried ? slow.linearValue(p, true) : 0) : 0;
      }
      // kept traces and bins see the whole record (after the values, which do not depend on them)
      if (carried && collector) slow.addLinearToRecord(record, lo, hi);
      collector?.shot(i, record, out.initial[i]!, path);
    }
  }, channels);
  if (digitizer) out.clippedSamples = clipped;
  if (collector) {
    const kept = collector.result();
    if (kept.records) out.records = kept.records;
    if (kept.traces) out.traces = kept.traces;
  }
  return out;
}
