/**
 * Learning the hidden-Markov model of decimated records from labelled calibration records, by
 * expectation–maximisation (Baum, Petrie, Soules & Weiss, Ann. Math. Stat. 41, 164 (1970);
 * Rabiner, Proc. IEEE 77, 257 (1989), §III.C): the likelihood classifier's means, noise and
 * (optionally) transitions come from the data a lab has, not only from the device's model.
 *
 * Model. State s emits y_k ~ N(shape_s[k] + offset_s, σ²) in bin k (shape: the state's mean
 * record as the device model gives it, zero when there is none; offset: a constant the data
 * decide, so that a constant offset of the record, or levels the model has wrong, are learned);
 * states follow a Markov chain with per-bin transition matrix T; a record labelled ℓ starts in
 * state s with probability π_ℓ(s) (the labels are the prepared outcomes: a preparation or mapping
 * error, or a jump before the window, starts a record elsewhere).
 *
 * One iteration: the scaled forward–backward pass of every record (Rabiner eqs. 19–25, 91–93)
 * gives the posteriors γ_k(s) and, for the transitions, ξ_k(s, s'); then
 *   offset_s = Σ γ·(y − shape_s) / Σ γ,   σ² = Σ γ·(y − μ_s)² / Σ γ,
 *   T_ss' = Σ ξ(s, s') / Σ γ (over bins but the last),   π_ℓ(s) = mean of γ_0(s) over label ℓ,
 * each the maximiser of the expected log-likelihood (Rabiner eqs. 40a–c, 53). The likelihood
 * never decreases; iterations stop when it gains less than 1e-9 per bin, or after `iterations`.
 */
import type { CalibrationRecords } from './calibrate-records.ts';

/** Where the learning starts and what it may change. */
export interface HmmLearningStart {
  /** Per state, the mean record's shape per bin (length ≥ bins), or zeros. */
  shapes: readonly Float64Array[];
  /** Per state, the starting offset added to its shape. */
  offsets: readonly number[];
  sigma: number;
  /** N×N per-bin transition matrix, row-major. */
  transition: Float64Array;
  /** Per label (outcome 0, 1): the probability of each state at the window start. */
  priorsByLabel: readonly [Float64Array, Float64Array];
  /** Learn the transition matrix too (else it stays). */
  learnTransitions: boolean;
  /** Learn the priors by label too (else they stay). */
  learnPriors: boolean;
  /** Most iterations. */
  iterations: number;
}

/** The learned model. */
export interface HmmLearned {
  /** Per state and bin, shape + offset. */
  means: Float64Array[];
  offsets: number[];
  sigma: number;
  transition: Float64Array;
  priorsByLabel: [Float64Array, Float64Array];
  /** Log-likelihood of the records under the learned model (natural log). */
  logLikelihood: number;
  iterations: number;
}

/** The buffers of one record's forward–backward pass (m bins, n states), row-major by bin. */
export interface HmmPass {
  alpha: Float64Array;
  beta: Float64Array;
  emit: Float64Array;
  scale: Float64Array;
}

/** Buffers for records of up to `bins` bins and `states` states. */
export function makeHmmPass(bins: number, states: number): HmmPass {
  return { alpha: new Float64Array(bins * states), beta: new Float64Array(bins * states), emit: new Float64Array(bins * states), scale: new Float64Array(bins) };
}

/** The model a forward–backward pass reads: state s emits N(shapes[s][k] + offsets[s], σ²) in bin k. */
export interface HmmEmissions {
  shapes: readonly Float64Array[];
  offsets: readonly number[];
  sigma: number;
  /** N×N per-bin transition matrix, row-major. */
  transition: Float64Array;
}

/**
 * The scaled forward–backward pass of the record y[base, base + m) (Rabiner eqs. 19–25, 91–93)
 * into `pass`: afterwards the posterior of state s in bin k is alpha[k·n + s]·beta[k·n + s].
 * Returns `logLikelihood` plus the record's log-likelihood, added bin by bin.
 */
export function forwardBackward(
  y: Float64Array, base: number, m: number, model: HmmEmissions, prior: Float64Array, pass: HmmPass, logLikelihood = 0,
): number {
  const n = model.shapes.length;
  const { alpha, beta, emit, scale } = pass;
  const { shapes, offsets, transition } = model;
  const sigma = model.sigma;
  const inverseTwoVariance = 1 / (2 * sigma * sigma), normaliser = 1 / (sigma * Math.sqrt(2 * Math.PI));
  // emissions, with the shared factor 1/(σ√2π) kept in each bin's scale
  for (let k = 0; k < m; k++) {
    const v = y[base + k]!;
    for (let s = 0; s < n; s++) {
      const d = v - shapes[s]![k]! - offsets[s]!;
      emit[k * n + s] = Math.exp(-d * d * inverseTwoVariance);
    }
  }
  // forward, scaled so that Σ_s α_k(s) = 1 (Rabiner eq. 91)
  for (let k = 0; k < m; k++) {
    let c = 0;
    for (let s = 0; s < n; s++) {
      let a = 0;
      if (k === 0) a = prior[s]!;
      else for (let p = 0; p < n; p++) a += alpha[(k - 1) * n + p]! * transition[p * n + s]!;
      a *= emit[k * n + s]!;
      alpha[k * n + s] = a;
      c += a;
    }
    // a record far from every state (c underflows): spread it evenly rather than divide by 0
    if (!(c > 0)) { for (let s = 0; s < n; s++) alpha[k * n + s] = 1 / n; c = 1e-300; } else for (let s = 0; s < n; s++) alpha[k * n + s]! /= c;
    scale[k] = c;
    logLikelihood += Math.log(c * normaliser);
  }
  // backward with the same scales (Rabiner eq. 92)
  for (let s = 0; s < n; s++) beta[(m - 1) * n + s] = 1;
  for (let k = m - 2; k >= 0; k--) {
    for (let s = 0; s < n; s++) {
      let b = 0;
      for (let q = 0; q < n; q++) b += transition[s * n + q]! * emit[(k + 1) * n + q]! * beta[(k + 1) * n + q]!;
      beta[k * n + s] = b / scale[k + 1]!;
    }
  }
  return logLikelihood;
}

/** Runs expectation–maximisation on the records (see the file comment). */
export function learnHmm(r: CalibrationRecords, start: HmmLearningStart): HmmLearned {
  const n = start.shapes.length, m = r.bins;
  const offsets = [...start.offsets];
  let sigma = start.sigma;
  const transition = Float64Array.from(start.transition);
  const priors: [Float64Array, Float64Array] = [Float64Array.from(start.priorsByLabel[0]), Float64Array.from(start.priorsByLabel[1])];
  const pass = makeHmmPass(m, n);
  const { alpha, beta, emit, scale } = pass;
  let previous = -Infinity, logLikelihood = -Infinity, iterations = 0;
  for (; iterations < start.iterations; iterations++) {
    const sumGamma = new Float64Array(n), sumResidual = new Float64Array(n);
    const xi = new Float64Array(n * n), fromCount = new Float64Array(n);
    const firstGamma: [Float64Array, Float64Array] = [new Float64Array(n), new Float64Array(n)];
    const labelCount = [0, 0];
    let sumSquares = 0, total = 0;
    logLikelihood = 0;
    const model: HmmEmissions = { shapes: start.shapes, offsets, sigma, transition };
    for (let i = 0; i < r.count; i++) {
      const base = i * m, label = r.outcome[i]!;
      logLikelihood = forwardBackward(r.projected, base, m, model, priors[label]!, pass, logLikelihood);
      // posteriors and the sums of the M-step
      for (let k = 0; k < m; k++) {
        const y = r.projected[base + k]!;
        for (let s = 0; s < n; s++) {
          const g = alpha[k * n + s]! * beta[k * n + s]!;
          sumGamma[s] += g;
          const d = y - start.shapes[s]![k]!;
          sumResidual[s] += g * d;
          const e = d - offsets[s]!;
          sumSquares += g * e * e;
          total += g;
          if (k === 0) firstGamma[label]![s] += g;
          if (k < m - 1) {
            fromCount[s] += g;
            for (let q = 0; q < n; q++) {
              xi[s * n + q] += (alpha[k * n + s]! * transition[s * n + q]! * emit[(k + 1) * n + q]! * beta[(k + 1) * n + q]!) / scale[k + 1]!;
            }
          }
        }
      }
      labelCount[label]!++;
    }
    // σ² about the new offsets: Σγ(d − o_new)² = Σγ(d − o_old)² − Σγ·(o_new − o_old)², since Σγ·d = o_new·Σγ
    let shift = 0;
    for (let s = 0; s < n; s++) {
      if (!(sumGamma[s]! > 0)) continue;
      const updated = sumResidual[s]! / sumGamma[s]!;
      shift += sumGamma[s]! * (updated - offsets[s]!) ** 2;
      offsets[s] = updated;
    }
    sigma = Math.sqrt(Math.max(1e-300, (sumSquares - shift) / total));
    if (start.learnTransitions) {
      for (let s = 0; s < n; s++) {
        if (!(fromCount[s]! > 0)) continue;
        for (let q = 0; q < n; q++) transition[s * n + q] = xi[s * n + q]! / fromCount[s]!;
      }
    }
    if (start.learnPriors) {
      for (let l = 0; l < 2; l++) {
        if (labelCount[l] === 0) continue;
        for (let s = 0; s < n; s++) priors[l]![s] = firstGamma[l]![s]! / labelCount[l]!;
      }
    }
    if (logLikelihood - previous < 1e-9 * r.count * m) { iterations++; break; }
    previous = logLikelihood;
  }
  const means = start.shapes.map((shape, s) => Float64Array.from({ length: m }, (_, k) => shape[k]! + offsets[s]!));
  return { means, offsets, sigma, transition, priorsByLabel: priors, logLikelihood, iterations };
}
