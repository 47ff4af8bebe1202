/**
 * The ambiguous band (post-selection): shots whose decision statistic lies within the band
 * around the threshold are discarded. The summary reports the discard fraction, the error of
 * the kept shots and the error counting discards as failures; the last can never be below the
 * error of the same decision without the band (every shot the plain rule gets wrong is either
 * kept and wrong or discarded: a counting identity, common practice, no source). The plain
 * error, the budget comparison and the paired comparisons stay those of the unbanded rule.
 */
import { describe, expect, it } from 'vitest';
import { runPoints } from '../../src/run/run-points.ts';
import type { ScoredPipeline } from '../../src/classify/score.ts';
import type { PipelineSpec } from '../../src/scenario/types.ts';
import { twoStateScenario } from '../support/scenarios.ts';
import { gaussianTail } from '../../src/analysis/special.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';

describe('ambiguous band', () => {
  it('reports discards, post-selected error and discards-as-failures error, never below the unbanded error', async () => {
    const sc = twoStateScenario({ carrier: 'sine', sampleRate: 10e6, recordLength: 10e-6, t1: 40e-6, sigmaPerSample: 3, shots: 8192, seed: 41, batchSize: 4096 });
    sc.calibrationShots = 4096;
    const optimal = { referencePhase: 'auto' as const, threshold: { method: 'optimal' as const, value: 0 } };
    const pipelines: PipelineSpec[] = [
      { name: 'plain', ...optimal },
      { name: 'banded', ...optimal, ambiguousBand: { kind: 'fraction', value: 0.3 } },
      { name: 'likelihood', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 }, classifier: 'likelihood', decimate: 10 },
      { name: 'likelihood-banded', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 }, classifier: 'likelihood', decimate: 10, ambiguousBand: { kind: 'fraction', value: 0.2 } },
    ];
    sc.pipelines = pipelines;
    const batches: ScoredPipeline[][] = [];
    const r = await runPoints([{ parameters: {}, scenario: sc }], { onScoredBatch: (_p, _b, scored) => { batches.push(scored); } });
    const point = r.points[0]!;
    const [plain, banded, hmm, hmmBanded] = point.summaries;
    for (const [unbanded, band, k] of [[plain!, banded!, 1], [hmm!, hmmBanded!, 3]] as const) {
      const cal = point.calibrations[k]!;
      expect(cal.bandHalfWidth).toBeGreaterThan(0);
      // per shot: discarded ⇔ |statistic − threshold| < half width; the decision itself is the unbanded one
      let wrongFlag = 0, otherDecision = 0;
      for (const scored of batches) {
        const s = scored[k]!, u = scored[k - 1]!;
        const statistic = s.statistic ?? s.projected;
        for (let i = 0; i < s.outcome.length; i++) {
          if (s.discarded![i] !== (Math.abs(statistic[i]! - cal.rule.threshold) < cal.bandHalfWidth ? 1 : 0)) wrongFlag++;
          if (s.outcome[i] !== u.outcome[i]) otherDecision++;
        }
        expect(u.discarded).toBeNull();
      }
      expect(wrongFlag, `${band.pipeline}: shots flagged against the band rule`).toBe(0);
      expect(otherDecision, `${band.pipeline}: shots decided unlike the unbanded twin`).toBe(0);
      expect(band.banded).toBe(true);
      expect(unbanded.banded).toBe(false);
      expect(band.meanErrors).toBe(unbanded.meanErrors);
      expect(band.discarded).toBeGreaterThan(0);
      expect(band.discardFraction).toBeCloseTo(band.discarded / band.shots, 15);
      // the counting identity, and the order post-selected < unbanded ≤ discards-as-failures
      expect(band.discardsAsFailuresError.rate, `${band.pipeline}`).toBeGreaterThanOrEqual(unbanded.meanError.rate);
      expect(band.postSelectedError.rate).toBeLessThan(unbanded.meanError.rate);
      const keptWrong = band.postSelectedError.rate * (band.shots - band.discarded);
      expect(band.discardsAsFailuresError.rate * band.shots).toBeCloseTo(keptWrong + band.discarded, 6);
      // without a band the three agree
      expect(unbanded.postSelectedError.rate).toBe(unbanded.meanError.rate);
      expect(unbanded.discardsAsFailuresError.rate).toBe(unbanded.meanError.rate);
      expect(unbanded.discardFraction).toBe(0);
      // the budget is compared with the unbanded rates: same verdict as the unbanded twin
      expect(band.agreement).toBe(unbanded.agreement);
      expect(band.analyticMean).toBe(unbanded.analyticMean);
    }
    // paired comparisons use the plain decision: the banded twin is identical to its plain pipeline
    const twin = point.comparisons.find((c) => c.a === 'plain' && c.b === 'banded')!;
    expect(twin.onlyAWrong + twin.onlyBWrong).toBe(0);
    expect(twin.pValue).toBe(1);
  }, 30_000);

  it('a band width in signal units discards |value − threshold| < width/2', async () => {
    const sc = twoStateScenario({ carrier: 'none', sampleRate: 10e6, recordLength: 5e-6, sigmaPerSample: 2, shots: 4096, seed: 42, batchSize: 4096 });
    sc.pipelines = [{ name: 'w', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 }, ambiguousBand: { kind: 'width', value: 0.25 } }];
    const r = await runPoints([{ parameters: {}, scenario: sc }]);
    expect(r.points[0]!.calibrations[0]!.bandHalfWidth).toBe(0.125);
    const s = r.points[0]!.summaries[0]!;
    // levels 0 and 1 (no relaxation), σ of the value = 2/√50 at baseband: each state puts
    // Q(0.375/σ) − Q(0.625/σ) = 0.0789 of its shots inside |v − ½| < 0.125 (Gaussian tails; common
    // practice, no source); 4096 shots: 99.9 % Wilson half-width ≈ 0.014
    const sigma = 2 / Math.sqrt(50);
    const expected = gaussianTail(0.375 / sigma) - gaussianTail(0.625 / sigma);
    const wide = wilsonInterval(s.discarded, s.shots, 0.999);
    expect(expected, `discarded ${s.discarded}/${s.shots}, interval [${wide.low}, ${wide.high}]`).toBeGreaterThanOrEqual(wide.low);
    expect(expected).toBeLessThanOrEqual(wide.high);
  }, 30_000);
});
