/**
 * The units of what a run reports, for the terminal view and `--json`: the unit of each swept
 * value (from the sweep section), and the unit of each pipeline's decision statistic (its
 * threshold and σ): the scenario's signal unit, or '' for a dimensionless statistic.
 * Units are SI symbols as in the tables' field metadata ('' for plain numbers).
 */
import { classifierOf } from '../classify/registry.ts';
import type { PointResult } from '../run/point-result.ts';
import type { SweepSpec } from '../scenario/types.ts';

/** SI unit of every swept column (empty when nothing is swept). */
export function parameterUnits(sweep: SweepSpec | undefined): Record<string, string> {
  return Object.fromEntries((sweep?.axes ?? []).map((a) => [a.column, a.unit]));
}

/** Unit of the statistic pipeline `i` decides on at a point: the signal unit, or '' (e.g. a log-odds). */
export function statisticUnit(point: Pick<PointResult, 'scenario'>, i: number): string {
  const spec = point.scenario.pipelines[i];
  if (spec && !classifierOf(spec).signalUnitStatistic) return '';
  return point.scenario.signal.unit;
}

/** How a swept value is named in the terminal: its key path when the sweep is known, else its column. */
export function sweptName(sweep: SweepSpec | undefined, column: string): string {
  return sweep?.axes.find((a) => a.column === column)?.key ?? column;
}
