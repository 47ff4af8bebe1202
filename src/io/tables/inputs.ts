/**
 * What the table writers read, declared here so that the writers depend on no engine and no run:
 * a finished point (the run's PointResult has it all) and a batch of shots (the engines'
 * ShotBatch has it all). The writers turn these into bytes and decide nothing.
 */
import type { PointSummary } from '../../analysis/summary.ts';
import type { PipelineComparison } from '../../analysis/compare.ts';
import type { NoisePrediction } from '../../analysis/noise-prediction.ts';
import type { HistoryColumns } from '../../physics/history.ts';

/** One finished point, as summary, budget, comparisons and traces metadata read it. */
export interface PointRows {
  index: number;
  parameters: Record<string, number>;
  scenario: { states: readonly { name: string }[]; outcomes: readonly string[] };
  summaries: readonly PointSummary[];
  comparisons: readonly PipelineComparison[];
  /** Per pipeline: the predicted noise, source by source (null where none is predicted). */
  noise: readonly (NoisePrediction | null)[];
  /** Per pipeline: the calibration the shots were decided with. */
  calibrations: readonly {
    axis: { cos: number; sin: number };
    rule: { threshold: number; highIsOne: boolean };
    weights: Float64Array | null;
    bandHalfWidth: number;
    outcomeMeans: [number, number];
    model: unknown;
  }[];
  /** Scored record samples the digitizer clipped (present when the point has a digitizer). */
  clippedSamples?: number;
  compiled: { pipelines: readonly { spec: { name: string; classifier?: string }; referencePhase: number }[] };
}

/** A batch of shots, as shots.arrow and traces.arrow read it. */
export interface BatchRows extends HistoryColumns {
  point: number;
  batch: number;
  /** Index of the batch's first shot within its point and purpose. */
  firstShot: number;
  count: number;
  /** Per pipeline: integrated I and Q. */
  values: readonly { inPhase: Float64Array; quadrature: Float64Array }[];
  /** Every shot's record (raw) or its demodulated I/Q (baseband), row after row, when traces are kept. */
  traces?: { kind: 'raw' | 'baseband'; samples: number; data: Float32Array; quadrature: Float32Array | null };
}
