/**
 * The per-shot slow-noise work of a point's noise plan (compile-noise.ts): the 1/f timelines and
 * the telegraph timeline of one purpose, with their caches, kept in a batch scratch so that later
 * batches reuse the block pairs and block summaries already drawn.
 */
import { SEED_BLOCK, makeStream, type StreamPurpose } from '../random/streams.ts';
import { makeFlickerTimeline, type FlickerTimeline } from './flicker-timeline.ts';
import { makeTelegraphRecord, makeTelegraphTimeline, type TelegraphRecord, type TelegraphTimeline } from './telegraph-timeline.ts';
import type { NoiseInjection, Scenario } from '../scenario/types.ts';
import { flickerStreamIndex, telegraphStreamIndex, type NoisePlan } from './noise-plan.ts';

/** record[k] += w[j]·below[k] + w[j + 1]·above[k], j = index[k]: the window interpolated onto the record. */
function addInterpolatedNoise(
  record: Float64Array, lo: number, hi: number, w: Float64Array, index: Int32Array, below: Float64Array, above: Float64Array,
): void {
  for (let k = lo; k < hi; k++) {
    const j = index[k]!;
    record[k] += w[j]! * below[k]! + w[j + 1]! * above[k]!;
  }
}

/**
 * The per-shot slow-noise hook of one point and purpose (holds the timelines' caches). Per shot:
 * `shot(i)` draws the shot's 1/f window values and telegraph switches; `addTelegraph` and
 * `addFlicker` add them to the record; `flickerValue` gives the 1/f part of a
 * pipeline's value directly from the window (Σ_j G_j·w_j, the same linear map as adding it to the
 * record and integrating, at a fraction of the cost). batch.ts adds the 1/f noise to the record
 * only where the record itself is used beyond the linear values (digitizer, kept traces or bins).
 */
export interface NoiseRuntime {
  /** Draws shot `shot`'s slow noise (index within its purpose). */
  shot(shot: number): void;
  /** Adds the current shot's telegraph noise to record[lo … hi). */
  addTelegraph(record: Float64Array, lo: number, hi: number): void;
  /** Adds the current shot's 1/f noise to record[lo … hi). */
  addFlicker(record: Float64Array, lo: number, hi: number): void;
  /** The current shot's 1/f contribution to pipeline p's I (or Q) value. */
  flickerValue(pipeline: number, quadrature: boolean): number;
  /** Whether the point has 1/f noise. */
  readonly hasFlicker: boolean;
}

/** Makes the slow-noise runtime of a point's plan for one purpose's timeline. */
export function makeNoiseRuntime(plan: NoisePlan, seed: number, point: number, purpose: StreamPurpose, sampleRate: number, timing: Scenario['timing']): NoiseRuntime {
  const fl = plan.flicker;
  const timelines: FlickerTimeline[] = fl
    ? fl.sources.map((s) => makeFlickerTimeline(s.bands, (band, pair) => makeStream(seed, point, 'slow-noise', flickerStreamIndex(purpose, s.source, band, pair))))
    : [];
  const windows: Record<NoiseInjection, Float64Array> = {
    sensor: new Float64Array(fl ? fl.width + 1 : 0), amplifier: new Float64Array(fl ? fl.width + 1 : 0),
  };
  const tp = plan.telegraph;
  const telegraph: TelegraphTimeline | null = tp
    ? makeTelegraphTimeline(tp.fluctuators, { period: timing.shotPeriod, recordLength: timing.recordLength, shotsPerBlock: SEED_BLOCK },
      (block) => makeStream(seed, point, 'slow-noise', telegraphStreamIndex(purpose, block)))
    : null;
  const telegraphRecord: TelegraphRecord | null = tp ? makeTelegraphRecord(tp.fluctuators.length) : null;

  function drawFlicker(shot: number): void {
    const f = fl!;
    // shots beyond the planned ones (auxiliary shots, benchmarks) wrap around the timeline
    const J0 = (shot % f.capacity) * f.step + f.offset;
    for (const injection of ['sensor', 'amplifier'] as const) {
      if (!f.below[injection]) continue;
      const w = windows[injection];
      w.fill(0);
      f.sources.forEach((s, i) => { if (s.injection === injection) timelines[i]!.addRange(w, 0, J0, f.width); });
    }
  }

  function addFlicker(record: Float64Array, lo: number, hi: number): void {
    const f = fl!;
    for (const injection of ['sensor', 'amplifier'] as const) {
      const below = f.below[injection], above = f.above[injection];
      if (below && above) addInterpolatedNoise(record, lo, hi, windows[injection], f.index, below, above);
    }
  }

  function addTelegraph(record: Float64Array, lo: number, hi: number): void {
    const r = telegraphRecord!;
    const p = tp!;
    let e = 0;
    for (let fi = 0; fi < p.fluctuators.length; fi++) {
      const a = p.fluctuators[fi]!.amplitude;
      const sensor = p.injections[fi] === 'sensor';
      let state = r.start[fi]!;
      let k = lo;
      for (;;) {
        const switching = e < r.count && r.which[e] === fi;
        const until = switching ? Math.min(hi, Math.max(lo, Math.ceil(r.times[e]! * sampleRate))) : hi;
        if (state === 1 && until > k) {
          if (sensor) {
            const w = plan.sensorWeight;
            for (let q = k; q < until; q++) record[q] += a * w[q]!;
          } else {
            const v = a * plan.gain;
            for (let q = k; q < until; q++) record[q] += v;
          }
        }
        if (until > k) k = until;
        if (!switching) break;
        state = 1 - state;
        e++;
      }
    }
  }

  return {
    hasFlicker: fl !== null,
    shot(shot) {
      if (fl) drawFlicker(shot);
      if (telegraph) telegraph.record(shot, telegraphRecord!);
    },
    addTelegraph(record, lo, hi) {
      if (telegraph) addTelegraph(record, lo, hi);
    },
    addFlicker(record, lo, hi) {
      if (fl) addFlicker(record, lo, hi);
    },
    flickerValue(p, quadrature) {
      if (!fl) return 0;
      let v = 0;
      for (const injection of ['sensor', 'amplifier'] as const) {
        const c = fl.carried[injection]?.[p];
        const g = c ? (quadrature ? c.quadrature : c.inPhase) : null;
        if (!g) continue;
        const w = windows[injection];
        let s0 = 0, s1 = 0;
        let j = 0;
        for (; j + 1 < g.length; j += 2) {
          s0 += g[j]! * w[j]!;
          s1 += g[j + 1]! * w[j + 1]!;
        }
        if (j < g.length) s0 += g[j]! * w[j]!;
        v += s0 + s1;
      }
      return v;
    },
  };
}
