/**
 * What calibration and scoring read of a batch of shots: the hidden-state history of each shot
 * (physics/history.ts), each pipeline's integrated I and Q, and, where a pipeline needs them, its
 * decimated bins. The engines' ShotBatch carries all of it.
 */
import type { HistoryColumns } from '../physics/history.ts';
import type { KeptBins } from '../dsp/process-record.ts';

export interface ShotColumns extends HistoryColumns {
  count: number;
  /** Per pipeline: integrated I and Q of every shot. */
  values: { inPhase: Float64Array; quadrature: Float64Array }[];
  /** Per pipeline: the decimated bins of every shot, where a pipeline needs them (else null or absent). */
  records?: (KeptBins | null)[];
}
