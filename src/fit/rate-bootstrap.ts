/**
 * Standard errors of the transition rates by a bootstrap over groups of records (estimate.ts):
 * each resample draws the groups with replacement, learns the model again by Baum–Welch starting
 * from the full fit (a rate dropped by its test stays at zero), and converts its step matrix to
 * rates. The spread of the resampled rates is the standard error.
 */
import type { CalibrationRecords } from '../classify/calibrate-records.ts';
import { learnHmm } from '../classify/hmm-learning.ts';
import type { RandomStream } from '../random/stream.ts';
import { drawGroupCounts, spread, type RecordGroups } from './estimate.ts';
import { ratesFromStep } from './rates.ts';
import type { TwoLevelModel } from './two-level.ts';

/** Baum–Welch iterations per resample, from the full fit (it starts near the answer). */
const RESAMPLE_ITERATIONS = 40;

/** Standard errors of the rates up (0 → 1) and down (1 → 0); `kept` says which rates the model has. */
export function rateStandardErrors(
  model: TwoLevelModel, groups: RecordGroups, stream: RandomStream, resamples: number, binDuration: number, kept: { up: boolean; down: boolean },
): { up: number; down: number } {
  if (!kept.up && !kept.down) return { up: NaN, down: NaN };
  const r = model.records, m = r.bins, l = model.learned;
  const members: number[][] = Array.from({ length: groups.count }, () => []);
  for (let i = 0; i < r.count; i++) members[groups.of[i]!]!.push(i);
  const counts = new Float64Array(groups.count);
  const ups = new Float64Array(resamples), downs = new Float64Array(resamples);
  const start = Float64Array.from(l.transition);
  if (!kept.up) { start[1] = 0; start[0] = 1; }
  if (!kept.down) { start[2] = 0; start[3] = 1; }
  for (let b = 0; b < resamples; b++) {
    drawGroupCounts(stream, counts);
    const chosen: number[] = [];
    counts.forEach((c, g) => { for (let j = 0; j < c; j++) chosen.push(...members[g]!); });
    const resampled: CalibrationRecords = {
      bins: m, count: chosen.length, projected: new Float64Array(chosen.length * m), outcome: new Uint8Array(chosen.length), cleanState: new Uint8Array(chosen.length).fill(255),
    };
    chosen.forEach((i, j) => {
      resampled.projected.set(r.projected.subarray(i * m, (i + 1) * m), j * m);
      resampled.outcome[j] = r.outcome[i]!;
    });
    const again = learnHmm(resampled, {
      shapes: [new Float64Array(m), new Float64Array(m)], offsets: l.offsets, sigma: l.sigma, transition: start,
      priorsByLabel: l.priorsByLabel, learnTransitions: true, learnPriors: true, iterations: RESAMPLE_ITERATIONS,
    });
    const rates = ratesFromStep(again.transition[1]!, again.transition[2]!, binDuration);
    ups[b] = rates.up;
    downs[b] = rates.down;
  }
  return { up: kept.up ? spread(ups) : NaN, down: kept.down ? spread(downs) : NaN };
}
