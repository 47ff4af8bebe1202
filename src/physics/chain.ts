/**
 * The hidden-state path of one shot during the record: a continuous-time Markov chain with the
 * scenario's rates, sampled exactly (exponential holding times, jump chain; Norris, "Markov
 * Chains", Cambridge 1997, §2.6).
 */
import type { TransitionSpec } from '../scenario/types.ts';

/** Precomputed jump tables of the chain. */
export interface Chain {
  states: number;
  /** Total exit rate of each state (1/s). */
  exitRate: Float64Array;
  /** Row-wise cumulative jump probabilities: cumulative[from·N + to]. */
  cumulative: Float64Array;
  /** Rate matrix: rate[from·N + to] (1/s), zero on the diagonal. */
  rate: Float64Array;
}

/** Builds the jump tables from the scenario's transitions (rates between the same pair add). */
export function makeChain(states: number, transitions: readonly TransitionSpec[]): Chain {
  const rate = new Float64Array(states * states);
  for (const t of transitions) rate[t.from * states + t.to]! += t.rate;
  const exitRate = new Float64Array(states);
  const cumulative = new Float64Array(states * states);
  for (let a = 0; a < states; a++) {
    let total = 0;
    for (let b = 0; b < states; b++) total += rate[a * states + b]!;
    exitRate[a] = total;
    let run = 0;
    for (let b = 0; b < states; b++) {
      run += total > 0 ? rate[a * states + b]! / total : 0;
      cumulative[a * states + b] = run;
    }
  }
  return { states, exitRate, cumulative, rate };
}

/** A path: jump times (s from the record start) and the state entered at each jump. */
export interface PathBuffer {
  /** times[0 … jumps): jump times in increasing order. */
  times: Float64Array;
  /** entered[0 … jumps): the state entered at each jump. */
  entered: Uint8Array;
  /** Number of jumps in [0, duration). */
  jumps: number;
}

/** A path buffer with room for `capacity` jumps (grown on demand). */
export function makePathBuffer(capacity = 16): PathBuffer {
  return { times: new Float64Array(capacity), entered: new Uint8Array(capacity), jumps: 0 };
}

/** Doubles the jump arrays of a path buffer or store, keeping their contents. */
export function growJumpArrays(path: { times: Float64Array; entered: Uint8Array }): void {
  const times = new Float64Array(path.times.length * 2);
  times.set(path.times);
  const entered = new Uint8Array(path.entered.length * 2);
  entered.set(path.entered);
  path.times = times;
  path.entered = entered;
}
