/**
 * The likelihood classifier: the posterior log-odds of the hidden-Markov model of the decimated
 * record (likelihood.ts; D'Anjou & Coish, Phys. Rev. A 89, 012313 (2014)), decided at 0.
 *
 * Its model is learned from the calibration records (hmm-learning.ts, Baum–Welch): with the
 * simulated device, each state's mean record through the chain is the shape, the data give its
 * offset and the noise σ, and the per-bin transition matrix exp(Q·D/fs) and the prior at the
 * window start (the prepared mixture after preparation and mapping errors, propagated from the
 * record start) come from the device; from recorded traces alone (analyze), two constant levels,
 * σ, the transitions and each label's starting states are all learned. The model is saved with
 * the calibration. It has no closed-form budget.
 */
import type { Scenario } from '../scenario/types.ts';
import { ScenarioProblem } from '../errors.ts';
import { makeProcessScratch, processRecord } from '../dsp/process-record.ts';
import type { PipelineChain } from '../dsp/pipeline-chain.ts';
import type { ClassifierKind, DeviceView } from './contract.ts';
import type { CalibrationRecords } from './calibrate-records.ts';
import { learnHmm } from './hmm-learning.ts';
import { makeHmmClassifier, type HmmClassifierSpec } from './likelihood.ts';
import { generatorMatrix, transitionMatrix } from './transition.ts';
import { matrixExponential } from './matrix-exponential.ts';
import { projectRecords, type Axis } from './project.ts';

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
  signalUnitStatistic: false,
  refuses: {
    threshold: 'it decides by the sign of the log-odds',
    weights: 'it reads every bin',
    bandWidth: 'the likelihood classifier has no signal-unit statistic',
  },
  exactBlocker: 'the likelihood classifier is not linear in the record',
  needsDevice: null,
  needsNoise: 'the likelihood classifier divides by the noise σ per bin',

  fit(r, chain, axis, device) {
    return device ? fitWithDevice(r, chain, axis, device) : fitFromRecords(r);
  },

  modelProblem(model) {
    const m = model as Partial<Record<keyof HmmClassifierSpec, unknown>> | null;
    const finite = (x: unknown) => x instanceof Float64Array && x.every(Number.isFinite);
    if (m === null || typeof m !== 'object') return 'a model object';
    if (!Array.isArray(m.means) || m.means.length < 2 || !m.means.every(finite)) return 'finite means of every state';
    if (!(m.transition instanceof Float64Array) || !(m.prior instanceof Float64Array) || !(m.outcomeOfState instanceof Uint8Array)) return 'transition, prior and outcomeOfState arrays';
    try {
      makeHmmClassifier(m as HmmClassifierSpec);
    } catch (e) {
      return (e as Error).message.replace(/^makeHmmClassifier: /, '');
    }
    return null;
  },

  statistic(model) {
    const hmm = makeHmmClassifier(model);
    return (bins, offset, count) => hmm.logLikelihoodRatio(bins, offset, count);
  },

  // the posterior log-odds: outcome 1 above 0
  rule: () => ({ threshold: 0, highIsOne: true }),

  budget: () => null,
};

/** Iterations of the learning (each a forward–backward pass over the calibration records). */
const LEARNING_ITERATIONS = 30;

/**
 * The model from the device and the data: the device gives each state's mean record through the
 * chain, the chain's rates and the prior; the calibration records give each state's offset from
 * that mean and the noise σ (hmm-learning.ts), so that a constant offset of the record, or levels
 * the model has wrong, do not bias the decision.
 */
function fitWithDevice(r: CalibrationRecords, chain: PipelineChain, axis: Axis, device: DeviceView): HmmClassifierSpec {
  const { scenario, grid } = device;
  const n = scenario.states.length;
  const scratch = makeProcessScratch(chain, grid.samples);
  const binsI = new Float64Array(chain.bins);
  const binsQ = chain.reference ? new Float64Array(chain.bins) : null;
  const shapes = device.waveforms.map((w) => {
    processRecord(chain, w, scratch, binsI, binsQ, 0);
    return projectRecords(binsI, binsQ, axis, new Float64Array(chain.bins));
  });
  // the starting σ: the clean shots' residuals about the device's means
  let sum = 0, count = 0;
  for (let i = 0; i < r.count; i++) {
    const s = r.cleanState[i]!;
    if (s === 255) continue;
    const base = i * r.bins;
    for (let b = 0; b < r.bins; b++) sum += (r.projected[base + b]! - shapes[s]![b]!) ** 2;
    count += r.bins;
  }
  if (count === 0) throw new ScenarioProblem(['calibrationShots'], 'clean calibration shots to estimate the noise per bin from (raise calibrationShots)', 'none');
  const rates = scenario.transitions.map((t) => ({ from: t.from, to: t.to, rate: t.rate }));
  const generator = generatorMatrix(n, rates);
  const transition = transitionMatrix(generator, n, chain.binDuration);
  // prior at the window start: π(0)·exp(Q·t_start), overall and for each prepared outcome
  const toWindow = new Float64Array(n * n);
  matrixExponential(Float64Array.from(generator, (q) => q * (chain.windowLo / grid.sampleRate)), n, toWindow);
  const atWindow = (start: Float64Array) => {
    const p = new Float64Array(n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) p[j]! += start[i]! * Math.max(0, toWindow[i * n + j]!);
    return p;
  };
  const byLabel = [0, 1].map((o) => {
    const p = atWindow(initialMixture({ ...scenario, prepare: scenario.prepare.map((w, s) => (scenario.states[s]!.outcome === o ? w : 0)) }));
    const total = p.reduce((x, y) => x + y, 0);
    return total > 0 ? p.map((x) => x / total) : p;
  }) as [Float64Array, Float64Array];
  const learned = learnHmm(r, {
    shapes, offsets: shapes.map(() => 0), sigma: Math.sqrt(sum / count), transition, priorsByLabel: byLabel,
    learnTransitions: false, learnPriors: false, iterations: LEARNING_ITERATIONS,
  });
  return {
    means: learned.means, sigma: learned.sigma, transition, prior: atWindow(initialMixture(scenario)),
    outcomeOfState: Uint8Array.from(scenario.states, (s) => s.outcome),
  };
}

/**
 * The model from recorded traces alone: two states, one per outcome, each a constant level; the
 * levels, σ, the per-bin transitions and each label's starting states all learned
 * (hmm-learning.ts), started from the labels' means, a slow decay of the upper state and few
 * preparation errors.
 */
function fitFromRecords(r: CalibrationRecords): HmmClassifierSpec {
  const m = r.bins;
  const sums = [0, 0], counts = [0, 0];
  for (let i = 0; i < r.count; i++) {
    const o = r.outcome[i]!;
    // outcome 1's early bins, before most decays
    const bins = o === 1 ? Math.max(1, Math.ceil(m / 4)) : m;
    for (let b = 0; b < bins; b++) sums[o] += r.projected[i * m + b]!;
    counts[o] += bins;
  }
  if (counts[0] === 0 || counts[1] === 0) throw new Error('the likelihood classifier needs calibration records of both outcomes');
  const levels = [sums[0]! / counts[0]!, sums[1]! / counts[1]!];
  let square = 0;
  for (let i = 0; i < r.count; i++) for (let b = 0; b < m; b++) square += (r.projected[i * m + b]! - levels[r.outcome[i]!]!) ** 2;
  const zero = new Float64Array(m);
  const decay = Math.min(0.5, 0.1 / m);
  const learned = learnHmm(r, {
    shapes: [zero, zero], offsets: levels, sigma: Math.sqrt(square / (r.count * m)),
    transition: Float64Array.of(1 - 1e-4, 1e-4, decay, 1 - decay),
    priorsByLabel: [Float64Array.of(0.98, 0.02), Float64Array.of(0.02, 0.98)],
    learnTransitions: true, learnPriors: true, iterations: 3 * LEARNING_ITERATIONS,
  });
  let n0 = 0;
  for (let i = 0; i < r.count; i++) n0 += r.outcome[i] === 0 ? 1 : 0;
  const w0 = n0 / r.count;
  const prior = Float64Array.from([0, 1], (s) => w0 * learned.priorsByLabel[0][s]! + (1 - w0) * learned.priorsByLabel[1][s]!);
  return { means: learned.means, sigma: learned.sigma, transition: learned.transition, prior, outcomeOfState: Uint8Array.of(0, 1) };
}
