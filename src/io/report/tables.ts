/**
 * The report's tables (causes at the operating point, every point) and the refinement card,
 * built from the rows of the run's tables.
 */
import type { SweepAxis, SweepSpec } from '../../scenario/types.ts';
import { probability, short, showValue } from './display.ts';
import type { Card, TableView } from './page.ts';
import type { BudgetRow, SummaryRow } from './read-run.ts';

const ORDER = ['noise', 'relaxation', 'excitation', 'leakage', 'preparation', 'mapping'];

function causeRank(c: string): number {
  const i = ORDER.indexOf(c);
  return c === 'total' ? 1000 : i >= 0 ? i : 500;
}

/** Causes at one point and pipeline, per prepared state and for the mean ("all"). */
export function causeTable(budget: readonly BudgetRow[], point: number, pipeline: string): TableView {
  const mine = budget.filter((b) => b.point === point && b.pipeline === pipeline);
  const states = [...new Set(mine.map((b) => b.state))].sort((a, b) => Number(a === 'all') - Number(b === 'all'));
  const rows: string[][] = [];
  const marked: number[] = [];
  for (const st of states) {
    const here = mine.filter((b) => b.state === st && (b.errors > 0 || b.analytic > 1e-12 || b.cause === 'total'))
      .sort((a, b) => causeRank(a.cause) - causeRank(b.cause));
    for (const b of here) {
      if (b.cause === 'total') marked.push(rows.length);
      rows.push([
        st === 'all' ? 'mean over states' : st, b.cause, String(b.errors), String(b.shots), probability(b.simulated.rate),
        `[${probability(b.simulated.low)}, ${probability(b.simulated.high)}]`, probability(b.analytic), b.agrees ? 'yes' : 'NO',
      ]);
    }
  }
  return { header: ['prepared state', 'cause', 'wrong shots', 'shots', 'simulated', '95 % interval', 'analytic', 'agrees'], rows, marked, textColumns: 2 };
}

/** A fraction of shots: four decimals, or three significant digits in exponent form below 1 %. */
function fraction(x: number): string {
  if (!Number.isFinite(x)) return '—';
  return x === 0 || x >= 0.01 ? x.toFixed(4) : probability(x);
}

/**
 * The assignment matrix at one point: one row per prepared state, one column per reported
 * outcome, each cell the fraction of that state's scored shots reported as that outcome.
 */
export function assignmentTable(states: readonly string[], outcomes: readonly string[], correct: readonly number[], matrix: readonly (readonly number[])[]): TableView {
  return {
    header: ['prepared state', 'correct outcome', ...outcomes.map((o) => `reported "${o}"`)],
    rows: states.map((st, s) => [st, `"${outcomes[correct[s]!] ?? '?'}"`, ...outcomes.map((_, o) => fraction(matrix[s]?.[o] ?? NaN))]),
    textColumns: 2,
  };
}

/** Most rows shown in the table of every point. */
export const MAX_POINT_ROWS = 400;

/** One row per point and pipeline: swept values, errors, SNR. */
export function pointsTable(
  summary: readonly SummaryRow[], axes: readonly SweepAxis[], gridPoints: number, mark: readonly number[], markPipeline: string,
): TableView {
  const shown = summary.slice(0, MAX_POINT_ROWS);
  const manyPipelines = new Set(summary.map((r) => r.pipeline)).size > 1;
  const sameShots = new Set(summary.map((r) => r.shots)).size === 1;
  const rows = shown.map((r) => [
    `${r.point}${r.point >= gridPoints ? ' (refinement)' : ''}`,
    ...(manyPipelines ? [r.pipeline] : []),
    ...axes.map((a) => showValue(r.parameters[a.column]!, a.unit)),
    ...(sameShots ? [] : [String(r.shots)]),
    probability(r.meanError.rate), `[${probability(r.meanError.low)}, ${probability(r.meanError.high)}]`, probability(r.analyticMean),
    `${short(r.snr, 3)} / ${short(r.analyticSnr, 3)}`, r.agreement ? 'yes' : 'NO',
  ]);
  if (summary.length > MAX_POINT_ROWS) rows.push([`… ${summary.length - MAX_POINT_ROWS} more rows in summary.arrow`]);
  const marked = shown.flatMap((r, i) => (r.pipeline === markPipeline && mark.includes(r.point) ? [i] : []));
  return {
    header: [
      'point', ...(manyPipelines ? ['pipeline'] : []), ...axes.map((a) => a.key), ...(sameShots ? [] : ['shots']),
      'mean error', '95 % interval', 'analytic', 'SNR / analytic', 'agrees',
    ],
    rows, marked, textColumns: manyPipelines ? 2 : 1,
  };
}

/**
 * The refinement seen in the tables: points beyond the grid, all on one line through the
 * grid optimum; the card gives the best point along that line. Null when there are none.
 */
export function refinementOf(spec: SweepSpec, rows: readonly SummaryRow[], gridPoints: number): { card: Card } | null {
  const extra = rows.filter((r) => r.point >= gridPoints);
  if (extra.length === 0) return null;
  const axis = spec.axes.findIndex((a) => !a.values.includes(extra[0]!.parameters[a.column]!));
  if (axis < 0) return null;
  const a = spec.axes[axis]!;
  const held = spec.axes.filter((_, i) => i !== axis);
  const line = rows.filter((r) => held.every((h) => r.parameters[h.column] === extra[0]!.parameters[h.column]));
  let best = line[0]!;
  for (const r of line) if (r.meanError.rate < best.meanError.rate) best = r;
  const xs = extra.map((r) => r.parameters[a.column]!);
  return {
    card: {
      label: `Refined along ${a.key}`, value: showValue(best.parameters[a.column]!, a.unit),
      detail: [
        `mean error ${probability(best.meanError.rate)}, 95 % interval [${probability(best.meanError.low)}, ${probability(best.meanError.high)}]`,
        `${extra.length} golden-section points between ${showValue(Math.min(...xs), a.unit)} and ${showValue(Math.max(...xs), a.unit)}`,
        `point ${best.point}${best.point >= gridPoints ? ' (a refinement point)' : ' (a grid point: refinement found nothing lower)'}`,
      ],
    },
  };
}
