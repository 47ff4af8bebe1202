/**
 * Paired comparison of the pipelines of one point: they all decide the SAME shots, so for every
 * pair (A, B) the shots fall into a paired 2×2 table (both wrong, only A wrong, only B wrong,
 * both right), tested with the exact McNemar test and summarised by the difference of error
 * rates with Newcombe's interval (mcnemar.ts: McNemar, Psychometrika 12, 153 (1947); Newcombe,
 * Stat. Med. 17, 2635 (1998)). "Wrong" is the plain decision's error (no ambiguous band).
 */
import { mcnemarExact, pairedDifference, type PairedCounts } from './mcnemar.ts';

/** The paired counts of pipelines a < b. */
export interface PairTally {
  a: number;
  b: number;
  counts: PairedCounts;
}

/** Empty tallies for every pair a < b of `pipelines` pipelines, in order (0,1), (0,2), …, (1,2), … */
export function emptyPairTallies(pipelines: number): PairTally[] {
  const out: PairTally[] = [];
  for (let a = 0; a < pipelines; a++) {
    for (let b = a + 1; b < pipelines; b++) out.push({ a, b, counts: { bothWrong: 0, onlyAWrong: 0, onlyBWrong: 0, n: 0 } });
  }
  return out;
}

/**
 * Over shots [0, count) of two pipelines' wrong flags (≠ 0: wrong), adds the shots both got
 * wrong, only `wa` got wrong and only `wb` got wrong to into[at], into[at + 1], into[at + 2].
 */
export function addDisagreements(wa: ArrayLike<number>, wb: ArrayLike<number>, count: number, into: Float64Array, at: number): void {
  let both = 0, onlyA = 0, onlyB = 0;
  for (let i = 0; i < count; i++) {
    const x = wa[i] !== 0, y = wb[i] !== 0;
    if (x && y) both++;
    else if (x) onlyA++;
    else if (y) onlyB++;
  }
  into[at]! += both;
  into[at + 1]! += onlyA;
  into[at + 2]! += onlyB;
}

const pairCounts = new Float64Array(3);

/** Adds `count` shots; wrong[p][i] ≠ 0 when pipeline p got shot i wrong. Returns `pairs`. */
export function addPairs(pairs: PairTally[], wrong: readonly ArrayLike<number>[], count: number): PairTally[] {
  for (const pair of pairs) {
    pairCounts.fill(0);
    addDisagreements(wrong[pair.a]!, wrong[pair.b]!, count, pairCounts, 0);
    pair.counts.bothWrong += pairCounts[0]!;
    pair.counts.onlyAWrong += pairCounts[1]!;
    pair.counts.onlyBWrong += pairCounts[2]!;
    pair.counts.n += count;
  }
  return pairs;
}

/** Adds two sets of pair tallies (same pairs, same order), e.g. from shards. */
export function mergePairTallies(x: readonly PairTally[], y: readonly PairTally[]): PairTally[] {
  return x.map((p, k) => {
    const q = y[k]!.counts;
    return {
      a: p.a, b: p.b,
      counts: {
        bothWrong: p.counts.bothWrong + q.bothWrong, onlyAWrong: p.counts.onlyAWrong + q.onlyAWrong,
        onlyBWrong: p.counts.onlyBWrong + q.onlyBWrong, n: p.counts.n + q.n,
      },
    };
  });
}

/** One pair of pipelines compared on the same shots. */
export interface PipelineComparison {
  a: string;
  b: string;
  shots: number;
  bothWrong: number;
  onlyAWrong: number;
  onlyBWrong: number;
  errorA: number;
  errorB: number;
  /** errorA − errorB with its interval (Newcombe 1998, method 10). */
  difference: number;
  low: number;
  high: number;
  confidence: number;
  /** Two-sided exact McNemar p-value. */
  pValue: number;
}

/** The comparisons of every pair, with intervals at `confidence`. */
export function comparePipelines(names: readonly string[], pairs: readonly PairTally[], confidence: number): PipelineComparison[] {
  return pairs.map(({ a, b, counts }) => {
    const d = pairedDifference(counts, confidence);
    const n = counts.n;
    return {
      a: names[a]!, b: names[b]!, shots: n,
      bothWrong: counts.bothWrong, onlyAWrong: counts.onlyAWrong, onlyBWrong: counts.onlyBWrong,
      errorA: n > 0 ? (counts.bothWrong + counts.onlyAWrong) / n : NaN,
      errorB: n > 0 ? (counts.bothWrong + counts.onlyBWrong) / n : NaN,
      difference: d.difference, low: d.low, high: d.high, confidence,
      pValue: mcnemarExact(counts.onlyAWrong, counts.onlyBWrong),
    };
  });
}
