/**
 * The two-level hidden-Markov model of the binned records, learned by Baum–Welch
 * (classify/hmm-learning.ts: Baum et al., Ann. Math. Stat. 41, 164 (1970); Rabiner, Proc. IEEE
 * 77, 257 (1989)): each record's bins, projected onto the axis that separates the levels, are a
 * two-state Markov chain in white Gaussian noise; each state's level, the common σ, the per-bin
 * transition matrix and the start probabilities (per label, when there are labels) are learned.
 *
 * Start: the axis is the principal axis of the records' mean envelopes (the line the two levels
 * lie on); the levels are two-means of the records' projected means; σ comes from the spread of
 * successive bin differences (robust to the rare jump: median |Δy|/(0.6745·√2)).
 *
 * Two levels or one? The records must show two levels: the model's log-likelihood must beat one
 * Gaussian level by LEVEL_DEVIANCE (deviance 2Δℓ; the null distribution of a mixture's order is
 * not χ², so the bar is set high; common practice, no source), and each level must hold at least
 * MIN_SHARE of the bins.
 *
 * Rates: from the learned step matrix (rates.ts). Each rate is kept only if the model without it
 * is rejected: the same learning with that entry held at 0 (Baum–Welch keeps a zero entry at zero)
 * and a deviance above RATE_DEVIANCE = 10.83, the 99.9 % point of χ² with one degree of freedom,
 * conservative for a rate on the boundary of its range (Self & Liang, J. Am. Stat. Assoc. 82, 605
 * (1987): the null law is then ½χ²₀ + ½χ²₁).
 */
import type { CalibrationRecords } from '../classify/calibrate-records.ts';
import { learnHmm, type HmmLearned } from '../classify/hmm-learning.ts';
import { InputError } from '../errors.ts';
import type { BinnedRecords } from './binning.ts';
import { ratesFromStep } from './rates.ts';

/** Deviance by which two levels must beat one (common practice, no source). */
export const LEVEL_DEVIANCE = 100;
/** Smallest share of the bins a level must hold. */
export const MIN_SHARE = 1e-3;
/** χ²₁ at 99.9 %: a rate is kept when dropping it costs more deviance than this. */
export const RATE_DEVIANCE = 10.83;
/** Most Baum–Welch iterations. */
const ITERATIONS = 400;

/** The learned two-level model. */
export interface TwoLevelModel {
  /** The projection axis (unit vector in the envelope's plane). */
  axis: { cos: number; sin: number };
  /** Projected bins, count × bins (what the model was learned on). */
  records: CalibrationRecords;
  learned: HmmLearned;
  /** Deviance of two levels against one. */
  levelDeviance: number;
  /** Share of the bins in each state (posterior weight). */
  shares: [number, number];
}

/** A rate of the chain with its test. */
export interface RateTest {
  /** 1/s; 0 when dropped. */
  rate: number;
  /** Deviance of the model without it. */
  deviance: number;
  kept: boolean;
}

function principalAxis(re: Float64Array, im: Float64Array): { cos: number; sin: number } {
  const n = re.length;
  let mr = 0, mi = 0;
  for (let i = 0; i < n; i++) { mr += re[i]!; mi += im[i]!; }
  mr /= n; mi /= n;
  let sxx = 0, syy = 0, sxy = 0;
  for (let i = 0; i < n; i++) {
    const a = re[i]! - mr, b = im[i]! - mi;
    sxx += a * a; syy += b * b; sxy += a * b;
  }
  const angle = 0.5 * Math.atan2(2 * sxy, sxx - syy);
  return { cos: Math.cos(angle), sin: Math.sin(angle) };
}

/** Two-means of values: the two centres, lower first. */
function twoMeans(values: Float64Array): [number, number] {
  const sorted = Float64Array.from(values).sort();
  let lo = sorted[Math.floor(0.05 * (sorted.length - 1))]!, hi = sorted[Math.ceil(0.95 * (sorted.length - 1))]!;
  for (let it = 0; it < 50; it++) {
    const cut = 0.5 * (lo + hi);
    let a = 0, na = 0, b = 0, nb = 0;
    for (const v of sorted) { if (v < cut) { a += v; na++; } else { b += v; nb++; } }
    if (na === 0 || nb === 0) break;
    const nlo = a / na, nhi = b / nb;
    if (nlo === lo && nhi === hi) break;
    lo = nlo; hi = nhi;
  }
  return [lo, hi];
}

/** Projects the bins onto the axis, with labels (0 for every record without them). */
function projectBins(b: BinnedRecords, axis: { cos: number; sin: number }, labels: Uint8Array | null): CalibrationRecords {
  const projected = new Float64Array(b.count * b.bins);
  for (let i = 0; i < projected.length; i++) projected[i] = b.re[i]! * axis.cos + b.im[i]! * axis.sin;
  const outcome = new Uint8Array(b.count);
  if (labels) for (let i = 0; i < b.count; i++) outcome[i] = labels[i] === 1 ? 1 : 0;
  return { bins: b.bins, count: b.count, projected, outcome, cleanState: new Uint8Array(b.count).fill(255) };
}

/** Learns the model; InputError when the records do not show two levels. */
export function learnTwoLevels(b: BinnedRecords, labels: Uint8Array | null, source: string): TwoLevelModel {
  const meansRe = new Float64Array(b.count), meansIm = new Float64Array(b.count);
  for (let r = 0; r < b.count; r++) {
    let a = 0, c = 0;
    for (let k = 0; k < b.bins; k++) { a += b.re[r * b.bins + k]!; c += b.im[r * b.bins + k]!; }
    meansRe[r] = a / b.bins; meansIm[r] = c / b.bins;
  }
  const axis = b.complexValued ? principalAxis(meansRe, meansIm) : { cos: 1, sin: 0 };
  const records = projectBins(b, axis, labels);
  const m = b.bins;
  const recordMeans = Float64Array.from(meansRe, (re, r) => re * axis.cos + meansIm[r]! * axis.sin);
  const [lo, hi] = twoMeans(recordMeans);
  const differences = new Float64Array(b.count * Math.max(0, m - 1));
  let total = 0, squares = 0, d = 0;
  for (let r = 0; r < b.count; r++) {
    for (let k = 0; k < m; k++) {
      const y = records.projected[r * m + k]!;
      total += y; squares += y * y;
      if (k > 0) differences[d++] = Math.abs(y - records.projected[r * m + k - 1]!);
    }
  }
  const n = b.count * m;
  const variance = Math.max(1e-300, squares / n - (total / n) ** 2);
  differences.sort();
  const robust = differences.length ? differences[differences.length >> 1]! / (0.6745 * Math.SQRT2) : 0;
  const sigma = robust > 0 ? robust : Math.sqrt(variance);
  const flip = Math.min(0.05, 1 / Math.max(2, m));
  const learned = learnHmm(records, {
    shapes: [new Float64Array(m), new Float64Array(m)], offsets: [lo, hi], sigma,
    transition: Float64Array.from([1 - flip, flip, flip, 1 - flip]),
    priorsByLabel: [Float64Array.from([0.5, 0.5]), Float64Array.from([0.5, 0.5])],
    learnTransitions: true, learnPriors: true, iterations: ITERATIONS,
  });
  // one Gaussian level: ℓ₁ = −(n/2)(ln 2πv + 1) at the maximum-likelihood mean and variance
  const oneLevel = -0.5 * n * (Math.log(2 * Math.PI * variance) + 1);
  const levelDeviance = 2 * (learned.logLikelihood - oneLevel);
  const shares = stateShares(learned, labels, b.count);
  const gap = Math.abs(learned.offsets[1]! - learned.offsets[0]!);
  const why = !(gap > 0 && Number.isFinite(gap)) ? 'the two levels coincide'
    : !(levelDeviance >= LEVEL_DEVIANCE) ? `two levels fit no better than one (deviance ${levelDeviance.toFixed(1)}, needed ${LEVEL_DEVIANCE})`
      : Math.min(...shares) < MIN_SHARE ? `one level holds almost every record (shares ${shares.map((s) => s.toPrecision(3)).join(', ')})` : null;
  if (why) throw new InputError(source, '', 'records that show two levels (the two states of the readout)', `one level: ${why}`);
  return { axis, records, learned, levelDeviance, shares };
}

/** Share of each state among the records' starts, from the learned start probabilities. */
function stateShares(learned: HmmLearned, labels: Uint8Array | null, count: number): [number, number] {
  if (!labels) return [learned.priorsByLabel[0][0]!, learned.priorsByLabel[0][1]!];
  let ones = 0;
  for (let i = 0; i < count; i++) if (labels[i] === 1) ones++;
  const w1 = ones / count, w0 = 1 - w1;
  return [0, 1].map((s) => w0 * learned.priorsByLabel[0][s]! + w1 * learned.priorsByLabel[1][s]!) as [number, number];
}

/** The rates up (state 0 → 1) and down (1 → 0) of the learned model, each with its likelihood-ratio test. */
export function testRates(model: TwoLevelModel, binDuration: number): { up: RateTest; down: RateTest } {
  const l = model.learned;
  const rates = ratesFromStep(l.transition[1]!, l.transition[2]!, binDuration);
  const without = (entry: 1 | 2): number => {
    const t = Float64Array.from(l.transition);
    t[entry] = 0;
    t[entry === 1 ? 0 : 3] = 1;
    const restricted = learnHmm(model.records, {
      shapes: [new Float64Array(model.records.bins), new Float64Array(model.records.bins)], offsets: l.offsets, sigma: l.sigma,
      transition: t, priorsByLabel: l.priorsByLabel, learnTransitions: true, learnPriors: true, iterations: ITERATIONS,
    });
    return Math.max(0, 2 * (l.logLikelihood - restricted.logLikelihood));
  };
  const test = (rate: number, entry: 1 | 2): RateTest => {
    if (!(rate > 0)) return { rate: 0, deviance: 0, kept: false };
    const deviance = without(entry);
    const kept = deviance > RATE_DEVIANCE;
    return { rate: kept ? rate : 0, deviance, kept };
  };
  return { up: test(rates.up, 1), down: test(rates.down, 2) };
}
