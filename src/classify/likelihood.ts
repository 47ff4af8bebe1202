/**
 * Likelihood-ratio classifier of a decimated readout record under a hidden-Markov model
 * (Gambetta, Braff, Wallraff, Girvin, Schoelkopf, Phys. Rev. A 76, 012325 (2007), the nonlinear
 * "Bayesian" filter; D'Anjou & Coish, Phys. Rev. A 89, 012313 (2014)).
 *
 * Model. The record is m bins y[0..m) of duration dt, already projected onto the separation
 * axis. The hidden state x_k follows a Markov chain with per-bin transition matrix
 * T = exp(Q·dt) (`transition.ts`). Given x_k = i, the bin value is Gaussian,
 * y_k ~ N(μ_i[k], σ²), independent between bins (white noise after decimation), with the same σ
 * for every state. The question asked is the outcome of the state at the WINDOW START, x_start,
 * which is what the readout of a prepared state must report. Bin 0 shows the state
 * x_0 ~ F[x_start, ·] (F = `firstStep`, identity by default; pass exp(Q·dt/2) to let each bin
 * show the state at its centre).
 *
 * Computation. All N values P(y | x_start = s) come from ONE backward recursion
 * (Rabiner, Proc. IEEE 77, 257 (1989), eqs. 23–25):
 *   β_{m−1}(i) = e_i(y_{m−1}),   β_k(i) = e_i(y_k) · Σ_j T_ij β_{k+1}(j),
 *   P(y | x_start = s) = Σ_i F_si β_0(i),
 * cost m·N² — against N·m·N² for N forward passes from one-hot starts. It runs in log space:
 * each step factors out M = max_j log β_{k+1}(j), so log Σ_j T_ij β_{k+1}(j) =
 * M + log Σ_j T_ij e^(log β_{k+1}(j) − M) (log-sum-exp with N exponentials per bin instead of N²;
 * no log of T is taken, so zero transition entries are fine). A row whose sum underflows (it
 * reaches only states ≳ e^(−640) less likely than the leader, e.g. T = I at high per-bin SNR)
 * is redone with its own maximum, so the result stays exact in log space.
 *
 * Outcomes: with prior π (the prepared mixture after preparation and mapping errors) and
 * Π_o = Σ_{s: label(s)=o} π_s,
 *   log P(y | o) = log Σ_{s∈o} π_s P(y | s) − log Π_o   (equal weights inside o when Π_o = 0),
 *   logLikelihoodRatio = log [Π_1 P(y | 1)] − log [Π_0 P(y | 0)] = log P(1 | y) − log P(0 | y),
 * the posterior log-odds; the MAP decision reports outcome 1 when it is > 0.
 *
 * Approximation (bin means). The bin in which a jump happens really has a mean between the two
 * levels (a linear ramp averaged over the bin: μ_i·u/dt + μ_j·(1 − u/dt) for a jump at u); the
 * model gives it the level of one state. The error matters only when the per-bin separation is
 * not small against σ (|μ_1 − μ_0|/σ ≳ 1 per bin) AND jumps are frequent per bin (rate·dt ≳ 0.1);
 * finer bins (per-bin SNR ≪ 1) make it negligible. Bin-to-bin noise correlation (a filter
 * longer than a bin, 1/f noise) is outside the model as well.
 */

/** What the HMM classifier is built from. Arrays are read at construction and copied. */
export interface HmmClassifierSpec {
  /** Per state s, the mean of each bin of the window: means[s][k] ↔ record[start + k]. */
  means: Float64Array[];
  /** Standard deviation of one bin's value (same for all states and bins). */
  sigma: number;
  /** N×N row-major per-bin transition matrix T[i·N + j] = P(x_{k+1} = j | x_k = i). */
  transition: Float64Array;
  /** N initial-state probabilities at the window start (also the prior of the decision). */
  prior: Float64Array;
  /** N outcome labels, 0 or 1: what a perfect readout reports for each state. */
  outcomeOfState: Uint8Array;
  /** Optional N×N matrix from the window start to the instant that bin 0 shows; default identity. */
  firstStep?: Float64Array;
}

/** A built HMM classifier; every method allocates nothing (preallocated scratch). */
export interface HmmClassifier {
  /** Number of hidden states N. */
  readonly states: number;
  /** Longest window (bins) the means cover. */
  readonly maxLength: number;
  /** Writes log P(y | x_start = s) for each state s (a true log density; 0 for length 0) into `out` (length N). */
  stateLogLikelihoods(record: Float64Array, start: number, length: number, out: Float64Array): Float64Array;
  /** Writes log P(y | outcome o) for o = 0, 1 into `out` (length ≥ 2). */
  outcomeLogLikelihoods(record: Float64Array, start: number, length: number, out: Float64Array): Float64Array;
  /** Posterior log-odds log P(outcome 1 | y) − log P(outcome 0 | y) of bins record[start, start+length). */
  logLikelihoodRatio(record: Float64Array, start: number, length: number): number;
}

const HALF_LOG_TWO_PI = 0.5 * Math.log(2 * Math.PI);

/** log(e^a + e^b) without overflow; −∞ if both are −∞. */
function logAddExp(a: number, b: number): number {
  if (a === -Infinity) return b;
  if (b === -Infinity) return a;
  return a > b ? a + Math.log1p(Math.exp(b - a)) : b + Math.log1p(Math.exp(a - b));
}

/**
 * Builds the HMM likelihood-ratio classifier (Gambetta et al., Phys. Rev. A 76, 012325, 2007)
 * for records of up to `means[s].length` bins. Validates shapes; the hot path does not.
 */
export function makeHmmClassifier(spec: HmmClassifierSpec): HmmClassifier {
  const n = spec.means.length;
  if (n < 1) throw new RangeError('makeHmmClassifier: no states');
  if (spec.transition.length !== n * n) throw new RangeError(`makeHmmClassifier: transition must be ${n}×${n}`);
  if (spec.firstStep !== undefined && spec.firstStep.length !== n * n) {
    throw new RangeError(`makeHmmClassifier: firstStep must be ${n}×${n}`);
  }
  if (spec.prior.length !== n || spec.outcomeOfState.length !== n) {
    throw new RangeError(`makeHmmClassifier: prior and outcomeOfState need ${n} entries`);
  }
  if (!(spec.sigma > 0) || !Number.isFinite(spec.sigma)) throw new RangeError(`makeHmmClassifier: bad sigma ${spec.sigma}`);
  let maxLength = Infinity;
  for (const m of spec.means) maxLength = Math.min(maxLength, m.length);

  const means = spec.means.map((m) => Float64Array.from(m));
  const transition = Float64Array.from(spec.transition);
  const firstStep = spec.firstStep === undefined ? null : Float64Array.from(spec.firstStep);
  const outcomeOfState = Uint8Array.from(spec.outcomeOfState);
  const inverseTwoVariance = 1 / (2 * spec.sigma * spec.sigma);
  const logNormaliser = -HALF_LOG_TWO_PI - Math.log(spec.sigma);

  // Prior inside each outcome: log(π_s / Π_o), or log(1/n_o) when Π_o = 0; and log Π_o.
  const outcomeMass = [0, 0];
  const outcomeCount = [0, 0];
  for (let s = 0; s < n; s++) {
    const o = outcomeOfState[s]!;
    if (o > 1) throw new RangeError(`makeHmmClassifier: outcome label ${o} of state ${s} is not 0 or 1`);
    const p = spec.prior[s]!;
    if (!(p >= 0)) throw new RangeError(`makeHmmClassifier: bad prior ${p} of state ${s}`);
    outcomeMass[o]! += p;
    outcomeCount[o]! += 1;
  }
  const logWeightInOutcome = new Float64Array(n);
  for (let s = 0; s < n; s++) {
    const o = outcomeOfState[s]!;
    logWeightInOutcome[s] = outcomeMass[o]! > 0 ? Math.log(spec.prior[s]! / outcomeMass[o]!) : -Math.log(outcomeCount[o]!);
  }
  if (!(outcomeMass[0]! + outcomeMass[1]! > 0)) throw new RangeError('makeHmmClassifier: prior sums to zero');
  const logPriorOdds = Math.log(outcomeMass[1]!) - Math.log(outcomeMass[0]!);

  let beta = new Float64Array(n);
  let next = new Float64Array(n);
  const weights = new Float64Array(n);
  const perState = new Float64Array(n);
  const perOutcome = new Float64Array(2);

  /**
   * log Σ_j A[row + j]·e^(b_j), given weights w_j = e^(b_j − top). Fast path: top + log Σ A·w.
   * When that sum underflows (the row puts no weight on the leading states and the others are
   * ~e^(−640) below them), redo the row with its own maximum over the states it can reach.
   */
  function logRowSum(a: Float64Array, row: number, b: Float64Array, top: number): number {
    let sum = 0;
    for (let j = 0; j < n; j++) sum += a[row + j]! * weights[j]!;
    if (sum > 1e-280) return top + Math.log(sum);
    let rowTop = -Infinity;
    for (let j = 0; j < n; j++) if (a[row + j]! > 0 && b[j]! > rowTop) rowTop = b[j]!;
    if (rowTop === -Infinity) return -Infinity;
    sum = 0;
    for (let j = 0; j < n; j++) if (a[row + j]! > 0) sum += a[row + j]! * Math.exp(b[j]! - rowTop);
    return rowTop + Math.log(sum);
  }

  /** Sets weights[j] = e^(b_j − max b) and returns max b. */
  function factor(b: Float64Array): number {
    let top = -Infinity;
    for (let j = 0; j < n; j++) if (b[j]! > top) top = b[j]!;
    for (let j = 0; j < n; j++) weights[j] = Math.exp(b[j]! - top);
    return top;
  }

  function stateLogLikelihoods(record: Float64Array, start: number, length: number, out: Float64Array): Float64Array {
    if (length <= 0) {
      out.fill(0, 0, n);
      return out;
    }
    // Last bin: log β_{m−1}(i) = log e_i(y_{m−1}) (the common −log(σ√(2π)) is added at the end).
    let k = length - 1;
    let y = record[start + k]!;
    for (let i = 0; i < n; i++) {
      const d = y - means[i]![k]!;
      beta[i] = -d * d * inverseTwoVariance;
    }
    for (k = length - 2; k >= 0; k--) {
      const top = factor(beta);
      y = record[start + k]!;
      for (let i = 0; i < n; i++) {
        const d = y - means[i]![k]!;
        next[i] = logRowSum(transition, i * n, beta, top) - d * d * inverseTwoVariance;
      }
      const t = beta;
      beta = next;
      next = t;
    }
    const constant = length * logNormaliser;
    if (firstStep === null) {
      for (let s = 0; s < n; s++) out[s] = beta[s]! + constant;
      return out;
    }
    const top = factor(beta);
    for (let s = 0; s < n; s++) out[s] = logRowSum(firstStep, s * n, beta, top) + constant;
    return out;
  }

  function outcomeLogLikelihoods(record: Float64Array, start: number, length: number, out: Float64Array): Float64Array {
    stateLogLikelihoods(record, start, length, perState);
    let l0 = -Infinity;
    let l1 = -Infinity;
    for (let s = 0; s < n; s++) {
      const v = perState[s]! + logWeightInOutcome[s]!;
      if (outcomeOfState[s] === 1) l1 = logAddExp(l1, v);
      else l0 = logAddExp(l0, v);
    }
    out[0] = l0;
    out[1] = l1;
    return out;
  }

  function logLikelihoodRatio(record: Float64Array, start: number, length: number): number {
    outcomeLogLikelihoods(record, start, length, perOutcome);
    return perOutcome[1]! - perOutcome[0]! + logPriorOdds;
  }

  return { states: n, maxLength, stateLogLikelihoods, outcomeLogLikelihoods, logLikelihoodRatio };
}
