/**
 * The sequential random-telegraph generator on one continuous timeline: the reference the tests
 * hold the engine's random-access timeline (src/signal/telegraph-timeline.ts) against.
 */
import { stationaryOccupation } from '../../src/signal/telegraph.ts';
import type { NoiseStream } from '../../src/signal/stream.ts';

/** One two-level fluctuator. */
export interface TelegraphSpec {
  /** Level added in the upper state (signal unit; may be negative). */
  amplitude: number;
  /** Rate of 0→1 switches, 1/s (≥ 0). */
  rateUp: number;
  /** Rate of 1→0 switches, 1/s (≥ 0). */
  rateDown: number;
  /** Samples per second (all fluctuators of one source must share it). */
  sampleRate: number;
}
/** A telegraph-noise generator with an internal sample clock. */
export interface TelegraphSource {
  /** Index of the next sample on the timeline. */
  readonly position: number;
  /** Mean added level, Σ amplitude·occupation (signal unit). */
  readonly mean: number;
  /** Current state (0 or 1) of fluctuator k: the state of the last sample produced or skipped. */
  state(k: number): number;
  /** ADDS the next `count` samples into out[start …] and advances the clock; returns out. */
  fill(out: Float64Array, start: number, count: number): Float64Array;
  /** Advances the clock by `count` samples, applying the switches in between. */
  skip(count: number): void;
}

/**
 * Makes a telegraph-noise source from one fluctuator or several (their levels add). Draws the
 * initial states (in fluctuator order) and then the first waits from `stream`.
 * Throws RangeError on negative rates or differing sample rates.
 */
export function makeTelegraphSource(
  spec: TelegraphSpec | readonly TelegraphSpec[],
  stream: NoiseStream,
): TelegraphSource {
  const specs: readonly TelegraphSpec[] = Array.isArray(spec) ? spec : [spec as TelegraphSpec];
  const count = specs.length;
  if (count === 0) throw new RangeError('telegraph: need at least one fluctuator');
  const sampleRate = specs[0]!.sampleRate;
  for (const s of specs) {
    if (!(s.rateUp >= 0) || !(s.rateDown >= 0) || !(s.sampleRate > 0) || !Number.isFinite(s.amplitude)) {
      throw new RangeError(`telegraph: need rates >= 0, sampleRate > 0, finite amplitude; got ${JSON.stringify(s)}`);
    }
    if (s.sampleRate !== sampleRate) throw new RangeError('telegraph: all fluctuators must share one sample rate');
  }
  const amplitude = new Float64Array(count);
  // Rates per sample, indexed [k*2 + state]: the rate of leaving `state`.
  const leave = new Float64Array(2 * count);
  const state = new Uint8Array(count);
  // Absolute time of the next switch of each fluctuator, in samples.
  const next = new Float64Array(count);
  let mean = 0;
  for (let k = 0; k < count; k++) {
    const s = specs[k]!;
    amplitude[k] = s.amplitude;
    leave[2 * k] = s.rateUp / sampleRate;
    leave[2 * k + 1] = s.rateDown / sampleRate;
    const occupation = stationaryOccupation(s.rateUp, s.rateDown);
    mean += s.amplitude * occupation;
    state[k] = stream.nextDouble() < occupation ? 1 : 0;
  }

  function wait(rate: number): number {
    if (rate === 0) return Infinity;
    // −ln(1 − u) is finite for u in [0, 1) and for u in (0, 1).
    return -Math.log1p(-stream.nextDouble()) / rate;
  }

  function sumLevel(): number {
    let sum = 0;
    for (let k = 0; k < count; k++) if (state[k] === 1) sum += amplitude[k]!;
    return sum;
  }

  for (let k = 0; k < count; k++) next[k] = wait(leave[2 * k + state[k]!]!);
  let level = sumLevel();
  let position = 0;

  /** Index of the fluctuator with the earliest pending switch. */
  function earliest(): number {
    let best = 0;
    for (let k = 1; k < count; k++) if (next[k]! < next[best]!) best = k;
    return best;
  }

  /** Applies, in time order, every switch at a time ≤ t (samples). Returns the earliest pending switch time. */
  function advanceTo(t: number): number {
    let switched = false;
    for (;;) {
      const k = earliest();
      const at = next[k]!;
      if (at > t) {
        // The level is re-summed from the states (not updated by ±amplitude), so it carries
        // no accumulated round-off and one fluctuator gives exactly 0 or amplitude.
        if (switched) level = sumLevel();
        return at;
      }
      const s = 1 - state[k]!;
      state[k] = s;
      next[k] = at + wait(leave[2 * k + s]!);
      switched = true;
    }
  }

  return {
    get position() {
      return position;
    },
    mean,
    state(k) {
      return state[k]!;
    },
    fill(out, start, n) {
      let done = 0;
      while (done < n) {
        const t = position + done;
        const pending = advanceTo(t);
        // Samples t, t+1, … strictly before the pending switch share the current level.
        const run = Math.min(n - done, Math.ceil(pending) - t);
        const base = start + done;
        for (let i = 0; i < run; i++) out[base + i] = out[base + i]! + level;
        done += run;
      }
      position += n;
      return out;
    },
    skip(n) {
      if (n <= 0) return;
      advanceTo(position + n - 1);
      position += n;
    },
  };
}
