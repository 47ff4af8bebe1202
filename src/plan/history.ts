/**
 * The hidden-state history of shots, shared by every engine: intended state, preparation and
 * mapping flips, and the chain's path over the record. Both engines draw a seeding block's
 * histories first, from the start of the block's stream, and only then the block's noise; so
 * for the same scenario and seed the trace and exact engines see exactly the same histories
 * shot by shot, and the engines differ only in how the integrated value is obtained.
 */
import { cumulativeMixture } from '../physics/flips.ts';
import type { RandomStream } from '../random/stream.ts';
import type { CompiledPoint } from './compile.ts';

/** The truth columns of a batch (a subset of ShotBatch). */
export interface HistoryColumns {
  intended: Uint8Array;
  prepared: Uint8Array;
  initial: Uint8Array;
  atWindowStart: Uint8Array;
  atWindowEnd: Uint8Array;
  firstJump: Float64Array;
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

function growJumps(store: PathStore): void {
  const times = new Float64Array(store.times.length * 2);
  times.set(store.times);
  const entered = new Uint8Array(store.entered.length * 2);
  entered.set(store.entered);
  store.times = times;
  store.entered = entered;
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
  /** e^(−exit·recordLength)·(1 − 1e−6): a uniform below it certainly gives no jump in the record. */
  noJumpCut: Float64Array;
  cumulative: Float64Array;
  jumpCause: Uint8Array;
  recordLength: number;
  windowStartTime: number;
  /** Time of the last window sample: a later jump cannot change what the window saw. */
  lastWindowSample: number;
}

/** The tables `sampleHistories` needs, for one compiled point. */
export function historyTables(point: CompiledPoint): HistoryTables {
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
    prepareCumulative: point.prepareCumulative ?? cumulativeMixture(scenario.prepare),
    prepProbability: prep.probability, prepInto: prep.into, anyPrep: prep.any,
    mapProbability: map.probability, mapInto: map.into, anyMap: map.any,
    exitRate: chain.exitRate,
    noJumpCut: Float64Array.from(chain.exitRate, (r) => (r > 0 ? Math.exp(-r * recordLength) * (1 - 1e-6) : 1)),
    cumulative: chain.cumulative,
    jumpCause: point.jumpCause,
    recordLength,
    windowStartTime: grid.windowLo / fs,
    lastWindowSample: (grid.windowHi - 1) / fs,
  };
}

/**
 * Draws the histories of shots [from, to) of `out` (indices within the batch) from `stream`,
 * in shot order, and stores their jumps in `store` (store index = batch index − from).
 *
 * Per shot: the intended state (one uniform), a preparation flip and a mapping flip (one
 * uniform each, drawn only when the scenario has such flips), then the chain's path on
 * [0, record): exponential holding times −ln(u)/rate and the jump chain (Norris, "Markov
 * Chains", Cambridge 1997, §2.6). The logarithm is skipped when u is so small that the holding
 * time certainly outlasts the record (u < e^(−rate·remaining) with a margin); the result is the
 * same as computing it, which `test/plan/history.test.ts` checks against physics/chain.ts.
 */
export function sampleHistories(
  t: HistoryTables, stream: RandomStream, out: HistoryColumns, from: number, to: number, store: PathStore,
): void {
  const n = t.states;
  const { prepareCumulative, exitRate, cumulative, jumpCause, recordLength, windowStartTime, lastWindowSample } = t;
  const last = n - 1;
  let nj = 0;
  for (let i = from; i < to; i++) {
    store.offset[i - from] = nj;
    let u = stream.nextDouble();
    let intended = 0;
    while (intended < last && u > prepareCumulative[intended]!) intended++;
    let prepared = intended;
    if (t.anyPrep) {
      u = stream.nextDouble();
      if (u < t.prepProbability[intended]!) prepared = t.prepInto[intended]!;
    }
    let initial = prepared;
    if (t.anyMap) {
      u = stream.nextDouble();
      if (u < t.mapProbability[prepared]!) initial = t.mapInto[prepared]!;
    }
    out.intended[i] = intended;
    out.prepared[i] = prepared;
    out.initial[i] = initial;
    // the path
    let state = initial, time = 0, atStart = initial, atEnd = initial, first = NaN, cause = 0;
    const firstJumpIndex = nj;
    for (;;) {
      const exit = exitRate[state]!;
      if (exit <= 0) break;
      u = stream.nextDouble();
      // quick exit: the holding time −ln(u)/exit certainly reaches past the record end
      if (time === 0 && u < t.noJumpCut[state]!) break;
      time += -Math.log(u) / exit;
      if (time >= recordLength) break;
      const v = stream.nextDouble();
      let next = 0;
      const row = state * n;
      while (next < last && v > cumulative[row + next]!) next++;
      if (nj === store.times.length) growJumps(store);
      store.times[nj] = time;
      store.entered[nj] = next;
      if (nj === firstJumpIndex) {
        first = time;
        if (time <= lastWindowSample) cause = jumpCause[state * n + next]!;
      }
      nj++;
      if (time <= windowStartTime) atStart = next;
      if (time <= lastWindowSample) atEnd = next;
      state = next;
    }
    out.atWindowStart[i] = atStart;
    out.atWindowEnd[i] = atEnd;
    out.firstJump[i] = first;
    out.jumpCause[i] = cause;
  }
  store.offset[to - from] = nj;
}
