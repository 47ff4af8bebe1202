/**
 * One batch of shots through the trace engine: hidden-state history, raw record, and the
 * integrated I/Q of every pipeline. Columnar output, one typed array per quantity.
 */
import { applyFlip, drawPrepared } from '../physics/flips.ts';
import { makePathBuffer, samplePath } from '../physics/chain.ts';
import { BlockStreams, SEED_BLOCK, type StreamPurpose } from '../random/streams.ts';
import { addWhiteNoise, writeSignal } from '../signal/trace.ts';
import { dotRange } from '../dsp/integrate.ts';
import type { CompiledPoint } from './compile.ts';

/** The truth and the integrated values of a batch of shots. */
export interface ShotBatch {
  point: number;
  purpose: StreamPurpose;
  batch: number;
  /** Index of the batch's first shot within its point and purpose. */
  firstShot: number;
  count: number;
  /** Intended (prepared) state. */
  intended: Uint8Array;
  /** State after preparation (differs from intended on a preparation error). */
  prepared: Uint8Array;
  /** State at the record start (after mapping). */
  initial: Uint8Array;
  atWindowStart: Uint8Array;
  atWindowEnd: Uint8Array;
  /** Time of the first jump from the record start (s), NaN if none during the record. */
  firstJump: Float64Array;
  /** Cause code of the first jump if it touched the window (else 0). */
  jumpCause: Uint8Array;
  /** Per pipeline: integrated I and Q. */
  values: { inPhase: Float64Array; quadrature: Float64Array }[];
}

/** Scratch buffers reused across batches of one worker (no per-shot allocation). */
export interface BatchScratch {
  record: Float64Array;
  path: ReturnType<typeof makePathBuffer>;
}

export function makeScratch(point: CompiledPoint): BatchScratch {
  return { record: new Float64Array(point.grid.samples), path: makePathBuffer() };
}

/**
 * Runs shots [batch·batchSize, batch·batchSize + count) of one point and purpose. Shots draw
 * from the stream of their seeding block, in shot order, so the result does not depend on the
 * batch size (a multiple of SEED_BLOCK).
 */
export function simulateBatch(
  point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, batch: number, count: number,
  scratch: BatchScratch = makeScratch(point),
): ShotBatch {
  const { scenario, grid, chain } = point;
  const firstShot = batch * scenario.batchSize;
  const blocks = new BlockStreams(scenario.seed, pointIndex, purpose, firstShot / SEED_BLOCK);
  let stream = blocks.current();
  const out: ShotBatch = {
    point: pointIndex, purpose, batch, firstShot, count,
    intended: new Uint8Array(count), prepared: new Uint8Array(count), initial: new Uint8Array(count),
    atWindowStart: new Uint8Array(count), atWindowEnd: new Uint8Array(count),
    firstJump: new Float64Array(count), jumpCause: new Uint8Array(count),
    values: point.pipelines.map(() => ({ inPhase: new Float64Array(count), quadrature: new Float64Array(count) })),
  };
  const { record, path } = scratch;
  const fs = grid.sampleRate;
  const recordLength = grid.samples / fs;
  const windowStartTime = grid.windowLo / fs;
  // the last window sample's time: a jump after it cannot change the integrated value
  const lastWindowSample = (grid.windowHi - 1) / fs;
  const nStates = scenario.states.length;
  const lo = point.synthLo, hi = point.synthHi;
  for (let i = 0; i < count; i++) {
    if (i > 0 && i % SEED_BLOCK === 0) stream = blocks.next();
    const intended = drawPrepared(point.prepareCumulative, stream);
    const prepared = applyFlip(intended, scenario.preparationError, stream);
    const initial = applyFlip(prepared, scenario.mappingError, stream);
    samplePath(chain, initial, recordLength, stream, path);
    out.intended[i] = intended;
    out.prepared[i] = prepared;
    out.initial[i] = initial;
    let atStart = initial;
    for (let j = 0; j < path.jumps && path.times[j]! <= windowStartTime; j++) atStart = path.entered[j]!;
    out.atWindowStart[i] = atStart;
    // the state at the last window sample, which decides what the window saw
    let atWindowEnd = initial;
    for (let j = 0; j < path.jumps && path.times[j]! <= lastWindowSample; j++) atWindowEnd = path.entered[j]!;
    out.atWindowEnd[i] = atWindowEnd;
    if (path.jumps > 0) {
      out.firstJump[i] = path.times[0]!;
      if (path.times[0]! <= lastWindowSample) out.jumpCause[i] = point.jumpCause[initial * nStates + path.entered[0]!]!;
    } else {
      out.firstJump[i] = NaN;
    }
    writeSignal(record, lo, hi, point.waveforms, initial, path, fs);
    addWhiteNoise(record, lo, hi, point.whiteSigma, stream);
    for (let p = 0; p < point.pipelines.length; p++) {
      const k = point.pipelines[p]!.kernels;
      out.values[p]!.inPhase[i] = dotRange(k.inPhase, record, k.lo, k.hi);
      out.values[p]!.quadrature[i] = k.quadrature ? dotRange(k.quadrature, record, k.lo, k.hi) : 0;
    }
  }
  return out;
}
