/**
 * An estimate with its standard error, and the resampling that gives most of them: a bootstrap
 * over groups of consecutive records (Efron & Tibshirani, An Introduction to the Bootstrap,
 * Chapman & Hall 1993, ch. 6; groups rather than single records so that drift shared by
 * neighbouring shots stays inside a group, the moving-block idea of Künsch, Ann. Stat. 17, 1217
 * (1989)). The draws come from a seeded stream, so the same seed gives the same errors.
 */
import type { RandomStream } from '../random/stream.ts';

/** Bootstrap resamples unless told otherwise (`fit --resamples`, the library's `resamples`). */
export const DEFAULT_RESAMPLES = 30;
/** Seed of the bootstrap unless told otherwise (`fit --seed`, the library's `seed`). */
export const DEFAULT_BOOTSTRAP_SEED = 1;

/** A value and its standard error (NaN when none could be computed). */
export interface Estimate {
  value: number;
  standardError: number;
}

/** Sample standard deviation (n − 1) of the finite values; NaN with fewer than two. */
export function spread(values: ArrayLike<number>): number {
  let n = 0, mean = 0, m2 = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (!Number.isFinite(v)) continue;
    n++;
    const d = v - mean;
    mean += d / n;
    m2 += d * (v - mean);
  }
  return n < 2 ? NaN : Math.sqrt(m2 / (n - 1));
}

/** How many times each of `groups` groups is drawn in one bootstrap resample (G draws with replacement), into `counts`. */
export function drawGroupCounts(stream: RandomStream, counts: Float64Array): Float64Array {
  const groups = counts.length;
  counts.fill(0);
  for (let i = 0; i < groups; i++) counts[Math.min(groups - 1, Math.floor(stream.nextDouble() * groups))]! += 1;
  return counts;
}

/** Groups of consecutive records: record r of `records` belongs to group ⌊r·G/records⌋. */
export interface RecordGroups {
  count: number;
  /** Group of each record. */
  of: Uint16Array;
}

/** At most `most` groups of consecutive records, each of at least one record. */
export function groupRecords(records: number, most: number): RecordGroups {
  const count = Math.max(1, Math.min(most, records));
  const of = new Uint16Array(records);
  for (let r = 0; r < records; r++) of[r] = Math.floor((r * count) / records);
  return { count, of };
}
