/**
 * Where noise kinds draw their slow noise: the stream indices inside a point's 'slow-noise'
 * purpose (random/streams.ts: 24 bits per point and purpose), one field per kind, disjoint, so
 * that no two sources ever share a stream. A new kind that needs streams of its own takes a free
 * field here (none is free within 'slow-noise' today: a kind whose draws belong to each shot
 * draws from the shot's own streams instead).
 *
 *   1/f (flicker.ts):        bit 23 = 0 | purpose (2) | source (3) | band (4) | block pair (14)
 *   telegraph (telegraph.ts): bit 23 = 1 | purpose (2) | seeding block (21)
 *
 * `purpose` is the purpose of the shots the noise belongs to: scored, calibration and auxiliary
 * shots each have their own timeline. On baseband I and Q the second channel's own realisation of
 * amplifier-side noise (signal/injection.ts) draws from the second lane of the same index
 * (random/streams.ts `makeStream(…, lane 1)`), so the layout needs no field for it.
 */
import type { StreamPurpose } from '../../random/streams.ts';
import { PAIRS_PER_BAND } from '../flicker-timeline.ts';

/** Most 1/f sources per point (source field of 3 bits). */
export const MAX_FLICKER_SOURCES = 8;
/** Seeding blocks a telegraph timeline can reach (field of 21 bits). */
export const TELEGRAPH_BLOCKS = 2 ** 21;

const PURPOSE_CODE: Record<StreamPurpose, number> = { score: 0, calibrate: 1, aux: 2, 'slow-noise': 3 };

/** Stream index of block pair `pair` of band `band` of 1/f source `source`. */
export function flickerStreamIndex(purpose: StreamPurpose, source: number, band: number, pair: number): number {
  return ((PURPOSE_CODE[purpose] * MAX_FLICKER_SOURCES + source) * 16 + band) * PAIRS_PER_BAND + pair;
}

/** Stream index of seeding block `block` of the telegraph timeline. */
export function telegraphStreamIndex(purpose: StreamPurpose, block: number): number {
  if (block >= TELEGRAPH_BLOCKS) throw new RangeError(`telegraph: seeding block ${block} beyond the ${TELEGRAPH_BLOCKS} the timeline can reach`);
  return 2 ** 23 + PURPOSE_CODE[purpose] * TELEGRAPH_BLOCKS + block;
}
