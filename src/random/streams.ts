/**
 * Derivation of random streams from the run seed.
 *
 * The unit of seeding is a block of SEED_BLOCK consecutive shots of one sweep point and purpose:
 * its shots draw, in shot order, from one stream. Work batches are whole numbers of blocks, so
 * the numbers a shot sees do not depend on the batch size, the worker count or the sharding.
 *
 * Why streams cannot overlap: all streams of a run are stretches of ONE xoshiro128** sequence
 * (period 2^128 − 1). The base state comes from the run seed (hashed by seedrandom); stream g
 * starts g·2^64 steps later (jump.ts), and a block draws far fewer than 2^64 numbers, so stream
 * g stays inside [g·2^64, (g+1)·2^64) and never reaches another stream's stretch. The stream
 * index g is a fixed function of (sweep point, purpose, block index) with disjoint bit fields,
 * so distinct triples give distinct g.
 *
 * The numbers behind "far fewer": a block is SEED_BLOCK = 1024 shots; a shot draws about one
 * 32-bit word per record sample for white noise (the ziggurat rejects a few per cent of draws, each
 * costing a few more) plus a handful for the preparation, mapping and each jump. With the
 * record capped at 2^27 samples (scenario/limits.ts) and at most 10^6 expected jumps, a block
 * draws below 2^10 · 2^28 ≈ 2^38 words — a factor 2^26 short of 2^64. Index g < 2^40, so all
 * stretches lie within the first 2^104 steps after the base state, well inside one period.
 *
 * A block may also draw from its second lane, which starts 2^63 steps into its stretch (the
 * exact engine takes its normals there, so that its histories stay those of the trace engine,
 * which draws from the block's start; the trace engine takes the second channel's noise of a
 * baseband I and Q record there, and slow-noise streams their second channel's realisation):
 * each lane draws below 2^38 words, so the two lanes of a block, 2^63 apart, never meet each
 * other or another block's.
 *
 * Across different seeds the base states are unrelated points of the same period, so two
 * runs' streams are independent in the probabilistic sense only: for two stretches of 2^38
 * words to meet, base states 2^128 apart at random would have to fall within 2^39 of each
 * other — odds of about 2^-89 per pair of blocks. Tests: test/random/stream-independence
 * (correlations) and jump-consistency (the jump against plain stepping and the reference
 * jump polynomial); bench/dieharder.sh runs the raw output through dieharder.
 */
import seedrandom from 'seedrandom';
import { jumpHalfStream, jumpOneStream, jumpStreams, STREAM_INDEX_BITS } from './jump.ts';
import { RandomStream } from './stream.ts';

/** What a stream is used for; each purpose has its own range of stream indices. */
export type StreamPurpose = 'score' | 'calibrate' | 'slow-noise' | 'aux';

const PURPOSE_CODE: Record<StreamPurpose, number> = { score: 0, calibrate: 1, 'slow-noise': 2, aux: 3 };

/** Shots per seeding block (fixed: changing it changes every result). */
export const SEED_BLOCK = 1024;

/** Bits of the stream index given to the block number (2^24 blocks per point and purpose). */
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

/** The stream index of (point, purpose, block): disjoint bit fields, so distinct triples differ. */
export function streamIndex(point: number, purpose: StreamPurpose, block: number): number {
  if (point < 0 || point >= 2 ** POINT_BITS) throw new RangeError(`sweep point ${point} outside [0, 2^${POINT_BITS})`);
  if (block < 0 || block >= 2 ** BATCH_BITS) throw new RangeError(`block ${block} outside [0, 2^${BATCH_BITS})`);
  return (point * 4 + PURPOSE_CODE[purpose]) * 2 ** BATCH_BITS + block;
}

const baseCache = new Map<number, Uint32Array>();

function cachedBase(seed: number): Uint32Array {
  let s = baseCache.get(seed);
  if (!s) {
    s = baseState(seed);
    if (baseCache.size > 64) baseCache.clear();
    baseCache.set(seed, s);
  }
  return s;
}

/**
 * Makes the stream of one seeding block of one sweep point: its start (lane 0), or its second
 * lane (lane 1, 2^63 steps into its stretch; see the file comment).
 */
export function makeStream(seed: number, point: number, purpose: StreamPurpose, block: number, lane = 0): RandomStream {
  const s = Uint32Array.from(cachedBase(seed));
  jumpStreams(s, streamIndex(point, purpose, block));
  if (lane === 1) jumpHalfStream(s);
  else if (lane !== 0) throw new RangeError(`lane ${lane}: a stream has lanes 0 and 1`);
  return new RandomStream(s);
}

/**
 * The start of the last BlockStreams made on this thread: batches of a point follow each other,
 * so the next one's start is a short jump away (a few matrix products, not one per set bit of
 * its stream index).
 */
const lastStart = { seed: NaN, point: -1, purpose: '' as StreamPurpose | '', block: 0, state: new Uint32Array(4) };

/**
 * Streams of consecutive blocks, first → first+1 → …: each step is one jump of 2^64
 * (one matrix product) instead of a jump from the base.
 */
export class BlockStreams {
  private readonly start: Uint32Array;
  private readonly lane = new Uint32Array(4);
  private block: number;

  constructor(seed: number, point: number, purpose: StreamPurpose, firstBlock: number) {
    const index = streamIndex(point, purpose, firstBlock); // (checks the ranges either way)
    const from = lastStart.seed === seed && lastStart.point === point && lastStart.purpose === purpose
      && lastStart.block <= firstBlock ? lastStart : null;
    if (from) {
      // from the last start made on this thread: a jump of the blocks between (jumps commute,
      // so the state is the one from the base)
      this.start = Uint32Array.from(from.state);
      jumpStreams(this.start, firstBlock - from.block);
    } else {
      this.start = Uint32Array.from(cachedBase(seed));
      jumpStreams(this.start, index);
    }
    this.block = firstBlock;
    Object.assign(lastStart, { seed, point, purpose, block: firstBlock });
    lastStart.state.set(this.start);
  }

  /** Block index of the stream `current` returns. */
  get index(): number {
    return this.block;
  }

  /** A fresh stream positioned at the start of the current block. */
  current(): RandomStream {
    return new RandomStream(this.start);
  }

  /** Moves to the next block and returns its stream. */
  next(): RandomStream {
    jumpOneStream(this.start);
    this.block++;
    return this.current();
  }

  /**
   * Moves to the next block and puts `stream` at its start, in place: no new stream (and no
   * new rejection scratch) per block.
   */
  advanceInto(stream: RandomStream): void {
    jumpOneStream(this.start);
    this.block++;
    const s = stream.s, t = this.start;
    s[0] = t[0]! | 0; s[1] = t[1]! | 0; s[2] = t[2]! | 0; s[3] = t[3]! | 0;
  }

  /** Puts `stream` at the start of the current block's second lane (2^63 steps into its stretch). */
  laneInto(stream: RandomStream): void {
    const s = stream.s, t = this.lane;
    t.set(this.start);
    jumpHalfStream(t);
    s[0] = t[0]! | 0; s[1] = t[1]! | 0; s[2] = t[2]! | 0; s[3] = t[3]! | 0;
  }
}
