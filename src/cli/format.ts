/**
 * The readable terminal view of a run: per point and pipeline, the error of each state with
 * its interval beside the analytic budget, then the causes; a run of several points prints one
 * line per point and pipeline instead (`formatSweepTable`) unless asked for every point in full. Every quantity
 * carries its unit with an SI prefix (formatQuantity).
 */
import type { RunResult } from '../run/run-points.ts';
import type { PointResult } from '../run/point-result.ts';
import type { SweepSpec } from '../scenario/types.ts';
import { formatQuantity } from '../scenario/units.ts';
import { parameterUnits, statisticUnit, sweptName } from '../app/result-units.ts';

/** A probability in a fixed width: 3 significant digits in exponent form. */
export function formatProbability(p: number): string {
  if (!Number.isFinite(p)) return '—';
  if (p === 0) return '0';
  return p.toExponential(2);
}

/** A signed difference of rates, 3 significant digits. */
function formatDifference(d: number): string {
  if (!Number.isFinite(d)) return '—';
  if (d === 0) return '0';
  return (d > 0 ? '+' : '') + d.toExponential(2);
}

function pad(s: string, n: number): string {
  return s.length >= n ? s : s + ' '.repeat(n - s.length);
}

/** Columns padded to their widest cell, two spaces apart. */
export function rows(table: string[][]): string {
  const widths = table[0]!.map((_, j) => Math.max(...table.map((r) => r[j]!.length)));
  return table.map((r) => r.map((c, j) => pad(c, widths[j]!)).join('  ').trimEnd()).join('\n');
}

/** How the terminal view is laid out. */
export interface FormatOptions {
  /** The scenario's sweep section: swept values are named by key path and shown with their units. */
  sweep?: SweepSpec;
  /** Every point in full; otherwise a run of several points prints one line per point and pipeline. */
  verbose?: boolean;
}

/** "key = value unit, …" for a point's swept values ('' when nothing is swept). */
export function describePoint(p: Pick<PointResult, 'parameters'>, sweep: SweepSpec | undefined): string {
  const units = parameterUnits(sweep);
  return Object.entries(p.parameters).map(([k, v]) => `${sweptName(sweep, k)} = ${k in units ? formatQuantity(v, units[k]!) : String(v)}`).join(', ');
}

/** A quantity of the decision statistic with its unit ('' for a dimensionless statistic); "—" when there is none. */
function statistic(x: number, unit: string): string {
  return Number.isNaN(x) ? '—' : formatQuantity(x, unit);
}

function formatPoint(p: PointResult, sweep: SweepSpec | undefined, out: string[]): void {
  const params = describePoint(p, sweep);
  p.summaries.forEach((s, i) => {
    const unit = statisticUnit(p, i);
    out.push(`point ${p.index}${params ? ` (${params})` : ''}, pipeline "${s.pipeline}": ${s.shots} shots`);
    out.push(`  SNR (separation/σ of the integrated value): simulated ${s.snr.toFixed(2)}, analytic ${Number.isNaN(s.analyticSnr) ? '— (no analytic model for this classifier)' : s.analyticSnr.toFixed(2)}`);
    out.push(`  σ: simulated ${statistic(s.sigma, unit)}, analytic ${statistic(s.analyticSigma, unit)}; threshold ${statistic(s.threshold, unit)}`);
    const table: string[][] = [['  state', 'shots', 'error', '95% interval', 'analytic', 'linear sum', 'agrees']];
    for (const st of s.states) {
      table.push([`  ${st.state}`, String(st.shots), formatProbability(st.error.rate),
        `[${formatProbability(st.error.low)}, ${formatProbability(st.error.high)}]`,
        formatProbability(st.analyticTotal), formatProbability(st.linearSum), st.agrees ? 'yes' : 'NO']);
    }
    table.push(['  mean', String(s.shots), formatProbability(s.meanError.rate),
      `[${formatProbability(s.meanError.low)}, ${formatProbability(s.meanError.high)}]`,
      formatProbability(s.analyticMean), formatProbability(s.analyticLinearSum), s.agreement ? 'yes' : 'NO']);
    out.push(rows(table));
    const v = s.visibility;
    out.push(`  visibility 1 − P(0|1) − P(1|0): ${v.value.toFixed(4)} [${v.low.toFixed(4)}, ${v.high.toFixed(4)}] (95%), analytic ${Number.isNaN(s.analyticVisibility) ? '—' : s.analyticVisibility.toFixed(4)}`);
    const causes: string[][] = [['  cause', 'wrong shots', 'simulated', 'analytic', 'agrees']];
    for (const c of s.meanCauses) {
      if (c.errors === 0 && !(c.analytic >= 1e-12)) continue;
      causes.push([`  ${c.cause}`, String(c.errors), formatProbability(c.simulated.rate), formatProbability(c.analytic), c.agrees ? 'yes' : 'NO']);
    }
    if (causes.length > 1) out.push(rows(causes));
    if (s.banded) {
      out.push(`  ambiguous band: ${s.discarded} shots discarded (${formatProbability(s.discardFraction)}); error of the kept shots ${formatProbability(s.postSelectedError.rate)} [${formatProbability(s.postSelectedError.low)}, ${formatProbability(s.postSelectedError.high)}], counting discards as failures ${formatProbability(s.discardsAsFailuresError.rate)} [${formatProbability(s.discardsAsFailuresError.low)}, ${formatProbability(s.discardsAsFailuresError.high)}]`);
      out.push('  (the error, budget and comparisons above are of the plain decision, without discards)');
    }
    if (!s.agreement) out.push('  note: the simulation and the analytic budget disagree beyond the 99.9 % interval — the budget misses a cause or an approximation fails here.');
    out.push('');
  });
  if (p.comparisons.length > 0) {
    out.push(`point ${p.index}: pipelines compared on the same shots (difference = error A − error B, 95% interval, exact McNemar p)`);
    const table: string[][] = [['  A', 'B', 'error A', 'error B', 'difference', '95% interval', 'only A wrong', 'only B wrong', 'McNemar p']];
    for (const c of p.comparisons) {
      table.push([`  ${c.a}`, c.b, formatProbability(c.errorA), formatProbability(c.errorB), formatDifference(c.difference),
        `[${formatDifference(c.low)}, ${formatDifference(c.high)}]`, String(c.onlyAWrong), String(c.onlyBWrong), c.pValue.toPrecision(2)]);
    }
    out.push(rows(table));
    out.push('');
  }
}

/** The lines of the one-line-per-point table (no trailing empty line). */
function formatSweepTable(result: RunResult, sweep: SweepSpec | undefined): string[] {
  const points = result.points;
  const columns = Object.keys(points[0]?.parameters ?? {});
  const units = parameterUnits(sweep);
  const pipelines = new Set(points.flatMap((p) => p.summaries.map((s) => s.pipeline)));
  const shots = new Set(points.flatMap((p) => p.summaries.map((s) => s.shots)));
  const gridPoints = sweep ? points.filter((p) => columns.every((c) => sweep.axes.find((a) => a.column === c)?.values.includes(p.parameters[c]!) ?? true)).length : points.length;
  const many = pipelines.size > 1;
  const table: string[][] = [[
    'point', ...(many ? ['pipeline'] : []), ...columns.map((c) => sweptName(sweep, c)), ...(shots.size > 1 ? ['shots'] : []),
    'mean error', '95% interval', 'analytic', 'SNR', 'analytic SNR', 'threshold', 'agrees',
  ]];
  for (const p of points) {
    p.summaries.forEach((s, i) => {
      const unit = statisticUnit(p, i);
      table.push([
        String(p.index), ...(many ? [s.pipeline] : []),
        ...columns.map((c) => (c in units ? formatQuantity(p.parameters[c]!, units[c]!) : String(p.parameters[c]))),
        ...(shots.size > 1 ? [String(s.shots)] : []),
        formatProbability(s.meanError.rate), `[${formatProbability(s.meanError.low)}, ${formatProbability(s.meanError.high)}]`,
        formatProbability(s.analyticMean), s.snr.toFixed(2), Number.isNaN(s.analyticSnr) ? '—' : s.analyticSnr.toFixed(2),
        formatQuantity(s.threshold, unit), s.agreement ? 'yes' : 'NO',
      ]);
    });
  }
  const rowCount = table.length - 1;
  const refined = points.length - gridPoints;
  const out = [
    `${points.length} points${refined > 0 ? ` (${refined} of them refinement points)` : ''} × ${pipelines.size} pipeline${many ? 's' : ''}${shots.size === 1 ? `, ${[...shots][0]} shots each` : ''}: one line per point${many ? ' and pipeline' : ''} (--verbose prints every point in full: errors per state, causes${points.some((p) => p.comparisons.length > 0) ? ', pipeline comparisons' : ''})`,
    rows(table),
  ];
  const disagree = points.flatMap((p) => p.summaries.filter((s) => !s.agreement)).length;
  if (disagree > 0) out.push(`note: at ${disagree} of ${rowCount} lines the simulation and the analytic budget disagree beyond the 99.9 % interval (agrees: NO) — see --verbose for the cause.`);
  if (points.some((p) => p.summaries.some((s) => s.banded))) out.push('note: errors are of the plain decision; the discards of the ambiguous band are in --verbose and summary.arrow.');
  return out;
}

/** The terminal text of a run (see FormatOptions). */
export function formatResult(result: RunResult, options: FormatOptions = {}): string {
  const out: string[] = [];
  if (result.points.length > 1 && !options.verbose) out.push(...formatSweepTable(result, options.sweep), '');
  else for (const p of result.points) formatPoint(p, options.sweep, out);
  out.push(`engine: ${result.engine} (${result.engineReason})`);
  out.push('Simulated fidelities are no substitute for measured ones; a quoted SPAM figure must come from full thresholded statistics, with any post-selection reported.');
  return out.join('\n');
}
