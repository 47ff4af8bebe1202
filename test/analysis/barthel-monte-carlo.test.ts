/**
 * Monte Carlo assignment error under white noise + relaxation against the histogram model of
 * Barthel, Reilly, Marcus, Hanson & Gossard, Phys. Rev. Lett. 103, 160503 (2009), evaluated in
 * its continuum form (src/analysis/barthel.ts) at the threshold the simulation calibrated.
 * Each case: the model's mean error (weighted by the shots actually prepared in each state) must
 * lie inside the 99.9 % Wilson interval of the simulated mean error (Wilson, J. Am. Stat. Assoc.
 * 22, 209 (1927)), whose relative half-width must be ≤ 10 %; each state's model error must lie
 * inside that state's 99.9 % interval too.
 */
import { describe, expect, it } from 'vitest';
import { barthelErrors } from '../../src/analysis/barthel.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { twoStateScenario, type TwoStateOptions } from '../support/scenarios.ts';

const cases: [string, TwoStateOptions][] = [
  ['baseband, SNR 4, T1 = 10τ', { carrier: 'none', recordLength: 2e-6, sigmaPerSample: 3.5355, t1: 20e-6, shots: 40960, seed: 101 }],
  ['baseband, SNR 6, T1 = 3τ', { carrier: 'none', recordLength: 2e-6, sigmaPerSample: 2.357, t1: 6e-6, shots: 40960, seed: 102 }],
  ['sine carrier, SNR 5, T1 = 5τ', { carrier: 'sine', recordLength: 2e-6, sigmaPerSample: 2.0, t1: 10e-6, shots: 40960, seed: 103 }],
];

describe('Monte Carlo error vs the Barthel et al. (2009) model', () => {
  it.each(cases)('%s', async (_name, options) => {
    const scenario = twoStateScenario({ sampleRate: 100e6, batchSize: 4096, ...options });
    const result = await runPoints([{ parameters: {}, scenario }]);
    const point = result.points[0]!;
    const budget = point.budgets[0]!;
    const rule = point.calibrations[0]!.rule;
    const model = barthelErrors({
      mean0: budget.means[0]!, mean1: budget.means[1]!, sigma: budget.sigma,
      window: scenario.timing.windowLength, t1: options.t1!, threshold: rule.threshold,
    });
    const summary = point.summaries[0]!;
    const [s0, s1] = summary.states as [typeof summary.states[0], typeof summary.states[0]];
    const pooled = wilsonInterval(summary.meanErrors, summary.shots, 0.999);
    const halfWidth = (pooled.high - pooled.low) / 2 / summary.meanError.rate;
    const expectedMean = (s0.shots * model.lower + s1.shots * model.upper) / summary.shots;
    expect(halfWidth, `relative half-width ${halfWidth} (errors ${summary.meanErrors}/${summary.shots})`).toBeLessThanOrEqual(0.1);
    expect(expectedMean, `model ${expectedMean} outside [${pooled.low}, ${pooled.high}]`).toBeGreaterThanOrEqual(pooled.low);
    expect(expectedMean, `model ${expectedMean} outside [${pooled.low}, ${pooled.high}]`).toBeLessThanOrEqual(pooled.high);
    for (const [st, expected] of [[s0, model.lower], [s1, model.upper]] as const) {
      const wide = wilsonInterval(st.errors, st.shots, 0.999);
      expect(expected, `${st.state}: model ${expected} outside [${wide.low}, ${wide.high}] (simulated ${st.error.rate})`).toBeGreaterThanOrEqual(wide.low);
      expect(expected, `${st.state}: model ${expected} outside [${wide.low}, ${wide.high}]`).toBeLessThanOrEqual(wide.high);
    }
  }, 60_000);
});

describe('the comparison has power', () => {
  it('a model with T1 off by a factor 2 falls outside the interval (baseband, SNR 6, T1 = 3τ)', async () => {
    const [, options] = cases[1]!;
    const scenario = twoStateScenario({ sampleRate: 100e6, batchSize: 4096, ...options });
    const point = (await runPoints([{ parameters: {}, scenario }])).points[0]!;
    const budget = point.budgets[0]!;
    const wrong = barthelErrors({
      mean0: budget.means[0]!, mean1: budget.means[1]!, sigma: budget.sigma,
      window: scenario.timing.windowLength, t1: options.t1! / 2, threshold: point.calibrations[0]!.rule.threshold,
    });
    const s1 = point.summaries[0]!.states[1]!;
    const wide = wilsonInterval(s1.errors, s1.shots, 0.999);
    expect(wrong.upper > wide.high || wrong.upper < wide.low, `T1/2 model ${wrong.upper} inside [${wide.low}, ${wide.high}]`).toBe(true);
  }, 60_000);
});
