/**
 * The run estimate (plan/estimate.ts) knows the engine: an exact-engine run costs per shot, not
 * per record sample, so it is estimated far shorter than the same run on the trace engine and
 * does not grow with the record length. (Conservative constants, common practice, no source.)
 */
import { describe, expect, it } from 'vitest';
import { estimateRun } from '../../src/run/estimate.ts';
import { twoStateScenario } from '../support/scenarios.ts';

describe('estimateRun with the engine', () => {
  it('exact runs are estimated per shot, independent of the record length', () => {
    const short = twoStateScenario({ recordLength: 2e-6, shots: 1e6 });
    const long = twoStateScenario({ recordLength: 200e-6, shots: 1e6 });
    // the parts that grow with the shots (both engines have the same fixed costs)
    const growing = (e: { seconds: number; fixedSeconds: number }) => e.seconds - e.fixedSeconds;
    const traces = growing(estimateRun([short]));
    const exact = growing(estimateRun([short], { engine: 'exact' }));
    expect(exact, `exact ${exact} s vs traces ${traces} s`).toBeLessThan(traces / 5);
    expect(growing(estimateRun([long], { engine: 'exact' }))).toBeCloseTo(exact, 6);
    expect(growing(estimateRun([long]))).toBeGreaterThan(50 * traces);
    expect(estimateRun([short]).fixedSeconds).toBeGreaterThan(0);
  });
});
