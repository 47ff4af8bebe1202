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
    const traces = estimateRun([short]).seconds;
    const exact = estimateRun([short], { engine: 'exact' }).seconds;
    expect(exact, `exact ${exact} s vs traces ${traces} s`).toBeLessThan(traces / 5);
    expect(estimateRun([long], { engine: 'exact' }).seconds).toBeCloseTo(exact, 6);
    expect(estimateRun([long]).seconds).toBeGreaterThan(50 * traces);
  });
});
