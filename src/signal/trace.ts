/**
 * Raw trace synthesis for one shot: the level path on the carrier, plus white noise.
 * Other noise sources add into the same buffer.
 */
import type { PathBuffer } from '../physics/chain.ts';
import type { RandomStream } from '../random/stream.ts';

/**
 * Writes the noise-free signal of a shot into out[lo … hi): samples before the first jump
 * follow `start`'s waveform, and so on. `waveforms[s]` is state s's waveform on the record
 * grid (carrier and gain included); sample k sits at time k/sampleRate and takes the state
 * occupied at that instant. `offset` is the channel's first entry in out and the waveforms
 * (0 for I, samples for Q of a baseband IQ record, carrier.ts).
 */
export function writeSignal(
  out: Float64Array, lo: number, hi: number, waveforms: readonly Float64Array[], start: number,
  path: PathBuffer, sampleRate: number, offset = 0,
): void {
  let state = start;
  let k = lo;
  for (let j = 0; j <= path.jumps; j++) {
    // samples strictly before the jump time stay in the current state
    const until = j < path.jumps ? Math.min(hi, Math.max(lo, Math.ceil(path.times[j]! * sampleRate))) : hi;
    if (until > k) {
      const wave = waveforms[state]!;
      for (; k < until; k++) out[offset + k] = wave[offset + k]!;
    }
    if (j < path.jumps) state = path.entered[j]!;
  }
}

/** Adds white Gaussian noise of per-sample σ to out[lo … hi). */
export function addWhiteNoise(out: Float64Array, lo: number, hi: number, sigma: number, stream: RandomStream): void {
  if (sigma > 0 && hi > lo) stream.addNormals(out, lo, hi - lo, sigma);
}
