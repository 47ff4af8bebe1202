/**
 * What the report requires of summary.arrow and budget.arrow before it draws anything: one row
 * per point and pipeline (every point of the scenario, every pipeline), one budget row per
 * point, pipeline, state and cause, probabilities in [0, 1], counts that are whole numbers with
 * errors ≤ shots, and finite numbers wherever the tables do not document a null (a state without
 * shots, σ and SNR without noise-only shots or without noise, a threshold at ±∞).
 */
import type { Table } from 'apache-arrow';
import { InputError } from '../../errors.ts';
import { checkRowCount, checkUniqueRows, checkValues, COUNT, numberColumn, PROBABILITY, type ValueRule } from '../table-checks.ts';

/** The run's shape as the scenario gives it. */
export interface RunShape {
  /** Points of the grid; a refined run adds up to `refined` more. */
  points: number;
  refined: number;
  pipelines: readonly string[];
  states: readonly string[];
  outcomes: readonly string[];
}

const NON_NEGATIVE: ValueRule = { min: 0, nullable: true };

/** Checks summary.arrow (see the file comment). */
export function checkSummaryTable(path: string, t: Table, s: RunShape): number {
  checkUniqueRows(path, t, ['point', 'pipeline']);
  checkValues(path, t, 'point', { ...COUNT, max: s.points + s.refined - 1 });
  const points = new Set(numberColumn(path, t, 'point')).size;
  if (points < s.points) throw new InputError(path, 'point', `every one of the scenario's ${s.points} point(s)`, `${points}`);
  checkRowCount(path, t, points * s.pipelines.length, `${points} point(s) × ${s.pipelines.length} pipeline(s)`);
  const names = Array.from(t.getChild('pipeline')!, String);
  names.forEach((n, row) => {
    if (!s.pipelines.includes(n)) throw new InputError(path, `pipeline[${row}]`, `one of the scenario's pipelines (${s.pipelines.join(', ')})`, JSON.stringify(n.slice(0, 40)));
  });
  checkValues(path, t, 'shots', COUNT);
  const probabilities = [
    'mean_error', 'mean_error_low', 'mean_error_high', 'analytic_mean_error',
    ...s.states.flatMap((st) => [`error_${st}`, `error_${st}_low`, `error_${st}_high`, `analytic_error_${st}`, ...s.outcomes.map((o) => `${st}_reported_${o}`)]),
  ];
  for (const c of probabilities) checkValues(path, t, c, PROBABILITY);
  for (const c of ['discard_fraction', 'post_selected_error', 'post_selected_error_low', 'post_selected_error_high', 'discards_as_failures_error']) {
    if (t.getChild(c)) checkValues(path, t, c, PROBABILITY);
  }
  for (const c of ['snr', 'analytic_snr', 'sigma', 'analytic_sigma']) if (t.getChild(c)) checkValues(path, t, c, NON_NEGATIVE);
  checkValues(path, t, 'threshold', { nullable: true });
  checkValues(path, t, 'axis_angle', { min: -Math.PI, max: Math.PI });
  // an interval holds its rate
  const [rate, low, high] = ['mean_error', 'mean_error_low', 'mean_error_high'].map((c) => numberColumn(path, t, c));
  rate!.forEach((r, row) => {
    if (r === null) return;
    if (low![row] === null || high![row] === null || !(low![row]! <= r && r <= high![row]!)) {
      throw new InputError(path, `mean_error[${row}]`, 'a rate inside its interval [mean_error_low, mean_error_high]', `${r} outside [${low![row]}, ${high![row]}]`);
    }
  });
  return points;
}

/** Checks budget.arrow against the summary's `points` points and the pipelines (see the file comment). */
export function checkBudgetTable(path: string, t: Table, s: RunShape, points: number): void {
  checkUniqueRows(path, t, ['point', 'pipeline', 'state', 'cause']);
  checkValues(path, t, 'point', { ...COUNT, max: points - 1 });
  for (const c of ['analytic', 'simulated', 'low', 'high']) checkValues(path, t, c, PROBABILITY);
  checkValues(path, t, 'errors', COUNT);
  checkValues(path, t, 'shots', COUNT);
  const errors = numberColumn(path, t, 'errors'), shots = numberColumn(path, t, 'shots');
  errors.forEach((e, row) => {
    if (e! > shots[row]!) throw new InputError(path, `errors[${row}]`, `at most the shots (${shots[row]})`, String(e));
  });
  const states = new Set([...s.states, 'all']);
  const point = numberColumn(path, t, 'point');
  const pipeline = Array.from(t.getChild('pipeline')!, String), state = Array.from(t.getChild('state')!, String);
  const totals = new Set<string>();
  const cause = Array.from(t.getChild('cause')!, String);
  for (let row = 0; row < t.numRows; row++) {
    if (!s.pipelines.includes(pipeline[row]!)) throw new InputError(path, `pipeline[${row}]`, `one of the scenario's pipelines (${s.pipelines.join(', ')})`, JSON.stringify(pipeline[row]!.slice(0, 40)));
    if (!states.has(state[row]!)) throw new InputError(path, `state[${row}]`, `a state of the scenario or "all"`, JSON.stringify(state[row]!.slice(0, 40)));
    if (cause[row] === 'total') totals.add(`${point[row]}/${pipeline[row]}/${state[row]}`);
  }
  const expected = points * s.pipelines.length * states.size;
  if (totals.size !== expected) throw new InputError(path, 'cause', `a "total" row for each point, pipeline and state (${expected})`, `${totals.size}`);
}
