/**
 * The per-shot work of a point's noise plan (noise-plan.ts) on one purpose's timeline: every
 * kind's runtime, with its caches, kept in a batch scratch so that later batches reuse what was
 * already drawn.
 *
 * Per shot the engines call `shot(i)`, then put the noise in where it belongs:
 * - `addToRecord` adds the kinds that have no linear path (they must be in the record itself);
 * - `addLinearToRecord` adds the kinds that have one, for when the record is used beyond the
 *   linear values (a digitizer, kept traces or bins);
 * - `linearValue` gives those kinds' part of a pipeline's value directly (Σ_j G_j·w_j for 1/f:
 *   the same linear map as adding them to the record and integrating, at a fraction of the cost);
 * - `addShotNoise` adds the kinds drawn afresh for each shot (correlated noise) after the shot's
 *   white noise, from the shot's own streams (one per lane: signal/injection.ts).
 * Kinds are visited in registry order.
 */
import { makeStream, type StreamPurpose } from '../random/streams.ts';
import type { RandomStream } from '../random/stream.ts';
import type { NoiseKindRuntime } from './noise/contract.ts';
import type { NoisePlan } from './noise-plan.ts';

/** The per-shot slow-noise hooks of one point and purpose. */
export interface NoiseRuntime {
  /** Draws shot `shot`'s noise of every kind (index within its purpose). */
  shot(shot: number): void;
  /** Adds the current shot's noise of the kinds without a linear path to record[lo … hi). */
  addToRecord(record: Float64Array, lo: number, hi: number): void;
  /** Adds the current shot's noise of the kinds with a linear path to record[lo … hi). */
  addLinearToRecord(record: Float64Array, lo: number, hi: number): void;
  /** The current shot's part of pipeline p's I (or Q) value from the kinds with a linear path. */
  linearValue(pipeline: number, quadrature: boolean): number;
  /** Whether any kind has a linear path (else linearValue is 0 and addLinearToRecord does nothing). */
  readonly hasLinear: boolean;
  /** Adds the current shot's noise of the kinds drawn per shot, from the shot's own `streams` (one per lane; after its white noise). */
  addShotNoise(record: Float64Array, lo: number, hi: number, streams: readonly RandomStream[]): void;
}

/** Makes the noise runtime of a point's plan for one purpose's timeline. */
export function makeNoiseRuntime(plan: NoisePlan, seed: number, point: number, purpose: StreamPurpose): NoiseRuntime {
  const stream = (index: number, lane: number) => makeStream(seed, point, 'slow-noise', index, lane);
  const all = plan.kinds.map((k) => ({ linear: k.compiled.linear, runtime: k.compiled.runtime(purpose, stream) }));
  const recordOnly: NoiseKindRuntime[] = all.filter((k) => !k.linear).map((k) => k.runtime);
  const linear: NoiseKindRuntime[] = all.filter((k) => k.linear).map((k) => k.runtime);
  const perShot = plan.kinds.flatMap((k) => (k.compiled.perShot ? [k.compiled.perShot] : []));
  return {
    hasLinear: linear.length > 0,
    shot(shot) {
      for (const k of all) k.runtime.shot(shot);
    },
    addToRecord(record, lo, hi) {
      for (const r of recordOnly) r.addToRecord(record, lo, hi);
    },
    addLinearToRecord(record, lo, hi) {
      for (const r of linear) r.addToRecord(record, lo, hi);
    },
    addShotNoise(record, lo, hi, streams) {
      for (const k of perShot) k.addShot(record, lo, hi, streams);
    },
    linearValue(p, quadrature) {
      if (linear.length === 1) return linear[0]!.value!(p, quadrature);
      let v = 0;
      for (const r of linear) v += r.value!(p, quadrature);
      return v;
    },
  };
}
