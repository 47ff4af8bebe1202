import { describe, expect, it } from 'vitest';
import { mcnemarExact } from '../../src/analysis/mcnemar.ts';
import { makeHmmClassifier } from '../../src/classify/likelihood.ts';
import { classifyByThreshold, optimalThreshold } from '../../src/classify/threshold.ts';
import { generatorMatrix, transitionMatrix } from '../../src/classify/transition.ts';
import { makeSeededSource } from './seeded-normal.ts';

// Strong relaxation: T1 is half the window. Records are simulated exactly at the bin level: the
// excited state decays at an exponential time t_d, each bin's mean is the time-average of the level
// over the bin (the ramp in the bin holding the jump is kept — the classifier's model ignores it),
// plus white Gaussian noise of σ per bin.
const bins = 50;
const dt = 20e-9; // s
const t1 = 0.5 * bins * dt; // 0.5 µs against a 1 µs window
const level0 = 0;
const level1 = 1;
const sigma = 1; // per bin: boxcar SNR over the whole window without decay would be √50 ≈ 7.1
const shotsPerState = 4000;

describe(`HMM classifier vs best boxcar under strong relaxation (T1 = window/2, ${shotsPerState} shots per state, seed "strong relaxation")`, () => {
  const source = makeSeededSource('strong relaxation');
  const total = 2 * shotsPerState;
  const records = new Float64Array(total * bins);
  const truth = new Uint8Array(total);
  for (let r = 0; r < total; r++) {
    const state = r < shotsPerState ? 0 : 1;
    truth[r] = state;
    const decay = state === 1 ? source.exponential(t1) : 0;
    for (let k = 0; k < bins; k++) {
      const excitedFraction = state === 1 ? Math.min(1, Math.max(0, (decay - k * dt) / dt)) : 0;
      records[r * bins + k] = level0 + (level1 - level0) * excitedFraction + sigma * source.normal();
    }
  }

  // HMM: the state at window start is asked; each bin shows the state at its centre.
  const q = generatorMatrix(2, [{ from: 1, to: 0, rate: 1 / t1 }]);
  const hmm = makeHmmClassifier({
    means: [new Float64Array(bins).fill(level0), new Float64Array(bins).fill(level1)],
    sigma,
    transition: transitionMatrix(q, 2, dt),
    firstStep: transitionMatrix(q, 2, dt / 2),
    prior: Float64Array.of(0.5, 0.5),
    outcomeOfState: Uint8Array.of(0, 1),
  });
  const hmmWrong = new Uint8Array(total);
  let hmmErrors = 0;
  for (let r = 0; r < total; r++) {
    const outcome = hmm.logLikelihoodRatio(records, r * bins, bins) > 0 ? 1 : 0;
    hmmWrong[r] = outcome === truth[r] ? 0 : 1;
    hmmErrors += hmmWrong[r]!;
  }

  // Boxcar from the window start, length and threshold both chosen to minimise the error on these
  // very records (in-sample, which favours the boxcar).
  const prefix = new Float64Array(total * (bins + 1));
  for (let r = 0; r < total; r++) {
    for (let k = 0; k < bins; k++) prefix[r * (bins + 1) + k + 1] = prefix[r * (bins + 1) + k]! + records[r * bins + k]!;
  }
  const values = new Float64Array(total);
  const boxcarAt = (length: number): void => {
    for (let r = 0; r < total; r++) values[r] = prefix[r * (bins + 1) + length]! / length;
  };
  let bestLength = 1;
  let bestErrors = Infinity;
  for (let length = 1; length <= bins; length++) {
    boxcarAt(length);
    const rule = optimalThreshold(values.subarray(0, shotsPerState), values.subarray(shotsPerState));
    if (rule.errors < bestErrors) {
      bestErrors = rule.errors;
      bestLength = length;
    }
  }
  boxcarAt(bestLength);
  const rule = optimalThreshold(values.subarray(0, shotsPerState), values.subarray(shotsPerState));
  let onlyHmmWrong = 0; // b
  let onlyBoxcarWrong = 0; // c
  for (let r = 0; r < total; r++) {
    const boxcarWrong = classifyByThreshold(values[r]!, rule.threshold, rule.highIsOne) === truth[r] ? 0 : 1;
    if (hmmWrong[r] === 1 && boxcarWrong === 0) onlyHmmWrong++;
    if (hmmWrong[r] === 0 && boxcarWrong === 1) onlyBoxcarWrong++;
  }
  const summary =
    `HMM errors ${hmmErrors}/${total}, best boxcar (${bestLength} bins) errors ${rule.errors}/${total}, ` +
    `b = ${onlyHmmWrong}, c = ${onlyBoxcarWrong}`;

  // Gambetta et al., Phys. Rev. A 76, 012325 (2007): the nonlinear filter is never worse than the
  // boxcar; D'Anjou & Coish, Phys. Rev. A 89, 012313 (2014): likelihood-ratio processing beats
  // boxcar thresholding at equal record length. Paired: b ≤ c, and the exact McNemar test
  // (McNemar, Psychometrika 12, 153 (1947)) rejects equal error rates at the 1e−6 level.
  it('makes fewer errors on the same shots (paired counts b ≤ c)', () => {
    expect(onlyHmmWrong, summary).toBeLessThanOrEqual(onlyBoxcarWrong);
    expect(hmmErrors, summary).toBeLessThanOrEqual(rule.errors);
  });

  it('the difference is significant (exact McNemar p < 1e-6)', () => {
    const p = mcnemarExact(onlyHmmWrong, onlyBoxcarWrong);
    expect(p, `${summary}, p = ${p}`).toBeLessThan(1e-6);
  });

  it('the boxcar optimum is an interior window (relaxation makes the full window worse)', () => {
    // Common practice, no source: with finite T1 the error-minimising window is shorter than the record.
    expect(bestLength, summary).toBeLessThan(bins);
    expect(bestLength, summary).toBeGreaterThan(1);
  });
});
