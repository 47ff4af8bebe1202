/**
 * The plain continuous-time Markov chain sampler (Norris, "Markov Chains", Cambridge 1997, §2.6):
 * the reference the tests hold the engines' history sampler (src/physics/history.ts) against.
 */
import { growJumpArrays, type Chain, type PathBuffer } from '../../src/physics/chain.ts';
import type { RandomStream } from '../../src/random/stream.ts';

/**
 * Samples the jumps of the chain on [0, duration) starting in `start`, into `path`.
 * Returns the state at `duration`.
 */
export function samplePath(chain: Chain, start: number, duration: number, stream: RandomStream, path: PathBuffer): number {
  const n = chain.states;
  let state = start;
  let t = 0;
  path.jumps = 0;
  for (;;) {
    const exit = chain.exitRate[state]!;
    if (exit <= 0) return state;
    t += stream.nextExponential(exit);
    if (t >= duration) return state;
    const u = stream.nextDouble();
    let next = 0;
    const row = state * n;
    while (next < n - 1 && u > chain.cumulative[row + next]!) next++;
    if (path.jumps === path.times.length) growJumpArrays(path);
    path.times[path.jumps] = t;
    path.entered[path.jumps] = next;
    path.jumps++;
    state = next;
  }
}

