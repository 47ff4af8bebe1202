/**
 * The machine-readable result of a run (`singleshot run --json`): one object with a `points`
 * array, one entry per sweep point and pipeline. Every dimensioned number has a sibling field
 * naming its SI unit, `<field>Unit` ('' for a plain number or a dimensionless statistic), and
 * the swept values' units are in `parameterUnits`, keyed like `parameters`.
 */
import type { RunResult } from '../run/run-points.ts';
import type { SweepSpec } from '../scenario/types.ts';
import { parameterUnits, statisticUnit } from './result-units.ts';
import type { RateInterval } from '../analysis/intervals.ts';
import type { NoisePrediction } from '../analysis/noise-prediction.ts';

const interval = (r: RateInterval) => ({ rate: r.rate, low: r.low, high: r.high });

/**
 * JSON-ready object; NaN and ±∞ become null (JSON has no such numbers). `sweep` (the scenario's
 * sweep section) gives the units of the swept values.
 */
export function resultToJson(result: RunResult, extra: Record<string, unknown> = {}, sweep?: SweepSpec): Record<string, unknown> {
  const units = parameterUnits(sweep);
  const unitsOf = (parameters: Record<string, number>) => Object.fromEntries(Object.keys(parameters).map((k) => [k, units[k] ?? null]));
  const points = result.points.flatMap((p) => p.summaries.map((s, i) => ({
    point: p.index,
    parameters: p.parameters,
    parameterUnits: unitsOf(p.parameters),
    pipeline: s.pipeline,
    shots: s.shots,
    errorByState: Object.fromEntries(s.states.map((st) => [st.state, { ...interval(st.error), shots: st.shots, errors: st.errors }])),
    meanError: interval(s.meanError),
    visibility: s.visibility,
    analyticVisibility: s.analyticVisibility,
    snr: s.snr,
    analyticSnr: s.analyticSnr,
    snrConvention: 'separation / standard deviation of the integrated value (amplitude SNR)',
    sigma: s.sigma,
    sigmaUnit: statisticUnit(p, i),
    analyticSigma: s.analyticSigma,
    analyticSigmaUnit: statisticUnit(p, i),
    valueByOutcome: Object.fromEntries(p.compiled.scenario.outcomes.map((o, j) => [o, s.outcomeValues[j] ?? null])),
    valueByOutcomeUnit: p.compiled.scenario.signal.unit,
    ...noiseJson(p.noise[i] ?? null, p.compiled.scenario.signal.unit),
    ...(p.clippedSamples !== undefined ? { clippedSamples: p.clippedSamples } : {}),
    threshold: s.threshold,
    thresholdUnit: statisticUnit(p, i),
    discardFraction: s.discardFraction,
    ...(s.banded ? {
      ambiguousBand: {
        discarded: s.discarded, discardFraction: s.discardFraction,
        postSelectedError: interval(s.postSelectedError),
        discardsAsFailuresError: interval(s.discardsAsFailuresError),
        note: 'meanError, budget and comparisons are of the plain decision (no discards)',
      },
    } : {}),
    budget: {
      ...Object.fromEntries(s.meanCauses.map((c) => [c.cause, c.analytic])),
      total: s.analyticMean,
      linearSum: s.analyticLinearSum,
    },
    simulatedByCause: Object.fromEntries(s.meanCauses.map((c) => [c.cause, { ...interval(c.simulated), agrees: c.agrees }])),
    budgetByState: Object.fromEntries(s.states.map((st) => [st.state, {
      ...Object.fromEntries(st.causes.map((c) => [c.cause, c.analytic])), total: st.analyticTotal, linearSum: st.linearSum,
    }])),
    agreement: s.agreement,
  })));
  const comparisons = result.points.flatMap((p) => p.comparisons.map((c) => ({
    point: p.index, parameters: p.parameters, parameterUnits: unitsOf(p.parameters), a: c.a, b: c.b, shots: c.shots,
    bothWrong: c.bothWrong, onlyAWrong: c.onlyAWrong, onlyBWrong: c.onlyBWrong,
    errorA: c.errorA, errorB: c.errorB,
    difference: { value: c.difference, low: c.low, high: c.high, confidence: c.confidence },
    mcnemarP: c.pValue,
  })));
  return JSON.parse(JSON.stringify({ engine: result.engine, engineReason: result.engineReason, ...extra, points, comparisons }, (_k, v) =>
    typeof v === 'number' && !Number.isFinite(v) ? null : v));
}

/** The `--json` fields of one pipeline's noise: predictedSigma by source and total, and the budget list. */
function noiseJson(prediction: NoisePrediction | null, unit: string): Record<string, unknown> {
  if (!prediction) return {};
  return {
    predictedSigma: { ...Object.fromEntries(prediction.sources.map((s) => [s.name, s.sigma])), total: prediction.sigma },
    predictedSigmaUnit: unit,
    noiseBudget: prediction.sources.map((s) => ({
      source: s.name, kind: s.kind, injection: s.injection,
      density: s.density,
      ...densityUnit(s.densityUnit, unit),
      origin: s.origin, sigma: s.sigma, sigmaUnit: unit, variance: s.variance, varianceUnit: unit ? `${unit}^2` : '', share: s.share,
    })),
  };
}

/**
 * A noise kind's density unit (`{unit}/√Hz at 1 Hz`) as a unit in the tables' notation
 * (`A/rtHz`, '' for a plain number) and, apart, where the density is given (`densityAt`).
 */
function densityUnit(template: string, unit: string): { densityUnit: string; densityAt?: string } {
  const [, what, at] = /^(.*?)(?: at (.+))?$/.exec(template)!;
  const u = what!.replace('{unit}', unit || '1').replace('√Hz', 'rtHz');
  return { densityUnit: u === '1' ? '' : u, ...(at ? { densityAt: at } : {}) };
}
