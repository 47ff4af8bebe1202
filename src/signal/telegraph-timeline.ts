/**
 * Random telegraph noise on the shots' continuous timeline, random access by seeding block: the
 * engine's telegraph generator (the sequential one is telegraph.ts).
 *
 * Model. Each fluctuator is a two-state Markov chain (rates up 0→1 and down 1→0), adding 0 or its
 * amplitude (Machlup, J. Appl. Phys. 25, 341 (1954)). With λ = up + down and π = up/λ the chain
 * is the same process as "resets" at the times of a Poisson process of rate λ, each reset
 * drawing a fresh state, 1 with probability π (the transition matrix over a time t is
 * e^(−λt)·I + (1 − e^(−λt))·[π-row]; a reset that redraws the same state is no switch).
 * Started from the stationary occupation, this is exact.
 *
 * Random access. The timeline is cut into blocks of `shotsPerBlock` shots (the seeding blocks), of
 * duration D = shotsPerBlock·period. Block b's stream first draws a summary per fluctuator: whether
 * the block has any reset (probability 1 − e^(−λD)), the time of its last reset (given one, D − L is
 * an exponential of rate λ truncated to [0, D)), that reset's state, and a genesis state (used
 * by block 0 only: the stationary state before the first reset). The state at the start of block
 * b is the last reset's state of the nearest earlier block that had one (genesis if none), so any
 * block is reachable from the summaries alone (each summary costs 4 draws; they are cached).
 * Inside the block, given the last reset at L, the resets on [0, L) are a plain Poisson process
 * and none follow L (a Poisson process conditioned on its last point): the shots are then
 * simulated in order, the gap before each record by the closed form (any reset in a gap of
 * length g: probability 1 − e^(−λg); only the last one matters) and the record by exponential
 * waits (memoryless, so starting them at the record start is exact). Everything a shot sees is
 * therefore a fixed function of the seed, whatever the batching.
 */
import type { NoiseStream } from './stream.ts';
import { stationaryOccupation } from './telegraph.ts';

/** One fluctuator of the timeline (amplitude in the unit of the path it is added to). */
export interface Fluctuator {
  amplitude: number;
  /** 0→1 rate, 1/s. */
  rateUp: number;
  /** 1→0 rate, 1/s. */
  rateDown: number;
}

/** The switches of every fluctuator during one record, record-local times in seconds. */
export interface TelegraphRecord {
  /** State of fluctuator f at the record start. */
  start: Uint8Array;
  /** Switch times (increasing per fluctuator), and which fluctuator switched, in time order of simulation. */
  times: Float64Array;
  which: Uint8Array;
  count: number;
}

/** Makes an empty record buffer for `fluctuators` fluctuators. */
export function makeTelegraphRecord(fluctuators: number, capacity = 64): TelegraphRecord {
  return { start: new Uint8Array(fluctuators), times: new Float64Array(capacity), which: new Uint8Array(capacity), count: 0 };
}

interface Summary {
  any: Uint8Array;
  last: Float64Array;
  value: Uint8Array;
  genesis: Uint8Array;
}

/** A telegraph timeline that simulates records shot by shot. */
export interface TelegraphTimeline {
  /**
   * Simulates the record of shot `index` into `out` (switch lists per fluctuator). Shots of one
   * block are cheapest in increasing order; any order gives the same values.
   */
  record(index: number, out: TelegraphRecord): TelegraphRecord;
  /** State of fluctuator f at the start of block b (for tests). */
  blockStart(block: number, f: number): number;
}

/** Timing of the shots on the timeline. */
export interface TelegraphTiming {
  /** Time between shot starts, s. */
  period: number;
  /** Record length, s (≤ period). */
  recordLength: number;
  /** Shots per seeding block. */
  shotsPerBlock: number;
}

/**
 * Makes a telegraph timeline; block b draws only from `streamFor(b)` (first its summary, then the
 * in-block simulation). Throws RangeError on negative rates or a record longer than the period.
 */
export function makeTelegraphTimeline(
  fluctuators: readonly Fluctuator[], timing: TelegraphTiming, streamFor: (block: number) => NoiseStream,
): TelegraphTimeline {
  const F = fluctuators.length;
  for (const f of fluctuators) {
    if (!(f.rateUp >= 0) || !(f.rateDown >= 0) || !Number.isFinite(f.amplitude)) {
      throw new RangeError(`telegraph: need rates >= 0 and a finite amplitude; got ${JSON.stringify(f)}`);
    }
  }
  const { period, recordLength, shotsPerBlock } = timing;
  if (!(recordLength <= period)) throw new RangeError('telegraph: the record must not be longer than the shot period');
  const D = shotsPerBlock * period;
  const lambda = Float64Array.from(fluctuators, (f) => f.rateUp + f.rateDown);
  const occupation = Float64Array.from(fluctuators, (f) => stationaryOccupation(f.rateUp, f.rateDown));

  const summaries = new Map<number, Summary>();
  const starts = new Map<number, Uint8Array>();

  function draw(stream: NoiseStream): Summary {
    const s: Summary = { any: new Uint8Array(F), last: new Float64Array(F), value: new Uint8Array(F), genesis: new Uint8Array(F) };
    for (let f = 0; f < F; f++) {
      const l = lambda[f]!;
      const pAny = -Math.expm1(-l * D);
      const u1 = stream.nextDouble(), u2 = stream.nextDouble(), u3 = stream.nextDouble(), u4 = stream.nextDouble();
      s.any[f] = u1 < pAny ? 1 : 0;
      // D − L ~ Exp(λ) truncated to [0, D): inverse of (1 − e^(−λx))/(1 − e^(−λD))
      s.last[f] = s.any[f] ? Math.max(0, D + Math.log1p(-u2 * pAny) / l) : 0;
      s.value[f] = u3 < occupation[f]! ? 1 : 0;
      s.genesis[f] = u4 < occupation[f]! ? 1 : 0;
    }
    return s;
  }

  function summary(b: number): Summary {
    let s = summaries.get(b);
    if (!s) {
      s = draw(streamFor(b));
      if (summaries.size > 256) summaries.clear();
      summaries.set(b, s);
    }
    return s;
  }

  /**
   * State of every fluctuator at the start of block b: walking back from block b − 1, the last
   * reset's state of the nearest block that had one; a known start of a later block ends the
   * walk (it already holds the answer for every fluctuator not yet found); genesis otherwise.
   */
  function startOf(b: number): Uint8Array {
    const known = starts.get(b);
    if (known) return known;
    const state = new Uint8Array(F);
    const found = new Uint8Array(F);
    let missing = F;
    for (let j = b - 1; j >= 0 && missing > 0; j--) {
      const after = starts.get(j + 1); // the state at the end of block j
      if (after) {
        for (let f = 0; f < F; f++) if (!found[f]) state[f] = after[f]!;
        missing = 0;
        break;
      }
      const s = summary(j);
      for (let f = 0; f < F; f++) {
        if (!found[f] && s.any[f]) {
          state[f] = s.value[f]!;
          found[f] = 1;
          missing--;
        }
      }
    }
    if (missing > 0) {
      const g = summary(0).genesis;
      for (let f = 0; f < F; f++) if (!found[f]) state[f] = g[f]!;
    }
    if (starts.size > 256) starts.clear();
    starts.set(b, state);
    return state;
  }

  // in-block simulation state
  let block = -1;
  let next = 0; // local index of the next shot to simulate
  let stream: NoiseStream | null = null;
  let sum: Summary | null = null;
  const state = new Uint8Array(F);
  const time = new Float64Array(F); // local time up to which each fluctuator is simulated

  function enter(b: number): void {
    block = b;
    next = 0;
    stream = streamFor(b);
    const s = draw(stream); // the summary: the same draws summary(b) makes
    if (!summaries.has(b)) summaries.set(b, s);
    sum = s;
    state.set(startOf(b));
    time.fill(0);
  }

  function push(out: TelegraphRecord, t: number, f: number): void {
    if (out.count === out.times.length) {
      const times = new Float64Array(out.times.length * 2);
      times.set(out.times);
      const which = new Uint8Array(out.which.length * 2);
      which.set(out.which);
      out.times = times;
      out.which = which;
    }
    out.times[out.count] = t;
    out.which[out.count] = f;
    out.count++;
  }

  /** Simulates local shot j; records switches into `out` when given. */
  function simulate(j: number, out: TelegraphRecord | null): void {
    const st = stream!, s = sum!;
    const t0 = j * period;
    const t1 = t0 + recordLength;
    if (out) out.count = 0;
    for (let f = 0; f < F; f++) {
      const l = lambda[f]!;
      const L = s.any[f] ? s.last[f]! : -1; // no reset at all when L < 0
      // the gap [time, t0)
      const a = time[f]!;
      if (L >= a && L < t0) state[f] = s.value[f]!;
      else if (L >= t0 && t0 > a) {
        if (st.nextDouble() < -Math.expm1(-l * (t0 - a))) state[f] = st.nextDouble() < occupation[f]! ? 1 : 0;
      }
      if (out) out.start[f] = state[f]!;
      // the record [t0, t1): free resets before min(t1, L), then the last reset at L
      const end = Math.min(t1, L);
      if (end > t0) {
        let t = t0;
        for (;;) {
          t += -Math.log(st.nextDouble()) / l;
          if (t >= end) break;
          const v = st.nextDouble() < occupation[f]! ? 1 : 0;
          if (v !== state[f]) {
            state[f] = v;
            if (out) push(out, t - t0, f);
          }
        }
      }
      if (L >= t0 && L < t1 && s.value[f] !== state[f]) {
        state[f] = s.value[f]!;
        if (out) push(out, L - t0, f);
      }
      time[f] = t1;
    }
  }

  return {
    record(index, out) {
      const b = Math.floor(index / shotsPerBlock);
      const j = index - b * shotsPerBlock;
      if (b !== block || j < next) enter(b);
      while (next < j) simulate(next++, null);
      simulate(next++, out);
      return out;
    },
    blockStart(b, f) {
      return startOf(b)[f]!;
    },
  };
}
