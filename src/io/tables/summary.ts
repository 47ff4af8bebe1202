/**
 * summary.arrow: one row per sweep point and pipeline — swept values, error per state with
 * intervals, assignment matrix, mean error, SNR (simulated and analytic), the centre and spread
 * of the integrated value per outcome, threshold.
 */
import type { Table } from 'apache-arrow';
import { buildTable, type ColumnSpec } from './columns.ts';
import type { PointRows } from './inputs.ts';

/** Plain rows, shared by the Arrow table and the JSON output. */
export function summaryColumns(points: readonly PointRows[], unit: string, sweptUnits: Readonly<Record<string, string>> = {}): ColumnSpec[] {
  const rows = points.flatMap((p) => p.summaries.map((s, i) => ({ p, s, cal: p.calibrations[i]!, noise: p.noise[i] ?? null })));
  // noise budget columns: one σ and one share per source (noise/sensor helper)
  const sources = [...new Set(rows.flatMap((r) => r.noise?.sources.map((x) => x.name) ?? []))];
  const source = (r: (typeof rows)[number], name: string) => r.noise?.sources.find((x) => x.name === name);
  const first = points[0]!;
  const states = first.scenario.states.map((s) => s.name);
  const outcomes = first.scenario.outcomes;
  const sweptNames = Object.keys(first.parameters);
  const col = (name: string, kind: ColumnSpec['kind'], u: string | null, f: (r: (typeof rows)[number]) => ColumnSpec['values'][number]): ColumnSpec =>
    ({ name, kind, unit: u, values: rows.map(f) });
  return [
    col('point', 'u32', null, (r) => r.p.index),
    ...sweptNames.map((n) => col(n, 'f64', sweptUnits[n] ?? '', (r) => r.p.parameters[n] ?? null)),
    col('pipeline', 'str', null, (r) => r.s.pipeline),
    col('shots', 'u32', null, (r) => r.s.shots),
    col('mean_error', 'f64', '', (r) => r.s.meanError.rate),
    col('mean_error_low', 'f64', '', (r) => r.s.meanError.low),
    col('mean_error_high', 'f64', '', (r) => r.s.meanError.high),
    col('analytic_mean_error', 'f64', '', (r) => r.s.analyticMean),
    col('visibility', 'f64', '', (r) => r.s.visibility.value),
    col('visibility_low', 'f64', '', (r) => r.s.visibility.low),
    col('visibility_high', 'f64', '', (r) => r.s.visibility.high),
    col('analytic_visibility', 'f64', '', (r) => r.s.analyticVisibility),
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
    ...outcomes.flatMap((o, j) => [
      col(`value_mean_${o}`, 'f64', unit, (r) => r.s.outcomeValues[j]?.mean ?? null),
      col(`value_sigma_${o}`, 'f64', unit, (r) => r.s.outcomeValues[j]?.sigma ?? null),
    ]),
    col('predicted_sigma', 'f64', unit, (r) => r.noise?.sigma ?? null),
    ...sources.flatMap((n) => [
      col(`predicted_sigma_${n}`, 'f64', unit, (r) => source(r, n)?.sigma ?? null),
      col(`noise_share_${n}`, 'f64', '', (r) => source(r, n)?.share ?? null),
    ]),
    col('clipped_samples', 'f64', '', (r) => r.p.clippedSamples ?? null),
    col('threshold', 'f64', unit, (r) => r.s.threshold),
    col('axis_angle', 'f64', 'rad', (r) => Math.atan2(r.cal.axis.sin, r.cal.axis.cos)),
    col('discard_fraction', 'f64', '', (r) => r.s.discardFraction),
    col('post_selected_error', 'f64', '', (r) => r.s.postSelectedError.rate),
    col('post_selected_error_low', 'f64', '', (r) => r.s.postSelectedError.low),
    col('post_selected_error_high', 'f64', '', (r) => r.s.postSelectedError.high),
    col('discards_as_failures_error', 'f64', '', (r) => r.s.discardsAsFailuresError.rate),
    col('discards_as_failures_error_low', 'f64', '', (r) => r.s.discardsAsFailuresError.low),
    col('discards_as_failures_error_high', 'f64', '', (r) => r.s.discardsAsFailuresError.high),
    // no analytic model (a classifier without a closed form, or recorded traces): nothing to agree with
    col('agreement', 'bool', null, (r) => (Number.isNaN(r.s.analyticMean) ? null : r.s.agreement)),
  ];
}

export function summaryTable(points: readonly PointRows[], unit: string, metadata: Map<string, string>, sweptUnits: Readonly<Record<string, string>> = {}): Table {
  return buildTable(summaryColumns(points, unit, sweptUnits), metadata);
}
