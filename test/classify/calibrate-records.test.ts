/**
 * Calibration from decimated records (classify/calibrate-records.ts, likelihood-classifier.ts):
 * the prepared mixture after preparation and mapping errors, and the parts of the likelihood
 * classifier — bin means and σ per bin learned from the calibration records, prior at the window
 * start.
 */
import { describe, expect, it } from 'vitest';
import { gatherRecords } from '../../src/classify/calibrate-records.ts';
import { initialMixture, likelihoodClassifier } from '../../src/classify/likelihood-classifier.ts';
import { makeHmmClassifier, type HmmClassifierSpec } from '../../src/classify/likelihood.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { calibrate } from '../../src/classify/calibrate.ts';
import { makeScratch, simulateBatch } from '../../src/engine/trace/batch.ts';
import { twoStateScenario } from '../support/scenarios.ts';

describe('initialMixture', () => {
  it('applies the preparation flip, then the mapping flip (closed form)', () => {
    const sc = twoStateScenario({ preparationError: 0.1 });
    sc.prepare = [0.7, 0.3];
    sc.mappingError = [null, { probability: 0.2, into: 0, origin: 'test' }];
    const m = initialMixture(sc);
    // prepared: ground 0.7·0.9 = 0.63, excited 0.3 + 0.7·0.1 = 0.37; mapped: excited keeps 0.8
    expect(m[1]).toBeCloseTo(0.37 * 0.8, 15);
    expect(m[0]).toBeCloseTo(0.63 + 0.37 * 0.2, 15);
  });
});

describe('likelihood calibration (baseband, block average of D = 10)', () => {
  it('model means are the levels, σ per bin is σ/√D, the prior decays with T1 to the window start', () => {
    // σ per sample 2 → σ per bin 2/√10 = 0.632; 4096 shots × 10 bins of clean records: σ to ≈0.5 %
    const t1 = 20e-6, start = 2e-6;
    const sc = twoStateScenario({ carrier: 'none', sampleRate: 10e6, recordLength: 10e-6, windowStart: start, windowLength: 5e-6, t1, sigmaPerSample: 2, shots: 1024, seed: 51, batchSize: 4096 });
    sc.calibrationShots = 4096;
    sc.pipelines = [{ name: 'hmm', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 }, classifier: 'likelihood', decimate: 10 }];
    const point = compilePoint(sc);
    const batch = simulateBatch(point, 0, 'calibrate', 0, 4096, makeScratch(point));
    const cal = calibrate(point, [batch], point)[0]!;
    const sigma = 2 / Math.sqrt(10);
    const stored = cal.model as HmmClassifierSpec;
    expect(Math.abs(stored.sigma / sigma - 1), `σ per bin ${stored.sigma} vs ${sigma}`).toBeLessThan(0.02);
    // the classifier's fit on the gathered records is the model the calibration keeps
    const chain = point.pipelines[0]!.chain;
    const model = likelihoodClassifier.fit!(gatherRecords('hmm', chain, 0, [0, 1], [batch], cal.axis), chain, cal.axis, point);
    expect(model).toEqual(stored);
    // learned from the records (hmm-learning.ts): the levels 0 and 1 (a block average of 10
    // samples) to within a few standard errors of 4096 shots × 5 bins of σ 0.63 (~0.005)
    for (const m of model.means[0]!) expect(Math.abs(m)).toBeLessThan(0.02);
    for (const m of model.means[1]!) expect(Math.abs(m - 1)).toBeLessThan(0.02);
    const hmm = makeHmmClassifier(stored);
    expect(hmm.maxLength).toBe(5);
    // log-likelihoods of a record at the ground level: the prior odds are e^(−t/T1)-weighted
    const atGround = new Float64Array(5);
    const perState = hmm.stateLogLikelihoods(atGround, 0, 5, new Float64Array(2));
    expect(perState[0]!).toBeGreaterThan(perState[1]!);
    const prior1 = 0.5 * Math.exp(-start / t1);
    const logPriorOdds = Math.log(prior1 / (1 - prior1));
    // an empty record has log-odds = the prior odds at the window start
    expect(hmm.logLikelihoodRatio(atGround, 0, 0)).toBeCloseTo(logPriorOdds, 12);
    expect(cal.rule).toEqual({ threshold: 0, highIsOne: true });
  }, 30_000);
});
