/**
 * Derivation of per-batch random streams from the run seed.
 *
 * Why streams cannot overlap: all streams of a run are stretches of ONE xoshiro128** sequence
 * (period 2^128 − 1). The base state comes from the run seed (hashed by seedrandom); stream g
 * starts g·2^64 steps later (jump.ts), and a batch draws far fewer than 2^64 numbers, so stream
 * g stays inside [g·2^64, (g+1)·2^64) and never reaches another stream's stretch. The stream
 * index g is a fixed function of (sweep point, purpose, batch index), so the numbers a shot sees
 * do not depend on how batches are spread over workers or shards.
 */
import seedrandom from 'seedrandom';
import { jumpStreams, STREAM_INDEX_BITS } from './jump.ts';
import { RandomStream } from './stream.ts';

/** What a stream is used for; each purpose has its own range of stream indices. */
export type StreamPurpose = 'score' | 'calibrate' | 'slow-noise' | 'aux';

const PURPOSE_CODE: Record<StreamPurpose, number> = { score: 0, calibrate: 1, 'slow-noise': 2, aux: 3 };

/** Bits of the stream index given to the batch number (2^24 batches per point and purpose). */
export const BATCH_BITS = 24;
/** Bits for the sweep point (2^14 points). */
export const POINT_BITS = STREAM_INDEX_BITS - BATCH_BITS - 2;

/** The base generator state for a run seed (seedrandom's ARC4 hash of the seed text). */
export function baseState(seed: number): Uint32Array {
  const rng = seedrandom(`singleshot:${seed}`);
  const s = new Uint32Array(4);
  do {
    for (let i = 0; i < 4; i++) s[i] = rng.int32() >>> 0;
  } while ((s[0]! | s[1]! | s[2]! | s[3]!) === 0);
  return s;
}

/** The stream index of (point, purpose, batch): disjoint bit fields, so distinct triples differ. */
export function streamIndex(point: number, purpose: StreamPurpose, batch: number): number {
  if (point < 0 || point >= 2 ** POINT_BITS) throw new RangeError(`sweep point ${point} outside [0, 2^${POINT_BITS})`);
  if (batch < 0 || batch >= 2 ** BATCH_BITS) throw new RangeError(`batch ${batch} outside [0, 2^${BATCH_BITS})`);
  return (point * 4 + PURPOSE_CODE[purpose]) * 2 ** BATCH_BITS + batch;
}

/** Makes the stream for one batch of one sweep point. */
export function makeStream(seed: number, point: number, purpose: StreamPurpose, batch: number): RandomStream {
  const s = baseState(seed);
  jumpStreams(s, streamIndex(point, purpose, batch));
  return new RandomStream(s);
}
