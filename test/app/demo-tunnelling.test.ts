/**
 * The tunnelling demo (scenarios/demo-tunnelling.yaml, invented numbers): on energy-selective
 * readout the peak classifier beats the boxcar on the same shots at every readout bandwidth
 * (exact McNemar p < 0.001), and the bandwidth sweep has an optimum inside its range: both ends
 * err more than the best point's 99.9 % Wilson interval allows (common practice, no source: a
 * low-pass too slow loses short blips, one too fast lets noise peaks through).
 */
import { describe, expect, it } from 'vitest';
import { loadScenarioFile } from '../../src/scenario/load.ts';
import { expandSweep } from '../../src/run/sweep.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';

describe('the tunnelling demo', () => {
  it('peak detection beats the boxcar at every bandwidth, and the bandwidth has an optimum', async () => {
    const file = 'scenarios/demo-tunnelling.yaml';
    const loaded = await loadScenarioFile(file, { shots: 8000 });
    const points = expandSweep(loaded.doc, loaded.scenario, file);
    const r = await runPoints(points, { engine: 'traces' });
    const peak = r.points.map((p) => {
      const c = p.comparisons.find((x) => x.a === 'boxcar' && x.b === 'peak')!;
      expect(c.errorB, `point ${p.index}: peak ${c.errorB}, boxcar ${c.errorA}`).toBeLessThan(c.errorA);
      expect(c.pValue, `point ${p.index}`).toBeLessThan(0.001);
      return p.summaries.find((s) => s.pipeline === 'peak')!;
    });
    const errors = peak.map((s) => s.meanError.rate);
    const best = errors.indexOf(Math.min(...errors));
    expect(best, `errors along the sweep: ${errors.join(', ')}`).toBeGreaterThan(0);
    expect(best).toBeLessThan(errors.length - 1);
    const bound = wilsonInterval(peak[best]!.meanErrors, peak[best]!.shots, 0.999).high;
    expect(errors[0]!).toBeGreaterThan(bound);
    expect(errors[errors.length - 1]!).toBeGreaterThan(bound);
  }, 120_000);
});
