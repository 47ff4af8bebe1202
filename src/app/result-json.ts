/**
 * The machine-readable result of a run (`singleshot run --json`): one object with a `points`
 * array, one entry per sweep point and pipeline.
 */
import type { RunResult } from '../run/run-points.ts';
import type { RateInterval } from '../analysis/intervals.ts';
import type { NoisePrediction } from '../analysis/noise-prediction.ts';

const interval = (r: RateInterval) => ({ rate: r.rate, low: r.low, high: r.high });

/** JSON-ready object; NaN and ±∞ become null (JSON has no such numbers). */
export function resultToJson(result: RunResult, extra: Record<string, unknown> = {}): Record<string, unknown> {
  const points = result.points.flatMap((p) => p.summaries.map((s, i) => ({
    point: p.index,
    parameters: p.parameters,
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
    analyticSigma: s.analyticSigma,
    ...noiseJson(p.noise[i] ?? null, p.compiled.scenario.signal.unit),
    ...(p.clippedSamples !== undefined ? { clippedSamples: p.clippedSamples } : {}),
    threshold: s.threshold,
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
    point: p.index, parameters: p.parameters, a: c.a, b: c.b, shots: c.shots,
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
  const u = unit || 'signal unit';
  return {
    predictedSigma: { ...Object.fromEntries(prediction.sources.map((s) => [s.name, s.sigma])), total: prediction.sigma },
    noiseBudget: prediction.sources.map((s) => ({
      source: s.name, kind: s.kind, injection: s.injection,
      density: s.density,
      densityUnit: s.densityUnit.replace('{unit}', u),
      origin: s.origin, sigma: s.sigma, variance: s.variance, share: s.share,
    })),
  };
}
