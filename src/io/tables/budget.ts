/**
 * budget.arrow: one row per sweep point, pipeline, intended state (or "all", the mixture) and
 * cause (plus "total"): the analytic probability of being wrong for that cause, the simulated
 * rate with its 95 % interval, the 99.9 % interval used for agreement, and the verdict.
 */
import type { Table } from 'apache-arrow';
import type { CauseComparison } from '../../analysis/summary.ts';
import { buildTable, type ColumnSpec } from './columns.ts';
import type { PointRows } from './inputs.ts';

interface BudgetRow {
  point: PointRows;
  pipeline: string;
  state: string;
  shots: number;
  c: CauseComparison;
}

function rowsOf(points: readonly PointRows[]): BudgetRow[] {
  const rows: BudgetRow[] = [];
  for (const point of points) {
    for (const s of point.summaries) {
      for (const st of s.states) {
        for (const c of st.causes) rows.push({ point, pipeline: s.pipeline, state: st.state, shots: st.shots, c });
        rows.push({ point, pipeline: s.pipeline, state: st.state, shots: st.shots, c: totalOf(st.errors, st.shots, st.error, st.analyticTotal, st.linearSum, st.agrees) });
      }
      for (const c of s.meanCauses) rows.push({ point, pipeline: s.pipeline, state: 'all', shots: s.shots, c });
      rows.push({ point, pipeline: s.pipeline, state: 'all', shots: s.shots, c: totalOf(s.meanErrors, s.shots, s.meanError, s.analyticMean, s.analyticLinearSum, s.agreement) });
    }
  }
  return rows;
}

function totalOf(errors: number, shots: number, simulated: CauseComparison['simulated'], analytic: number, linear: number, agrees: boolean): CauseComparison {
  return { cause: 'total', errors, analytic, alone: linear, simulated, wide: simulated, agrees };
}

export function budgetColumns(points: readonly PointRows[], sweptUnits: Readonly<Record<string, string>> = {}): ColumnSpec[] {
  const rows = rowsOf(points);
  const swept = Object.keys(points[0]!.parameters);
  const col = (name: string, kind: ColumnSpec['kind'], unit: string | null, f: (r: BudgetRow) => ColumnSpec['values'][number]): ColumnSpec =>
    ({ name, kind, unit, values: rows.map(f) });
  return [
    col('point', 'u32', null, (r) => r.point.index),
    ...swept.map((n) => col(n, 'f64', sweptUnits[n] ?? '', (r) => r.point.parameters[n] ?? null)),
    col('pipeline', 'str', null, (r) => r.pipeline),
    col('state', 'str', null, (r) => r.state),
    col('cause', 'str', null, (r) => r.c.cause),
    col('analytic', 'f64', '', (r) => r.c.analytic),
    col('analytic_alone', 'f64', '', (r) => r.c.alone),
    col('simulated', 'f64', '', (r) => r.c.simulated.rate),
    col('low', 'f64', '', (r) => r.c.simulated.low),
    col('high', 'f64', '', (r) => r.c.simulated.high),
    col('errors', 'u32', null, (r) => r.c.errors),
    col('shots', 'u32', null, (r) => r.shots),
    col('agrees', 'bool', null, (r) => r.c.agrees),
  ];
}

export function budgetTable(points: readonly PointRows[], metadata: Map<string, string>, sweptUnits: Readonly<Record<string, string>> = {}): Table {
  return buildTable(budgetColumns(points, sweptUnits), metadata);
}
