/**
 * The terminal view of the operating-point answer: where the error is lowest, where the SNR
 * is highest, whether they differ, and what refinement found.
 */
import type { PipelineOperatingPoint } from '../analysis/operating-point.ts';
import type { RefineOutcome } from '../app/refine-run.ts';
import type { SweepSpec } from '../scenario/types.ts';
import { formatQuantity } from '../scenario/units.ts';
import { formatProbability } from './format.ts';

function where(sweep: SweepSpec, parameters: Record<string, number>): string {
  return sweep.axes.map((a) => `${a.key} = ${formatQuantity(parameters[a.column]!, a.unit)}`).join(', ');
}

/** Lines of text for the operating point of every pipeline (empty when nothing is swept). */
export function formatOperatingPoints(ops: readonly PipelineOperatingPoint[], sweep: SweepSpec | undefined, refinement?: RefineOutcome): string {
  if (!sweep) return '';
  const out: string[] = ['operating point:'];
  for (const o of ops) {
    const e = o.lowestError.meanError;
    out.push(`  pipeline "${o.pipeline}": lowest mean error ${formatProbability(e.rate)} [${formatProbability(e.low)}, ${formatProbability(e.high)}] at point ${o.lowestError.point} (${where(sweep, o.lowestError.parameters)})`);
    if (o.highestSnr) {
      out.push(`  pipeline "${o.pipeline}": highest SNR ${o.highestSnr.snr.toFixed(2)} at point ${o.highestSnr.point} (${where(sweep, o.highestSnr.parameters)}), mean error there ${formatProbability(o.highestSnr.meanError.rate)}`);
    }
    out.push(o.differ ? '  they differ: choosing by SNR alone would not minimise the error' : '  the same point gives both');
    if (o.indistinguishable.length > 0) out.push(`  ${o.indistinguishable.length} other point(s) have overlapping error intervals: ${o.indistinguishable.slice(0, 10).join(', ')}${o.indistinguishable.length > 10 ? ', …' : ''}`);
  }
  if (refinement) {
    const a = sweep.axes.find((x) => x.key === refinement.key)!;
    const b = refinement.best;
    out.push(`  refined along ${refinement.key} with ${refinement.evaluations.length} golden-section points in [${formatQuantity(refinement.interval[0], a.unit)}, ${formatQuantity(refinement.interval[1], a.unit)}]: best ${formatQuantity(b.value, a.unit)} (point ${b.point}), mean error ${formatProbability(b.meanError.rate)} [${formatProbability(b.meanError.low)}, ${formatProbability(b.meanError.high)}]`);
    if (refinement.atEdge) out.push('  note: the grid optimum sits at an end of the swept range; the minimum may lie outside it');
  }
  return out.join('\n');
}
