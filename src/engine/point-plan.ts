/**
 * What the engines compile for one point: the scenario (the user's document, never changed by a
 * run) and the run's options for that point. The options travel beside the scenario, to this
 * thread's engine or to a worker, and never inside it.
 */
import type { Scenario } from '../scenario/types.ts';

/** A run's options for one point. */
export interface PointOptions {
  /** Per pipeline: the bin weights calibration gave it (matched/optimal), null where it keeps its own. */
  weights?: readonly (Float64Array | null)[];
  /** Keep every scored shot's whole record: raw, or demodulated to baseband I/Q. */
  keepTraces?: 'raw' | 'baseband';
}

/** One point as the engines receive it. */
export interface PointPlan extends PointOptions {
  scenario: Scenario;
}
