/**
 * A readout whose only error is a preparation error of probability p: the simulated error of
 * that state must contain p in its 99.9 % Wilson interval (Wilson 1927), and attribution must
 * put every wrong shot of that state on 'preparation'. Noise is negligible here: SNR 40 gives
 * Q(20) ≈ 3e-89 per shot (Abramowitz & Stegun 1964, 7.1.13 bound).
 */
import { describe, expect, it } from 'vitest';
import { CAUSES } from '../../src/analysis/causes.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { twoStateScenario } from '../support/scenarios.ts';

describe('preparation error alone', () => {
  it('gives error p, all attributed to preparation', async () => {
    const p = 0.02;
    const scenario = twoStateScenario({ carrier: 'none', recordLength: 1e-6, sigmaPerSample: 0.25, preparationError: p, shots: 40960, seed: 5 });
    const result = await runPoints([{ parameters: {}, scenario }]);
    const point = result.points[0]!;
    const ground = point.summaries[0]!.states[0]!;
    const wide = wilsonInterval(ground.errors, ground.shots, 0.999);
    expect(p, `p = ${p} outside [${wide.low}, ${wide.high}] (simulated ${ground.error.rate})`).toBeGreaterThanOrEqual(wide.low);
    expect(p).toBeLessThanOrEqual(wide.high);
    const tally = point.tallies[0]!;
    const C = CAUSES.length;
    const preparation = tally.causes[0 * C + CAUSES.indexOf('preparation')]!;
    expect(preparation).toBe(ground.errors);
    expect(ground.errors).toBeGreaterThan(0);
    // the other state has no error at all
    expect(point.summaries[0]!.states[1]!.errors).toBe(0);
    // and the analytic budget puts p on preparation for ground
    const analytic = point.summaries[0]!.states[0]!.causes.find((c) => c.cause === 'preparation')!.analytic;
    expect(Math.abs(analytic - p)).toBeLessThan(1e-12);
  }, 60_000);
});
