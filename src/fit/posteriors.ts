/**
 * What the learned model says about each record, from one forward–backward pass
 * (classify/hmm-learning.ts `forwardBackward`): the state of its first bin, each state's level,
 * and the record's clean stretches for the noise spectrum.
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
 *
 * The clean stretches are chosen by the whole record, not bin by bin (for the same reason: a
 * per-bin threshold drops the bins whose noise leans towards the other level, and slow noise
 * would read low). A record's stretch is its longest prefix that stays in one state with
 * probability ≥ CLEAN_PROBABILITY, P(x_0 = … = x_k = s | y) = π_s·Π_{j≤k}(e_j(s)/c_j)·T_ss^k·β_k(s),
 * and, after a jump, its longest such suffix, P(x_k = … = x_{m−1} = s | y) =
 * α_k(s)·Π_{j>k}(T_ss·e_j(s)/c_j); the bin next to the jump is left out of either.
 */
import { forwardBackward, makeHmmPass, type HmmPass } from '../classify/hmm-learning.ts';
import type { BinnedRecords } from './binning.ts';
import type { RecordGroups } from './estimate.ts';
import type { TwoLevelModel } from './two-level.ts';

/** A stretch is clean when it stays in one state with at least this probability (common practice, no source). */
export const CLEAN_PROBABILITY = 0.99;

/** The model's reading of every record. */
export interface RecordReading {
  /** State of each record's first bin (the larger posterior). */
  startState: Uint8Array;
  /** Clean stretches, four numbers each: record, first bin, end bin (exclusive), state. */
  stretches: Int32Array;
  stretchCount: number;
  /** Per group and state: Σ w·Re z, Σ w·Im z and Σ w, w = P(A_k | y) of the file comment (groups × 2 × 3). */
  levelSums: Float64Array;
  /** Bins in clean stretches, per state. */
  cleanBins: [number, number];
}

/** The end (exclusive) of the longest prefix in state s with probability ≥ CLEAN_PROBABILITY (0: none). */
function cleanPrefix(pass: HmmPass, m: number, s: number, prior: number, stay: number): number {
  let log = Math.log(prior), end = 0;
  const logStay = Math.log(stay);
  for (let k = 0; k < m; k++) {
    log += Math.log(pass.emit[2 * k + s]! / pass.scale[k]!) + (k > 0 ? logStay : 0);
    if (!(Math.exp(log) * pass.beta[2 * k + s]! >= CLEAN_PROBABILITY)) break;
    end = k + 1;
  }
  return end;
}

/** The start of the longest suffix in state s with probability ≥ CLEAN_PROBABILITY (m: none). */
function cleanSuffix(pass: HmmPass, m: number, s: number, stay: number): number {
  let log = 0, start = m;
  const logStay = Math.log(stay);
  for (let k = m - 1; k >= 0; k--) {
    if (!(pass.alpha[2 * k + s]! * Math.exp(log) >= CLEAN_PROBABILITY)) break;
    start = k;
    log += logStay + Math.log(pass.emit[2 * k + s]! / pass.scale[k]!);
  }
  return start;
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
  const { alpha, beta, emit, scale } = pass, t = l.transition;
  for (let i = 0; i < b.count; i++) {
    const prior = l.priorsByLabel[r.outcome[i]!]!;
    forwardBackward(r.projected, i * m, m, emissions, prior, pass);
    for (let k = 0; k < m; k++) {
      if (k === 0) startState[i] = alpha[1]! * beta[1]! > alpha[0]! * beta[0]! ? 1 : 0;
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
    // the clean prefix (the whole record when it never jumps), then a clean suffix after a jump
    let prefixEnd = 0;
    for (let s = 0; s < 2 && prefixEnd === 0; s++) {
      const end = cleanPrefix(pass, m, s, prior[s]!, t[3 * s]!);
      if (end === 0) continue;
      const last = end === m ? m : end - 1;
      if (last > 0) { list.push(i, 0, last, s); cleanBins[s] += last; }
      prefixEnd = end;
    }
    if (prefixEnd === m) continue;
    for (let s = 0; s < 2; s++) {
      const start = cleanSuffix(pass, m, s, t[3 * s]!);
      const first = start + 1;
      if (start < m && first < m && first > prefixEnd) { list.push(i, first, m, s); cleanBins[s] += m - first; break; }
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
