/**
 * summary.arrow: one row per sweep point and pipeline — swept values, error per state with
 * intervals, assignment matrix, mean error, SNR (simulated and analytic), threshold.
 */
import type { Table } from 'apache-arrow';
import type { PointResult } from '../../plan/run.ts';
import { buildTable, type ColumnSpec } from './columns.ts';

/** Plain rows, shared by the Arrow table and the JSON output. */
export function summaryColumns(points: readonly PointResult[], unit: string): ColumnSpec[] {
  const rows = points.flatMap((p) => p.summaries.map((s, i) => ({ p, s, cal: p.calibrations[i]! })));
  const first = points[0]!;
  const states = first.scenario.states.map((s) => s.name);
  const outcomes = first.scenario.outcomes;
  const sweptNames = Object.keys(first.parameters);
  const col = (name: string, kind: ColumnSpec['kind'], u: string | null, f: (r: (typeof rows)[number]) => ColumnSpec['values'][number]): ColumnSpec =>
    ({ name, kind, unit: u, values: rows.map(f) });
  return [
    col('point', 'u32', null, (r) => r.p.index),
    ...sweptNames.map((n) => col(n, 'f64', '', (r) => r.p.parameters[n] ?? null)),
    col('pipeline', 'str', null, (r) => r.s.pipeline),
    col('shots', 'u32', null, (r) => r.s.shots),
    col('mean_error', 'f64', '', (r) => r.s.meanError.rate),
    col('mean_error_low', 'f64', '', (r) => r.s.meanError.low),
    col('mean_error_high', 'f64', '', (r) => r.s.meanError.high),
    col('analytic_mean_error', 'f64', '', (r) => r.s.analyticMean),
    col('analytic_linear_sum', 'f64', '', (r) => r.s.analyticLinearSum),
    ...states.flatMap((st, k) => [
      col(`error_${st}`, 'f64', '', (r) => r.s.states[k]!.error.rate),
      col(`error_${st}_low`, 'f64', '', (r) => r.s.states[k]!.error.low),
      col(`error_${st}_high`, 'f64', '', (r) => r.s.states[k]!.error.high),
      col(`analytic_error_${st}`, 'f64', '', (r) => r.s.states[k]!.analyticTotal),
      ...outcomes.map((o, j) => col(`${st}_reported_${o}`, 'f64', '', (r) => r.s.states[k]!.assignment[j]!)),
    ]),
    col('snr', 'f64', '', (r) => r.s.snr),
    col('analytic_snr', 'f64', '', (r) => r.s.analyticSnr),
    col('sigma', 'f64', unit, (r) => r.s.sigma),
    col('analytic_sigma', 'f64', unit, (r) => r.s.analyticSigma),
    col('threshold', 'f64', unit, (r) => r.s.threshold),
    col('axis_angle', 'f64', 'rad', (r) => Math.atan2(r.cal.axis.sin, r.cal.axis.cos)),
    col('discard_fraction', 'f64', '', (r) => r.s.discardFraction),
    col('agreement', 'bool', null, (r) => r.s.agreement),
  ];
}

export function summaryTable(points: readonly PointResult[], unit: string, metadata: Map<string, string>): Table {
  return buildTable(summaryColumns(points, unit), metadata);
}
