/**
 * Running tallies of a sweep point, one per pipeline: the assignment matrix, wrong shots by
 * cause, and moments of the projected value per intended state (all shots, and "clean" shots
 * whose history had no preparation, mapping or in-window jump, which give the noise σ).
 * Integer counts and batch-ordered merges keep the result independent of batching.
 */
import { CAUSES } from './causes.ts';
import { emptyMoments, mergeMoments, momentsFromShiftedSums, type Moments } from './moments.ts';

export interface Tally {
  states: number;
  outcomes: number;
  /** assignments[state·outcomes + outcome]: shots of each intended state by reported outcome. */
  assignments: Float64Array;
  /** causes[state·C + cause]: shots of each intended state by cause (cause 0 = correct). */
  causes: Float64Array;
  clean: Moments[];
  /** discarded[state]: shots of each intended state inside the ambiguous band. */
  discarded: Float64Array;
  /** discardedWrong[state]: of those, shots the plain (unbanded) decision got wrong. */
  discardedWrong: Float64Array;
}

export function emptyTally(states: number, outcomes: number): Tally {
  // (a plain loop: Array.from({ length }) costs more than the typed arrays; one tally per seeding block)
  const clean: Moments[] = [];
  for (let s = 0; s < states; s++) clean.push(emptyMoments());
  return {
    states, outcomes,
    assignments: new Float64Array(states * outcomes),
    causes: new Float64Array(states * CAUSES.length),
    clean,
    discarded: new Float64Array(states),
    discardedWrong: new Float64Array(states),
  };
}

/** Shot data needed to tally one pipeline of a batch. */
export interface TallyInput {
  count: number;
  intended: Uint8Array;
  prepared: Uint8Array;
  initial: Uint8Array;
  jumpCause: Uint8Array;
  projected: Float64Array;
  outcome: Uint8Array;
  cause: Uint8Array;
  /** 1 where the shot fell inside the ambiguous band (absent or null: no band). */
  discarded?: Uint8Array | null;
}

/**
 * Adds one batch to the tally. Moments are accumulated per chunk of `chunk` shots (the seeding
 * block) as shifted sums about each state's first clean value of the chunk
 * (moments.ts momentsFromShiftedSums) and merged chunk by chunk in order, so floating-point
 * results do not depend on how the shots were grouped into batches, workers or shards.
 */
export function addToTally(tally: Tally, b: TallyInput, chunk = 1024): Tally {
  const { outcomes, states } = tally;
  const c = CAUSES.length;
  const n = new Float64Array(states), shift = new Float64Array(states), s1 = new Float64Array(states), s2 = new Float64Array(states);
  for (let start = 0; start < b.count; start += chunk) {
    n.fill(0); s1.fill(0); s2.fill(0);
    const end = Math.min(b.count, start + chunk);
    for (let i = start; i < end; i++) {
      const s = b.intended[i]!;
      tally.assignments[s * outcomes + b.outcome[i]!]!++;
      tally.causes[s * c + b.cause[i]!]!++;
      if (b.discarded && b.discarded[i]) {
        tally.discarded[s]!++;
        if (b.cause[i] !== 0) tally.discardedWrong[s]!++;
      }
      if (b.prepared[i] === s && b.initial[i] === s && b.jumpCause[i] === 0) {
        const x = b.projected[i]!;
        if (n[s] === 0) shift[s] = x;
        n[s]!++;
        const d = x - shift[s]!;
        s1[s]! += d;
        s2[s]! += d * d;
      }
    }
    tally.clean = tally.clean.map((m, s) => mergeMoments(m, momentsFromShiftedSums(n[s]!, shift[s]!, s1[s]!, s2[s]!)));
  }
  return tally;
}

/** Merges two tallies (a first, then b). */
export function mergeTallies(a: Tally, b: Tally): Tally {
  return mergeOnto(emptyTally(a.states, a.outcomes), a, b);
}

/**
 * Merges b into a in place (a first, then b) and returns a: the numbers of mergeTallies(a, b),
 * without a new tally — for the tally tree, which owns its nodes' tallies.
 */
export function mergeInto(a: Tally, b: Tally): Tally {
  return mergeOnto(a, a, b);
}

/** out = a ⊕ b (out may be a). */
function mergeOnto(out: Tally, a: Tally, b: Tally): Tally {
  addInto(a.assignments, b.assignments, out.assignments);
  addInto(a.causes, b.causes, out.causes);
  for (let s = 0; s < a.states; s++) out.clean[s] = mergeMoments(a.clean[s]!, b.clean[s]!);
  addInto(a.discarded, b.discarded, out.discarded);
  addInto(a.discardedWrong, b.discardedWrong, out.discardedWrong);
  return out;
}

/** into = x + y, element by element (a module function: a closure per merge costs more than the sums). */
function addInto(x: Float64Array, y: Float64Array, into: Float64Array): void {
  for (let i = 0; i < into.length; i++) into[i] = x[i]! + y[i]!;
}

/** Shots of intended state s. */
export function shotsOf(t: Tally, s: number): number {
  let n = 0;
  for (let o = 0; o < t.outcomes; o++) n += t.assignments[s * t.outcomes + o]!;
  return n;
}
