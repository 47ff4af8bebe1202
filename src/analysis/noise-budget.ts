/**
 * The analytic budget with the predicted noise (noise-prediction.ts) instead of white noise alone.
 *
 * Gaussian sources (white, 1/f, quantisation) add their variances. A two-level source (a kind that
 * gives its `twoLevel` shape: a fluctuator) is not Gaussian: when it rarely switches during the window (λ·τ < SLOW_FLUCTUATOR), a shot sees it in
 * one state or the other, so the integrated value is a mixture: configuration c of the slow
 * fluctuators (probability Π π^s(1 − π)^(1−s)) shifts every mean by o_c = Σ_f s_f·a_f·ΣK_f (K_f
 * the kernel seen from its injection point). The budget is then the mixture of the Barthel budgets
 * (analysis/budget.ts) with the Gaussian σ, one per configuration, each with the threshold moved by
 * −o_c — exact for fluctuators that never switch in the window (the switching shots, a fraction
 * ≈ 2π(1 − π)·λτ, are neglected). A fast fluctuator averages over many switches: it is taken as
 * Gaussian, with its variance, and its mean offset a·π·ΣK_f shifts every configuration.
 */
import { analyticBudget, type Budget, type BudgetInput } from './budget.ts';
import type { NoisePlan } from '../signal/noise-plan.ts';
import { predictNoise, seenFrom, type NoisePrediction } from './noise-prediction.ts';

/** Below this λ·τ a fluctuator is a discrete mixture in the budget; above it, Gaussian. */
export const SLOW_FLUCTUATOR = 0.05;
/** Most fluctuators enumerated as a mixture (2^8 configurations); further ones count as Gaussian. */
const MAX_MIXED = 8;

/** The value's noise as a Gaussian part plus discrete offsets with weights. */
export interface NoiseMixture {
  prediction: NoisePrediction;
  /** Variance of the Gaussian part. */
  gaussianVariance: number;
  /** Offsets of the noise-free value and their probabilities (sum 1). */
  components: { weight: number; offset: number }[];
}

/** Splits the predicted noise of Σ kernel·record into its Gaussian part and a fluctuator mixture. */
export function noiseMixture(plan: NoisePlan, kernel: Float64Array, lo: number, hi: number, sampleRate: number): NoiseMixture {
  const prediction = predictNoise(plan, kernel, lo, hi, sampleRate);
  let gaussianVariance = prediction.variance;
  let shift = 0;
  let components = [{ weight: 1, offset: 0 }];
  const window = (hi - lo) / sampleRate;
  // the prediction's rows: the white sources, then each kind's sources in order
  let row = plan.white.length;
  for (const { compiled } of plan.kinds) {
    compiled.sources.forEach((info, s) => {
      const variance = prediction.sources[row++]!.variance;
      if (!compiled.twoLevel) return;
      // each independent realisation is a fluctuator of its own (one per channel on the amplifier side of baseband I and Q)
      const seen = seenFrom(plan, info.injection, kernel, lo, hi);
      for (const x of seen) {
        const { probability: p, step, switchingRate } = compiled.twoLevel(s, x, lo, hi);
        const slow = switchingRate * window < SLOW_FLUCTUATOR && components.length < 2 ** MAX_MIXED;
        if (!slow) {
          shift += step * p;
          continue;
        }
        gaussianVariance -= seen.length === 1 ? variance : compiled.variance(s, x, lo, hi, sampleRate);
        components = components.flatMap((c) => [
          { weight: c.weight * (1 - p), offset: c.offset },
          { weight: c.weight * p, offset: c.offset + step },
        ]).filter((c) => c.weight > 0);
      }
    });
  }
  return {
    prediction, gaussianVariance: Math.max(0, gaussianVariance),
    components: components.map((c) => ({ weight: c.weight, offset: c.offset + shift })),
  };
}

/** The analytic budget under the point's noise: the mixture of Barthel budgets, σ the predicted total. */
export function budgetWithNoise(input: Omit<BudgetInput, 'noiseVariance'>, plan: NoisePlan): Budget {
  const mixture = noiseMixture(plan, input.kernel, input.lo, input.hi, input.sampleRate);
  const chain = { response: plan.response, channels: plan.channels };
  const parts = mixture.components.map((c) => ({
    weight: c.weight,
    budget: analyticBudget({ ...input, ...chain, noiseVariance: mixture.gaussianVariance, threshold: input.threshold - c.offset }),
  }));
  if (parts.length === 1 && mixture.components[0]!.offset === 0) {
    // Gaussian noise only: the plain budget with the total variance
    return analyticBudget({ ...input, ...chain, noiseVariance: mixture.prediction.variance });
  }
  const first = parts[0]!.budget;
  const blend = (pick: (b: Budget) => Float64Array | number): Float64Array | number => {
    const x = pick(first);
    if (typeof x === 'number') return parts.reduce((a, p) => a + p.weight * (pick(p.budget) as number), 0);
    const out = new Float64Array(x.length);
    for (const p of parts) {
      const y = pick(p.budget) as Float64Array;
      for (let j = 0; j < out.length; j++) out[j] += p.weight * y[j]!;
    }
    return out;
  };
  const state = (s: number | 'mean') => {
    const get = (b: Budget) => (s === 'mean' ? b.mean : b.perState[s]!);
    return {
      causes: blend((b) => get(b).causes) as Float64Array,
      total: blend((b) => get(b).total) as number,
      linearSum: blend((b) => get(b).linearSum) as number,
      alone: blend((b) => get(b).alone) as Float64Array,
    };
  };
  const meanOffset = mixture.components.reduce((a, c) => a + c.weight * c.offset, 0);
  const sigma = mixture.prediction.sigma;
  return {
    means: first.means.map((m) => m + meanOffset),
    sigma,
    separation: first.separation,
    snr: sigma > 0 ? first.separation / sigma : Infinity,
    perState: first.perState.map((_, s) => state(s)),
    mean: state('mean'),
  };
}
