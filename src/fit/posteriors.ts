/**
 * What the learned model says about each record, from one forward–backward pass
 * (classify/hmm-learning.ts `forwardBackward`): the state of its first bin, and its clean
 * stretches — runs of bins that are in one state with posterior ≥ CLEAN_POSTERIOR, less the bin
 * at either end that borders a change (a jump inside a bin mixes the two levels there) — for
 * the noise spectrum; and each state's level.
 *
 * The levels are posterior-weighted means, never means over bins chosen by a threshold: a bin's
 * own noise moves its posterior, so a threshold keeps the bins whose noise points away from the
 * other level and biases both levels apart. For any event A_k, E[P(A_k | y)·z_k] = E[1{A_k}·z_k]
 * (the tower rule, under the model), so Σ_k P(A_k | y)·z_k / Σ_k P(A_k | y) estimates the level
 * without that bias. A_k is "bins k − 1, k and k + 1 are all in state s", which leaves out the
 * bin in which a jump happens (its mean mixes the two levels, outside the model):
 *   P(A_k | y) = α_{k−1}(s)·T_ss·e_k(s)·T_ss·e_{k+1}(s)·β_{k+1}(s) / (c_k·c_{k+1})
 * with the scaled forward and backward variables (Rabiner 1989, eqs. 37 and 91–93). The sums
 * are kept per group of records so that the bootstrap can resample them.
 */
import { forwardBackward, makeHmmPass } from '../classify/hmm-learning.ts';
import type { BinnedRecords } from './binning.ts';
import type { RecordGroups } from './estimate.ts';
import type { TwoLevelModel } from './two-level.ts';

/** A bin is clean when its state's posterior is at least this (common practice, no source). */
export const CLEAN_POSTERIOR = 0.999;

/** The model's reading of every record. */
export interface RecordReading {
  /** State of each record's first bin (the larger posterior). */
  startState: Uint8Array;
  /** Clean stretches, four numbers each: record, first bin, end bin (exclusive), state. */
  stretches: Int32Array;
  stretchCount: number;
  /** Per group and state: Σ w·Re z, Σ w·Im z and Σ w, w = P(A_k | y) of the file comment (groups × 2 × 3). */
  levelSums: Float64Array;
  /** Clean bins per state over all records. */
  cleanBins: [number, number];
}

/** Reads every record with the learned model. */
export function readRecords(b: BinnedRecords, model: TwoLevelModel, groups: RecordGroups): RecordReading {
  const m = b.bins, l = model.learned, r = model.records;
  const pass = makeHmmPass(m, 2);
  const emissions = { shapes: [new Float64Array(m), new Float64Array(m)], offsets: l.offsets, sigma: l.sigma, transition: l.transition };
  const startState = new Uint8Array(b.count);
  const levelSums = new Float64Array(groups.count * 6);
  const cleanBins: [number, number] = [0, 0];
  const list: number[] = [];
  const state = new Int8Array(m);
  for (let i = 0; i < b.count; i++) {
    forwardBackward(r.projected, i * m, m, emissions, l.priorsByLabel[r.outcome[i]!]!, pass);
    const { alpha, beta, emit, scale } = pass, t = l.transition;
    for (let k = 0; k < m; k++) {
      const g0 = alpha[2 * k]! * beta[2 * k]!, g1 = alpha[2 * k + 1]! * beta[2 * k + 1]!;
      const total = g0 + g1;
      state[k] = g0 >= CLEAN_POSTERIOR * total ? 0 : g1 >= CLEAN_POSTERIOR * total ? 1 : -1;
      if (k === 0) startState[i] = g1 > g0 ? 1 : 0;
      for (let s = 0; s < 2; s++) {
        const stay = t[3 * s]!;
        let w: number;
        if (m === 1) w = alpha[s]! * beta[s]!;
        else if (k === 0) w = (alpha[s]! * stay * emit[2 + s]! * beta[2 + s]!) / scale[1]!;
        else if (k === m - 1) w = (alpha[2 * (k - 1) + s]! * stay * emit[2 * k + s]! * beta[2 * k + s]!) / scale[k]!;
        else w = (alpha[2 * (k - 1) + s]! * stay * emit[2 * k + s]! * stay * emit[2 * (k + 1) + s]! * beta[2 * (k + 1) + s]!) / (scale[k]! * scale[k + 1]!);
        const at = (groups.of[i]! * 2 + s) * 3;
        levelSums[at] += w * b.re[i * m + k]!;
        levelSums[at + 1] += w * b.im[i * m + k]!;
        levelSums[at + 2] += w;
      }
    }
    for (let k = 0; k < m;) {
      const s = state[k]!;
      let end = k + 1;
      while (end < m && state[end] === s) end++;
      if (s >= 0) {
        const first = k === 0 ? k : k + 1, last = end === m ? end : end - 1;
        if (last > first) {
          list.push(i, first, last, s);
          cleanBins[s] += last - first;
        }
      }
      k = end;
    }
  }
  return { startState, stretches: Int32Array.from(list), stretchCount: list.length / 4, levelSums, cleanBins };
}

/** The level of each state (mean envelope over its clean bins) from group sums weighted by `counts` (all ones: the plain sums). */
export function levelsFrom(levelSums: Float64Array, counts: Float64Array | null): [{ re: number; im: number }, { re: number; im: number }] {
  const out = [0, 1].map((s) => {
    let re = 0, im = 0, n = 0;
    for (let g = 0; g < levelSums.length / 6; g++) {
      const w = counts ? counts[g]! : 1;
      const at = (g * 2 + s) * 3;
      re += w * levelSums[at]!;
      im += w * levelSums[at + 1]!;
      n += w * levelSums[at + 2]!;
    }
    return { re: re / n, im: im / n };
  });
  return out as [{ re: number; im: number }, { re: number; im: number }];
}
