/**
 * The likelihood classifier: the posterior log-odds of the hidden-Markov model of the decimated
 * record (likelihood.ts; D'Anjou & Coish, Phys. Rev. A 89, 012313 (2014)), decided at 0.
 *
 * Its model, fitted at calibration: per-state bin means from the device (each state's noise-free
 * waveform through the same chain), σ per bin pooled from the clean calibration shots' residuals,
 * the per-bin transition matrix exp(Q·D/fs) from the scenario's rates, and the prior at the window
 * start from the prepared mixture after preparation and mapping errors, propagated from the
 * record start. It needs the device model, so recorded traces alone cannot calibrate it, and it
 * has no closed-form budget.
 */
import type { Scenario } from '../scenario/types.ts';
import { ScenarioProblem } from '../errors.ts';
import { makeProcessScratch, processRecord } from '../dsp/process-record.ts';
import type { ClassifierKind } from './contract.ts';
import { makeHmmClassifier, type HmmClassifierSpec } from './likelihood.ts';
import { generatorMatrix, transitionMatrix } from './transition.ts';
import { matrixExponential } from './matrix-exponential.ts';
import { projectRecords } from './project.ts';

/** Probability of each state at the record start: the prepared mixture after preparation and mapping errors. */
export function initialMixture(scenario: Pick<Scenario, 'states' | 'prepare' | 'preparationError' | 'mappingError'>): Float64Array {
  const n = scenario.states.length;
  const flip = (p: Float64Array, flips: Scenario['preparationError']): Float64Array => {
    const out = new Float64Array(n);
    for (let s = 0; s < n; s++) {
      const f = flips[s];
      if (f && f.into !== s) {
        out[s]! += p[s]! * (1 - f.probability);
        out[f.into]! += p[s]! * f.probability;
      } else out[s]! += p[s]!;
    }
    return out;
  };
  return flip(flip(Float64Array.from(scenario.prepare), scenario.preparationError), scenario.mappingError);
}

export const likelihoodClassifier: ClassifierKind<HmmClassifierSpec> = {
  name: 'likelihood',
  description: 'the likelihood ratio of the hidden-Markov model of the record',
  readsBins: true,
  refuses: {
    threshold: 'it decides by the sign of the log-odds',
    weights: 'it reads every bin',
    bandWidth: 'the likelihood classifier has no signal-unit statistic',
  },
  exactBlocker: 'the likelihood classifier is not linear in the record',
  needsDevice: 'the likelihood classifier needs the device model, which recorded traces do not carry',
  needsNoise: 'the likelihood classifier divides by the noise σ per bin',

  fit(r, chain, axis, device) {
    if (!device) throw new Error('the likelihood classifier needs the device model');
    const { scenario, grid } = device;
    const n = scenario.states.length;
    const scratch = makeProcessScratch(chain, grid.samples);
    const binsI = new Float64Array(chain.bins);
    const binsQ = chain.reference ? new Float64Array(chain.bins) : null;
    const means = device.waveforms.map((w) => {
      processRecord(chain, w, scratch, binsI, binsQ, 0);
      return projectRecords(binsI, binsQ, axis, new Float64Array(chain.bins));
    });
    let sum = 0, count = 0;
    for (let i = 0; i < r.count; i++) {
      const s = r.cleanState[i]!;
      if (s === 255) continue;
      const base = i * r.bins;
      const m = means[s]!;
      for (let b = 0; b < r.bins; b++) {
        const d = r.projected[base + b]! - m[b]!;
        sum += d * d;
      }
      count += r.bins;
    }
    if (count === 0) throw new ScenarioProblem(['calibrationShots'], 'clean calibration shots to estimate the noise per bin from (raise calibrationShots)', 'none');
    const sigma = Math.sqrt(sum / count);
    const rates = scenario.transitions.map((t) => ({ from: t.from, to: t.to, rate: t.rate }));
    const generator = generatorMatrix(n, rates);
    const transition = transitionMatrix(generator, n, chain.binDuration);
    // prior at the window start: π(0)·exp(Q·t_start)
    const start = initialMixture(scenario);
    const toWindow = new Float64Array(n * n);
    const scaled = Float64Array.from(generator, (q) => q * (chain.windowLo / grid.sampleRate));
    matrixExponential(scaled, n, toWindow);
    const prior = new Float64Array(n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) prior[j]! += start[i]! * Math.max(0, toWindow[i * n + j]!);
    return { means, sigma, transition, prior, outcomeOfState: Uint8Array.from(scenario.states, (s) => s.outcome) };
  },

  statistic(model) {
    const hmm = makeHmmClassifier(model);
    return (bins, offset, count) => hmm.logLikelihoodRatio(bins, offset, count);
  },

  // the posterior log-odds: outcome 1 above 0
  rule: () => ({ threshold: 0, highIsOne: true }),

  budget: () => null,
};
