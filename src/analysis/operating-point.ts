/**
 * The operating-point answer of a sweep: per pipeline, the point of lowest simulated mean
 * error and the point of highest SNR, and whether they are the same point. Works on plain
 * rows, so the run and the report (which reads the tables) share it.
 */
import type { RateInterval } from './intervals.ts';

/** One sweep point of one pipeline, as the summary table holds it. */
export interface PointRow {
  point: number;
  pipeline: string;
  parameters: Record<string, number>;
  meanError: RateInterval;
  analyticMean: number;
  /** Simulated SNR (separation / σ). */
  snr: number;
}

/** A chosen point. */
export interface OperatingChoice {
  point: number;
  parameters: Record<string, number>;
  meanError: RateInterval;
  analyticMean: number;
  snr: number;
}

/** The answer for one pipeline. */
export interface PipelineOperatingPoint {
  pipeline: string;
  lowestError: OperatingChoice;
  /** null when no point has a finite SNR. */
  highestSnr: OperatingChoice | null;
  /** Whether the two choices are different points. */
  differ: boolean;
  /** Other points whose error interval overlaps the lowest one's: not distinguishable from it at these shot counts. */
  indistinguishable: number[];
}

function choice(r: PointRow): OperatingChoice {
  return { point: r.point, parameters: r.parameters, meanError: r.meanError, analyticMean: r.analyticMean, snr: r.snr };
}

/** Whether a has a lower error than b: simulated rate, then the analytic value, then the point index. */
export function lowerError(a: PointRow, b: PointRow): boolean {
  if (a.meanError.rate !== b.meanError.rate) return a.meanError.rate < b.meanError.rate;
  if (a.analyticMean !== b.analyticMean) return a.analyticMean < b.analyticMean;
  return a.point < b.point;
}

/** The operating points of every pipeline, in the order pipelines first appear in `rows`. */
export function operatingPoints(rows: readonly PointRow[]): PipelineOperatingPoint[] {
  const pipelines = [...new Set(rows.map((r) => r.pipeline))];
  return pipelines.map((pipeline) => {
    const mine = rows.filter((r) => r.pipeline === pipeline);
    let best = mine[0]!;
    for (const r of mine) if (lowerError(r, best)) best = r;
    let loud: PointRow | null = null;
    for (const r of mine) {
      if (!Number.isFinite(r.snr)) continue;
      if (loud === null || r.snr > loud.snr || (r.snr === loud.snr && r.point < loud.point)) loud = r;
    }
    const indistinguishable = mine
      .filter((r) => r.point !== best.point && r.meanError.low <= best.meanError.high)
      .map((r) => r.point);
    return {
      pipeline, lowestError: choice(best), highestSnr: loud ? choice(loud) : null,
      differ: loud !== null && loud.point !== best.point, indistinguishable,
    };
  });
}
