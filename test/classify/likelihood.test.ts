import { describe, expect, it } from 'vitest';
import { makeHmmClassifier, type HmmClassifierSpec } from '../../src/classify/likelihood.ts';
import { generatorMatrix, transitionMatrix } from '../../src/classify/transition.ts';
import { makeSeededSource } from './seeded-normal.ts';

function constantMeans(levels: number[], bins: number): Float64Array[] {
  return levels.map((level) => new Float64Array(bins).fill(level));
}

function close(label: string, actual: number, expected: number, tolerance: number): void {
  const delta = Math.abs(actual - expected);
  if (!(delta <= tolerance)) {
    throw new Error(`${label}: actual ${actual}, expected ${expected}, Δ ${delta}, tol ${tolerance}`);
  }
}

describe('HMM classifier with zero rates', () => {
  // With T = I the state never changes, so P(y | s) = Π_k N(y_k; μ_s, σ²) and
  // log P(1|y) − log P(0|y) = log(π1/π0) + Σ_k [(y_k − μ0)² − (y_k − μ1)²]/(2σ²)
  //                         = log(π1/π0) + m·(μ1 − μ0)·(ȳ − (μ0 + μ1)/2)/σ²,
  // which is the Gaussian likelihood ratio of the record mean ȳ ~ N(μ_s, σ²/m): the boxcar is
  // sufficient without relaxation (derived here; Gambetta et al., Phys. Rev. A 76, 012325 (2007),
  // boxcar optimal for T1 → ∞).
  it.each([
    // [name, mu0, mu1, sigma, bins, prior1]
    ['equal priors, 40 bins', 0, 1, 1.5, 40, 0.5],
    ['unequal priors, 1 bin', -0.3, 0.8, 0.4, 1, 0.2],
    ['inverted levels, 200 bins', 2e-9, -1e-9, 3e-9, 200, 0.7],
    ['large per-bin SNR, 10 bins', 0, 50, 1, 10, 0.5],
  ])('%s: equals the closed form of the record mean', (name, mu0, mu1, sigma, bins, prior1) => {
    const spec: HmmClassifierSpec = {
      means: constantMeans([mu0, mu1], bins),
      sigma,
      transition: transitionMatrix(generatorMatrix(2, []), 2, 1e-8),
      prior: Float64Array.of(1 - prior1, prior1),
      outcomeOfState: Uint8Array.of(0, 1),
    };
    const classifier = makeHmmClassifier(spec);
    const source = makeSeededSource(`zero-rates ${name}`);
    const record = new Float64Array(bins);
    const perState = new Float64Array(2);
    for (let shot = 0; shot < 20; shot++) {
      const level = shot % 2 === 0 ? mu0 : mu1;
      let sum = 0;
      let scale = 1;
      const logDensity = [0, 0];
      for (let k = 0; k < bins; k++) {
        record[k] = level + sigma * source.normal();
        sum += record[k]!;
        for (let s = 0; s < 2; s++) {
          const z = (record[k]! - (s === 0 ? mu0 : mu1)) / sigma;
          logDensity[s]! += -0.5 * z * z - 0.5 * Math.log(2 * Math.PI) - Math.log(sigma);
          scale += 0.5 * z * z;
        }
      }
      const mean = sum / bins;
      const expected = Math.log(prior1 / (1 - prior1)) + (bins * (mu1 - mu0) * (mean - 0.5 * (mu0 + mu1))) / (sigma * sigma);
      // Roundoff only: a few ulps of the summed squared residuals.
      const tolerance = 1e-13 * scale;
      close(`${name} shot ${shot} LLR`, classifier.logLikelihoodRatio(record, 0, bins), expected, tolerance);
      classifier.stateLogLikelihoods(record, 0, bins, perState);
      close(`${name} shot ${shot} log P(y|0)`, perState[0]!, logDensity[0]!, tolerance);
      close(`${name} shot ${shot} log P(y|1)`, perState[1]!, logDensity[1]!, tolerance);
    }
  });
});

describe('HMM classifier against a direct sum over all paths', () => {
  // Definition of the HMM likelihood: P(y | x_start = s) = Σ over paths x_0..x_{m−1} of
  // F[s, x_0]·Π_k N(y_k; μ_{x_k}[k], σ²)·Π_k T[x_k, x_{k+1}] (Rabiner, Proc. IEEE 77, 257 (1989),
  // eq. 17), enumerated here for 3 states and 5 bins (243 paths).
  const n = 3;
  const bins = 5;
  const source = makeSeededSource('brute force');
  const randomStochastic = (): Float64Array => {
    const m = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      let sum = 0;
      for (let j = 0; j < n; j++) sum += m[i * n + j] = 0.05 + source.uniform();
      for (let j = 0; j < n; j++) m[i * n + j]! /= sum;
    }
    return m;
  };
  const transition = randomStochastic();
  const firstStep = randomStochastic();
  const means = Array.from({ length: n }, () => Float64Array.from({ length: bins }, () => 2 * source.normal()));
  const sigma = 0.9;
  const prior = Float64Array.of(0.5, 0.3, 0.2);
  const outcomeOfState = Uint8Array.of(0, 1, 1);
  const classifier = makeHmmClassifier({ means, sigma, transition, prior, outcomeOfState, firstStep });

  const gaussian = (y: number, mu: number): number =>
    Math.exp(-0.5 * ((y - mu) / sigma) ** 2) / (sigma * Math.sqrt(2 * Math.PI));

  function bruteForce(record: Float64Array, start: number): number[] {
    const result = [0, 0, 0];
    const path = new Array<number>(bins).fill(0);
    for (let code = 0; code < n ** bins; code++) {
      let c = code;
      for (let k = 0; k < bins; k++) {
        path[k] = c % n;
        c = Math.floor(c / n);
      }
      let weight = 1;
      for (let k = 0; k < bins; k++) {
        weight *= gaussian(record[start + k]!, means[path[k]!]![k]!);
        if (k + 1 < bins) weight *= transition[path[k]! * n + path[k + 1]!]!;
      }
      for (let s = 0; s < n; s++) result[s]! += firstStep[s * n + path[0]!]! * weight;
    }
    return result;
  }

  it.each([0, 1, 2, 3, 4, 5])('record %i (embedded at offset 7 in a longer array)', (index) => {
    const record = new Float64Array(7 + bins + 3);
    for (let k = 0; k < record.length; k++) record[k] = 2 * source.normal() + index * 0.1;
    const expected = bruteForce(record, 7);
    const perState = classifier.stateLogLikelihoods(record, 7, bins, new Float64Array(n));
    for (let s = 0; s < n; s++) close(`record ${index} state ${s}`, perState[s]!, Math.log(expected[s]!), 1e-12);

    const l0 = expected[0]!;
    const l1 = (0.3 * expected[1]! + 0.2 * expected[2]!) / 0.5;
    const perOutcome = classifier.outcomeLogLikelihoods(record, 7, bins, new Float64Array(2));
    close(`record ${index} log P(y|0)`, perOutcome[0]!, Math.log(l0), 1e-12);
    close(`record ${index} log P(y|1)`, perOutcome[1]!, Math.log(l1), 1e-12);
    const llr = classifier.logLikelihoodRatio(record, 7, bins);
    close(`record ${index} LLR`, llr, Math.log((0.5 * l1) / (0.5 * l0)), 1e-12);
    // Same answer on a fresh copy at offset 0, and on a repeated call (scratch is reset).
    expect(classifier.logLikelihoodRatio(record.slice(7, 7 + bins), 0, bins)).toBe(llr);
    expect(classifier.logLikelihoodRatio(record, 7, bins)).toBe(llr);
  });

  it('a shorter window uses the first bins of the means', () => {
    const record = Float64Array.of(0.3, -1.2, 0.7);
    const short = makeHmmClassifier({ means: means.map((m) => m.slice(0, 3)), sigma, transition, prior, outcomeOfState, firstStep });
    expect(classifier.logLikelihoodRatio(record, 0, 3)).toBe(short.logLikelihoodRatio(record, 0, 3));
    expect(classifier.maxLength).toBe(bins);
  });
});

describe('makeHmmClassifier validation', () => {
  const base = (): HmmClassifierSpec => ({
    means: constantMeans([0, 1], 4),
    sigma: 1,
    transition: Float64Array.of(1, 0, 0, 1),
    prior: Float64Array.of(0.5, 0.5),
    outcomeOfState: Uint8Array.of(0, 1),
  });
  it.each([
    ['transition of the wrong size', { transition: new Float64Array(3) }],
    ['firstStep of the wrong size', { firstStep: new Float64Array(9) }],
    ['prior of the wrong size', { prior: Float64Array.of(1) }],
    ['zero sigma', { sigma: 0 }],
    ['outcome label 2', { outcomeOfState: Uint8Array.of(0, 2) }],
    ['negative prior', { prior: Float64Array.of(1.5, -0.5) }],
    ['all-zero prior', { prior: Float64Array.of(0, 0) }],
  ] as const)('rejects %s', (_name, change) => {
    expect(() => makeHmmClassifier({ ...base(), ...change })).toThrow(RangeError);
  });

  it('a zero prior on outcome 0 gives +Infinity', () => {
    const c = makeHmmClassifier({ ...base(), prior: Float64Array.of(0, 1) });
    expect(c.logLikelihoodRatio(Float64Array.of(0, 0, 0, 0), 0, 4)).toBe(Infinity);
  });
});
