/**
 * comparisons.arrow: one row per sweep point and pair of pipelines (a listed before b): the
 * paired counts on the same scored shots, both error rates, the difference errorA − errorB
 * with its interval (Newcombe 1998, method 10) and the exact McNemar p-value (McNemar 1947).
 * Written only when a point has two or more pipelines.
 */
import type { Table } from 'apache-arrow';
import { buildTable, type ColumnSpec } from './columns.ts';
import type { PointRows } from './inputs.ts';

/** Plain columns of the comparisons table. */
export function comparisonColumns(points: readonly PointRows[]): ColumnSpec[] {
  const rows = points.flatMap((p) => p.comparisons.map((c) => ({ p, c })));
  const sweptNames = Object.keys(points[0]?.parameters ?? {});
  const col = (name: string, kind: ColumnSpec['kind'], unit: string | null, f: (r: (typeof rows)[number]) => ColumnSpec['values'][number]): ColumnSpec =>
    ({ name, kind, unit, values: rows.map(f) });
  return [
    col('point', 'u32', null, (r) => r.p.index),
    ...sweptNames.map((n) => col(n, 'f64', '', (r) => r.p.parameters[n] ?? null)),
    col('pipeline_a', 'str', null, (r) => r.c.a),
    col('pipeline_b', 'str', null, (r) => r.c.b),
    col('shots', 'u32', null, (r) => r.c.shots),
    col('both_wrong', 'u32', null, (r) => r.c.bothWrong),
    col('only_a_wrong', 'u32', null, (r) => r.c.onlyAWrong),
    col('only_b_wrong', 'u32', null, (r) => r.c.onlyBWrong),
    col('error_a', 'f64', '', (r) => r.c.errorA),
    col('error_b', 'f64', '', (r) => r.c.errorB),
    col('difference', 'f64', '', (r) => r.c.difference),
    col('difference_low', 'f64', '', (r) => r.c.low),
    col('difference_high', 'f64', '', (r) => r.c.high),
    col('confidence', 'f64', '', (r) => r.c.confidence),
    col('mcnemar_p', 'f64', '', (r) => r.c.pValue),
  ];
}

/** The comparisons table with `metadata` in its schema. */
export function comparisonsTable(points: readonly PointRows[], metadata: Map<string, string>): Table {
  return buildTable(comparisonColumns(points), metadata);
}
