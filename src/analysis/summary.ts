/**
 * The per-point result a user reads: error per state with intervals, the mean error, the
 * visibility, SNR (simulated from clean shots, and analytic), and the budget compared cause by cause.
 */
import { CAUSES, CAUSE_NONE } from './causes.ts';
import { wilsonInterval, type RateInterval } from './intervals.ts';
import { shotsOf, type Tally } from './tally.ts';
import type { Budget } from './budget.ts';

/** Confidence of the intervals shown to the user. */
export const REPORT_CONFIDENCE = 0.95;
/** Confidence of the interval the analytic value must fall in to count as agreeing. */
export const AGREEMENT_CONFIDENCE = 0.999;

export interface CauseComparison {
  cause: string;
  analytic: number;
  /** Analytic error of this cause taken alone (for the linear sum). */
  alone: number;
  simulated: RateInterval;
  /** 99.9 % interval used for the agreement test. */
  wide: RateInterval;
  errors: number;
  agrees: boolean;
}

export interface StateResult {
  state: string;
  shots: number;
  errors: number;
  error: RateInterval;
  /** assignment[o]: fraction of this state's shots reported as outcome o. */
  assignment: number[];
  causes: CauseComparison[];
  analyticTotal: number;
  linearSum: number;
  agrees: boolean;
}

export interface PointSummary {
  pipeline: string;
  shots: number;
  states: StateResult[];
  meanError: RateInterval;
  meanErrors: number;
  meanCauses: CauseComparison[];
  analyticMean: number;
  analyticLinearSum: number;
  /** separation/σ from clean simulated shots. */
  snr: number;
  sigma: number;
  /** Per outcome: centre and spread of the integrated value (ValueSpread). */
  outcomeValues: { mean: number; sigma: number }[];
  analyticSnr: number;
  analyticSigma: number;
  threshold: number;
  highIsOne: boolean;
  /** Whether the pipeline has an ambiguous band (post-selection). */
  banded: boolean;
  /** Shots inside the band, and their fraction of all shots (0 without a band). */
  discarded: number;
  discardFraction: number;
  /** Error among the kept shots (wrong kept / kept). Equals meanError without a band. */
  postSelectedError: RateInterval;
  /** (wrong kept + discarded) / shots: discards counted as failures, never below meanError. */
  discardsAsFailuresError: RateInterval;
  /** Visibility 1 − P(0|1) − P(1|0), the errors of each prepared outcome pooled over its states, with its interval. */
  visibility: { value: number; low: number; high: number };
  /** The analytic visibility: each prepared outcome's error weighted by the prepared mixture. */
  analyticVisibility: number;
  agreement: boolean;
}

/**
 * Visibility 1 − e0 − e1 with an interval for the sum of two independent binomial rates: the
 * Wilson limits of each combined as in Newcombe's hybrid score method (Newcombe, Stat. Med. 17,
 * 873 (1998), method 10, written for a difference; for a sum the lower limit pairs both lower
 * Wilson limits and the upper limit both upper ones).
 */
export function visibilityInterval(errors: readonly [number, number], shots: readonly [number, number], confidence: number): { value: number; low: number; high: number } {
  const w = [0, 1].map((o) => wilsonInterval(errors[o]!, shots[o]!, confidence));
  const sum = w[0]!.rate + w[1]!.rate;
  const below = Math.sqrt((w[0]!.rate - w[0]!.low) ** 2 + (w[1]!.rate - w[1]!.low) ** 2);
  const above = Math.sqrt((w[0]!.high - w[0]!.rate) ** 2 + (w[1]!.high - w[1]!.rate) ** 2);
  return { value: 1 - sum, low: 1 - sum - above, high: 1 - sum + below };
}

function compare(cause: string, errors: number, shots: number, analytic: number, alone: number): CauseComparison {
  const wide = wilsonInterval(errors, shots, AGREEMENT_CONFIDENCE);
  return {
    cause, analytic, alone, errors, wide,
    simulated: wilsonInterval(errors, shots, REPORT_CONFIDENCE),
    // no analytic model (NaN, e.g. the likelihood classifier): nothing to disagree with
    agrees: shots === 0 || Number.isNaN(analytic) || (analytic >= wide.low && analytic <= wide.high),
  };
}

/**
 * Centre and spread of the integrated value per outcome, the separation of the centres and the
 * pooled σ, from which SNR = separation/σ. A run takes them from its clean shots (cleanSpread);
 * recorded traces, whose clean shots nobody knows, from robust statistics of each labelled
 * group (analysis/value-mixture-fit.ts, for app/recorded/analyze.ts).
 */
export interface ValueSpread {
  outcomes: { mean: number; sigma: number }[];
  separation: number;
  sigma: number;
}

/** The spread from a run's clean shots: each outcome's states weighted by the prepared mixture, σ pooled over every state. */
export function cleanSpread(tally: Tally, outcomeOf: readonly number[], prepare: readonly number[]): ValueSpread {
  let pooledM2 = 0, pooledDof = 0;
  const groupMean = [0, 0], groupWeight = [0, 0], groupM2 = [0, 0], groupDof = [0, 0];
  tally.clean.forEach((m, s) => {
    if (m.n < 2) return;
    const o = outcomeOf[s]!;
    pooledM2 += m.m2;
    pooledDof += m.n - 1;
    if (o > 1) return;
    const w = prepare[s]! || 1e-300;
    groupMean[o]! += w * m.mean;
    groupWeight[o]! += w;
    groupM2[o]! += m.m2;
    groupDof[o]! += m.n - 1;
  });
  const sigma = pooledDof > 0 ? Math.sqrt(pooledM2 / pooledDof) : NaN;
  const outcomes = [0, 1].map((o) => ({
    mean: groupWeight[o]! > 0 ? groupMean[o]! / groupWeight[o]! : NaN,
    sigma: groupDof[o]! > 0 ? Math.sqrt(groupM2[o]! / groupDof[o]!) : NaN,
  }));
  return { outcomes, separation: Math.abs(outcomes[1]!.mean - outcomes[0]!.mean), sigma };
}

/** Builds the summary of one pipeline at one point. */
export function summarise(
  pipeline: string, stateNames: readonly string[], outcomeOf: readonly number[], prepare: readonly number[],
  tally: Tally, budget: Budget, threshold: number, highIsOne: boolean, banded = false, valueSpread: ValueSpread | null = null,
): PointSummary {
  const C = CAUSES.length;
  const causeNames = CAUSES.filter((_, c) => c !== CAUSE_NONE && CAUSES[c] !== 'discarded');
  const states: StateResult[] = [];
  let totalShots = 0, totalErrors = 0;
  const meanCounts = new Float64Array(C);
  stateNames.forEach((name, s) => {
    const shots = shotsOf(tally, s);
    const right = tally.assignments[s * tally.outcomes + outcomeOf[s]!]!;
    const errors = shots - right;
    totalShots += shots;
    totalErrors += errors;
    const causes = causeNames.map((cause) => {
      const c = CAUSES.indexOf(cause);
      meanCounts[c] += tally.causes[s * C + c]!;
      return compare(cause, tally.causes[s * C + c]!, shots, budget.perState[s]!.causes[c]!, budget.perState[s]!.alone[c]!);
    });
    const total = compare('total', errors, shots, budget.perState[s]!.total, budget.perState[s]!.linearSum);
    states.push({
      state: name, shots, errors, error: total.simulated,
      assignment: Array.from({ length: tally.outcomes }, (_, o) => (shots > 0 ? tally.assignments[s * tally.outcomes + o]! / shots : NaN)),
      causes, analyticTotal: budget.perState[s]!.total, linearSum: budget.perState[s]!.linearSum,
      agrees: total.agrees && causes.every((c) => c.agrees),
    });
  });
  const meanCauses = causeNames.map((cause) => {
    const c = CAUSES.indexOf(cause);
    return compare(cause, meanCounts[c]!, totalShots, budget.mean.causes[c]!, budget.mean.alone[c]!);
  });
  const meanTotal = compare('total', totalErrors, totalShots, budget.mean.total, budget.mean.linearSum);
  const spread = valueSpread ?? cleanSpread(tally, outcomeOf, prepare);
  const { sigma, separation } = spread;
  // the errors of each prepared outcome: its states' shots pooled, and the analytic ones weighted by the mixture
  const outcomeErrors: [number, number] = [0, 0], outcomeShots: [number, number] = [0, 0];
  const analyticOutcome = [0, 0], outcomeWeight = [0, 0];
  states.forEach((st, s) => {
    const o = outcomeOf[s]!;
    if (o > 1) return;
    outcomeErrors[o] += st.errors;
    outcomeShots[o] += st.shots;
    const w = prepare[s]!;
    analyticOutcome[o]! += w * budget.perState[s]!.total;
    outcomeWeight[o]! += w;
  });
  const discarded = tally.discarded.reduce((a, x) => a + x, 0);
  const discardedWrong = tally.discardedWrong.reduce((a, x) => a + x, 0);
  const keptWrong = totalErrors - discardedWrong;
  return {
    pipeline, shots: totalShots, states,
    meanError: meanTotal.simulated, meanErrors: totalErrors, meanCauses,
    analyticMean: budget.mean.total, analyticLinearSum: budget.mean.linearSum,
    snr: separation / sigma, sigma, outcomeValues: spread.outcomes, analyticSnr: budget.snr, analyticSigma: budget.sigma,
    threshold, highIsOne, banded,
    discarded, discardFraction: totalShots > 0 ? discarded / totalShots : 0,
    postSelectedError: wilsonInterval(keptWrong, totalShots - discarded, REPORT_CONFIDENCE),
    discardsAsFailuresError: wilsonInterval(keptWrong + discarded, totalShots, REPORT_CONFIDENCE),
    visibility: visibilityInterval(outcomeErrors, outcomeShots, REPORT_CONFIDENCE),
    analyticVisibility: 1 - analyticOutcome[0]! / outcomeWeight[0]! - analyticOutcome[1]! / outcomeWeight[1]!,
    agreement: meanTotal.agrees && meanCauses.every((c) => c.agrees) && states.every((s) => s.agrees),
  };
}
