/**
 * The hidden-state history of shots, shared by every engine: intended state, preparation and
 * mapping flips, and the chain's path over the record. Both engines draw a seeding block's
 * histories first, from the start of the block's stream, and only then the block's noise; so
 * for the same scenario and seed the trace and exact engines see exactly the same histories
 * shot by shot, and the engines differ only in how the integrated value is obtained.
 */
import type { RandomStream } from '../random/stream.ts';
import type { Scenario } from '../scenario/types.ts';
import type { Grid } from '../signal/grid.ts';
import { growJumpArrays, type Chain } from './chain.ts';

/** The truth columns of a batch (a subset of ShotBatch). */
export interface HistoryColumns {
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
}

/** The jumps of a run of shots, stored flat: shot i's jumps are [offset[i], offset[i+1]). */
export interface PathStore {
  offset: Int32Array;
  times: Float64Array;
  entered: Uint8Array;
}

/** A path store for up to `shots` shots (jump storage grows on demand). */
export function makePathStore(shots: number, jumps = 256): PathStore {
  return { offset: new Int32Array(shots + 1), times: new Float64Array(jumps), entered: new Uint8Array(jumps) };
}



/** Per-point constants of history sampling, derived once from the compiled point. */
export interface HistoryTables {
  states: number;
  prepareCumulative: Float64Array;
  /** Per state: flip probability and target (probability −1 when the state has no flip). */
  prepProbability: Float64Array;
  prepInto: Uint8Array;
  mapProbability: Float64Array;
  mapInto: Uint8Array;
  /** Whether any state has a preparation (mapping) flip; without one no uniform is drawn for it. */
  anyPrep: boolean;
  anyMap: boolean;
  exitRate: Float64Array;
  /**
   * Per state: a first-holding-time uniform below this certainly gives no jump inside the
   * record: e^(−exit·recordLength)·(1 − 1e−6), or 2 (never reached) for a state that cannot leave.
   */
  noJumpCut: Float64Array;
  cumulative: Float64Array;
  jumpCause: Uint8Array;
  recordLength: number;
  windowStartTime: number;
  /** Time of the last window sample: a later jump cannot change what the window saw. */
  lastWindowSample: number;
}

/** The tables `sampleHistories` needs, for one compiled point. */
/** What the history tables are made from: a compiled point has it all (engine/compile-point.ts). */
export interface HistorySource {
  scenario: Pick<Scenario, 'states' | 'preparationError' | 'mappingError'>;
  grid: Pick<Grid, 'samples' | 'sampleRate' | 'windowLo' | 'windowHi'>;
  chain: Pick<Chain, 'exitRate' | 'cumulative'>;
  /** Cumulative prepared mixture. */
  prepareCumulative: Float64Array;
  /** Per state and destination: the cause code of a jump. */
  jumpCause: Uint8Array;
}

export function historyTables(point: HistorySource): HistoryTables {
  const { scenario, grid, chain } = point;
  const n = scenario.states.length;
  const fs = grid.sampleRate;
  const flips = (list: typeof scenario.preparationError) => {
    const probability = new Float64Array(n).fill(-1);
    const into = new Uint8Array(n);
    list.forEach((f, s) => { if (f) { probability[s] = f.probability; into[s] = f.into; } });
    return { probability, into, any: list.some((f) => f !== null) };
  };
  const prep = flips(scenario.preparationError), map = flips(scenario.mappingError);
  const recordLength = grid.samples / fs;
  return {
    states: n,
    prepareCumulative: point.prepareCumulative,
    prepProbability: prep.probability, prepInto: prep.into, anyPrep: prep.any,
    mapProbability: map.probability, mapInto: map.into, anyMap: map.any,
    exitRate: chain.exitRate,
    noJumpCut: Float64Array.from(chain.exitRate, (r) => (r > 0 ? Math.exp(-r * recordLength) * (1 - 1e-6) : 2)),
    cumulative: chain.cumulative,
    jumpCause: point.jumpCause,
    recordLength,
    windowStartTime: grid.windowLo / fs,
    lastWindowSample: (grid.windowHi - 1) / fs,
  };
}

const INV_TWO_POW_32 = 1 / 4294967296;

/**
 * Draws the histories of shots [from, to) of `out` (indices within the batch) from `stream`,
 * in shot order, and stores their jumps in `store` (store index = batch index − from).
 *
 * Draws per shot, in this order: the intended state (one uniform); a preparation flip and a
 * mapping flip (one uniform each, only when the scenario has such flips); the first holding
 * time (one uniform u, always — ignored in a state that cannot leave); only when that holding
 * time −ln(u)/rate ends inside the record, the jump chain: for each jump one uniform for the
 * destination and, if the new state can leave, one for its holding time (exact sampling of a
 * continuous-time Markov chain: Norris, "Markov Chains", Cambridge 1997, §2.6).
 *
 * Written for speed, since the exact engine spends most of its time here: the generator runs
 * inline on local variables (each two-line `m = …` step below is random/xoshiro.ts nextInt32Of,
 * copied: calling it measured 6–8 % slower; test/random/step-copies.test.ts checks the copies
 * against it), and the common path has no data-dependent branches (a random
 * 50/50 branch costs more than a whole draw); the logarithm is taken only when u is large
 * enough for the holding time to end inside the record (u ≥ e^(−rate·record) with a margin).
 */
export function sampleHistories(
  t: HistoryTables, stream: RandomStream, out: HistoryColumns, from: number, to: number, store: PathStore,
): void {
  const last = t.states - 1;
  const { prepareCumulative, exitRate, recordLength } = t;
  const { prepProbability, prepInto, mapProbability, mapInto, anyPrep, anyMap, noJumpCut } = t;
  const intendedCol = out.intended, preparedCol = out.prepared, initialCol = out.initial;
  const atStartCol = out.atWindowStart, atEndCol = out.atWindowEnd, firstCol = out.firstJump, causeCol = out.jumpCause;
  const offset = store.offset;
  const st = stream.s;
  let s0 = st[0]!, s1 = st[1]!, s2 = st[2]!, s3 = st[3]!;
  let m = 0, r = 0, x = 0, n2 = 0, n3 = 0;
  let nj = 0;
  const firstCut = prepareCumulative[0] ?? 2;
  for (let i = from; i < to; i++) {
    offset[i - from] = nj;
    // xoshiro128** step (random/xoshiro.ts nextInt32Of), inline
    m = Math.imul(s1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
    x = s1 << 9; n2 = s2 ^ s0; n3 = s3 ^ s1; s1 ^= n2; s0 ^= n3; s2 = n2 ^ x; s3 = (n3 << 11) | (n3 >>> 21);
    let u = ((r >>> 0) + 0.5) * INV_TWO_POW_32;
    // the first k with u ≤ cumulative[k]: without a branch for two states (a loop here costs
    // more than the whole draw), else a short search
    const intended = last === 1 ? +(u > firstCut) : firstAbove(prepareCumulative, last, u);
    let prepared = intended;
    if (anyPrep) {
      m = Math.imul(s1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
      x = s1 << 9; n2 = s2 ^ s0; n3 = s3 ^ s1; s1 ^= n2; s0 ^= n3; s2 = n2 ^ x; s3 = (n3 << 11) | (n3 >>> 21);
      u = ((r >>> 0) + 0.5) * INV_TWO_POW_32;
      prepared = intended + +(u < prepProbability[intended]!) * (prepInto[intended]! - intended);
    }
    let initial = prepared;
    if (anyMap) {
      m = Math.imul(s1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
      x = s1 << 9; n2 = s2 ^ s0; n3 = s3 ^ s1; s1 ^= n2; s0 ^= n3; s2 = n2 ^ x; s3 = (n3 << 11) | (n3 >>> 21);
      u = ((r >>> 0) + 0.5) * INV_TWO_POW_32;
      initial = prepared + +(u < mapProbability[prepared]!) * (mapInto[prepared]! - prepared);
    }
    intendedCol[i] = intended;
    preparedCol[i] = prepared;
    initialCol[i] = initial;
    atStartCol[i] = initial;
    atEndCol[i] = initial;
    firstCol[i] = NaN;
    causeCol[i] = 0;
    // the first holding time
    m = Math.imul(s1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
    x = s1 << 9; n2 = s2 ^ s0; n3 = s3 ^ s1; s1 ^= n2; s0 ^= n3; s2 = n2 ^ x; s3 = (n3 << 11) | (n3 >>> 21);
    u = ((r >>> 0) + 0.5) * INV_TWO_POW_32;
    if (u < noJumpCut[initial]!) continue;
    const time = -Math.log(u) / exitRate[initial]!;
    if (time >= recordLength) continue;
    // rare: jumps inside the record; the chain continues through the stream's own methods
    // (outside this loop, which keeps the common path's registers free)
    st[0] = s0; st[1] = s1; st[2] = s2; st[3] = s3;
    nj = walkChain(t, stream, out, i, initial, time, store, nj);
    s0 = st[0]!; s1 = st[1]!; s2 = st[2]!; s3 = st[3]!;
  }
  st[0] = s0; st[1] = s1; st[2] = s2; st[3] = s3;
  offset[to - from] = nj;
}

/** The first k < last with u ≤ c[k], else last. */
function firstAbove(c: Float64Array, last: number, u: number): number {
  let k = 0;
  while (k < last && u > c[k]!) k++;
  return k;
}

/**
 * The jump chain of shot i, whose first jump is at `first` (the stream's state is the loop's):
 * fills the shot's jump columns and path store; returns the store's new jump count.
 */
export function walkChain(
  t: HistoryTables, stream: RandomStream, out: HistoryColumns, i: number, initial: number, first: number, store: PathStore, nj: number,
): number {
  const n = t.states, last = n - 1;
  const { cumulative, exitRate, jumpCause, recordLength, windowStartTime, lastWindowSample } = t;
  let state = initial, atStart = initial, atEnd = initial, time = first;
  out.firstJump[i] = time;
  for (let j = 0; ; j++) {
    const v = stream.nextDouble();
    let next = 0;
    const row = state * n;
    while (next < last && v > cumulative[row + next]!) next++;
    if (nj === store.times.length) growJumpArrays(store);
    store.times[nj] = time;
    store.entered[nj] = next;
    nj++;
    if (j === 0 && time <= lastWindowSample) out.jumpCause[i] = jumpCause[row + next]!;
    if (time <= windowStartTime) atStart = next;
    if (time <= lastWindowSample) atEnd = next;
    state = next;
    const exit = exitRate[state]!;
    if (exit <= 0) break;
    time += stream.nextExponential(exit);
    if (time >= recordLength) break;
  }
  out.atWindowStart[i] = atStart;
  out.atWindowEnd[i] = atEnd;
  return nj;
}
