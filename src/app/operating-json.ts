/**
 * The operating-point answer of a run as plain data: the `operatingPoint` object of
 * `singleshot run --json`, also used by the terminal view.
 */
import { operatingPoints, type OperatingChoice, type PipelineOperatingPoint, type PointRow } from '../analysis/operating-point.ts';
import type { RunResult } from '../run/run-points.ts';
import type { SweepSpec } from '../scenario/types.ts';
import type { RefineOutcome } from './refine-run.ts';
import { parameterUnits } from './result-units.ts';

/** The rows of the run's grid points (refinement points excluded). */
export function gridRows(result: RunResult, gridPoints: number): PointRow[] {
  return result.points.filter((p) => p.index < gridPoints).flatMap((p) => p.summaries.map((s) => ({
    point: p.index, pipeline: s.pipeline, parameters: p.parameters, meanError: s.meanError, analyticMean: s.analyticMean, snr: s.snr,
  })));
}

/** The operating points of a finished run. */
export function runOperatingPoints(result: RunResult, refinement?: RefineOutcome): PipelineOperatingPoint[] {
  return operatingPoints(gridRows(result, result.points.length - (refinement?.evaluations.length ?? 0)));
}

const interval = (r: { rate: number; low: number; high: number }) => ({ rate: r.rate, low: r.low, high: r.high });

function choice(c: OperatingChoice | null, units: Record<string, string>) {
  if (!c) return null;
  const parameterUnits = Object.fromEntries(Object.keys(c.parameters).map((k) => [k, units[k] ?? null]));
  return { point: c.point, parameters: c.parameters, parameterUnits, meanError: interval(c.meanError), analyticMeanError: c.analyticMean, snr: c.snr };
}

/** JSON-ready `operatingPoint` object; swept values carry their units as in resultToJson (`parameterUnits`, `<field>Unit`). */
export function operatingPointJson(result: RunResult, sweep: SweepSpec | undefined, refinement?: RefineOutcome): Record<string, unknown> {
  const units = parameterUnits(sweep);
  const unit = refinement ? units[refinement.column] ?? null : null;
  return {
    swept: (sweep?.axes ?? []).map((a) => ({ key: a.key, column: a.column, unit: a.unit })),
    note: 'lowestError: the grid point of lowest simulated mean error; highestSnr: of highest simulated SNR (separation / σ); indistinguishable: points whose 95 % error interval overlaps the lowest one',
    pipelines: runOperatingPoints(result, refinement).map((o) => ({
      pipeline: o.pipeline, lowestError: choice(o.lowestError, units), highestSnr: choice(o.highestSnr, units), differ: o.differ,
      indistinguishable: o.indistinguishable,
    })),
    refined: refinement ? {
      pipeline: refinement.pipeline, key: refinement.key, column: refinement.column, interval: refinement.interval, intervalUnit: unit,
      bracket: refinement.bracket, bracketUnit: unit, atEdge: refinement.atEdge,
      points: refinement.evaluations.map((e) => ({ point: e.point, value: e.value, valueUnit: unit, meanError: interval(e.meanError) })),
      best: { point: refinement.best.point, value: refinement.best.value, valueUnit: unit, meanError: interval(refinement.best.meanError) },
    } : null,
  };
}
