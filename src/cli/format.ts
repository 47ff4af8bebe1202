/**
 * The readable terminal view of a run: per point and pipeline, the error of each state with
 * its interval beside the analytic budget, then the causes.
 */
import type { RunResult } from '../run/run-points.ts';

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

function rows(table: string[][]): string {
  const widths = table[0]!.map((_, j) => Math.max(...table.map((r) => r[j]!.length)));
  return table.map((r) => r.map((c, j) => pad(c, widths[j]!)).join('  ').trimEnd()).join('\n');
}

export function formatResult(result: RunResult): string {
  const out: string[] = [];
  for (const p of result.points) {
    const params = Object.entries(p.parameters).map(([k, v]) => `${k} = ${v}`).join(', ');
    for (const s of p.summaries) {
      out.push(`point ${p.index}${params ? ` (${params})` : ''}, pipeline "${s.pipeline}": ${s.shots} shots`);
      out.push(`  SNR (separation/σ of the integrated value): simulated ${s.snr.toFixed(2)}, analytic ${Number.isNaN(s.analyticSnr) ? '— (no analytic model for this classifier)' : s.analyticSnr.toFixed(2)}; threshold ${s.threshold.toPrecision(4)}`);
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
    }
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
  out.push(`engine: ${result.engine} (${result.engineReason})`);
  out.push('Simulated fidelities are no substitute for measured ones; a quoted SPAM figure must come from full thresholded statistics, with any post-selection reported.');
  return out.join('\n');
}
