/**
 * Preparation and mapping errors as random replacements of the state before the record.
 */
import type { RandomStream } from '../random/stream.ts';
import type { FlipSpec } from '../scenario/types.ts';

/** Returns `into` with the flip's probability, else `state` (one uniform draw either way). */
export function applyFlip(state: number, flips: readonly (FlipSpec | null)[], stream: RandomStream): number {
  const u = stream.nextDouble();
  const flip = flips[state];
  return flip && u < flip.probability ? flip.into : state;
}

/** Draws the intended (prepared) state from the cumulative mixture. */
export function drawPrepared(cumulative: Float64Array, stream: RandomStream): number {
  const u = stream.nextDouble();
  let s = 0;
  while (s < cumulative.length - 1 && u > cumulative[s]!) s++;
  return s;
}

/** Cumulative sums of the prepared mixture, for `drawPrepared`. */
export function cumulativeMixture(weights: readonly number[]): Float64Array {
  const c = new Float64Array(weights.length);
  let run = 0;
  weights.forEach((w, i) => { run += w; c[i] = run; });
  c[c.length - 1] = 1;
  return c;
}
