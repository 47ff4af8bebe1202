/**
 * The last line behind the bounds: a scenario that validation would refuse, built by hand so that
 * its arithmetic overflows, stops with a ScenarioProblem naming the key — never a silent NaN
 * table, never a loop — and the use case turns it into one line naming the file and point. The
 * threshold search refuses NaN input (it used to loop for ever on it).
 */
import { describe, expect, it } from 'vitest';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { optimalThreshold } from '../../src/classify/threshold.ts';
import { ScenarioProblem } from '../../src/errors.ts';
import { twoStateScenario } from '../support/scenarios.ts';

describe('non-finite intermediates stop the run, naming the key', () => {
  it('a level whose record overflows: states[1].level', () => {
    const s = twoStateScenario({ levels: [0, 1e308], carrier: 'none', shots: 1024 });
    s.signal.gain = 10;
    let error: unknown;
    try {
      compilePoint(s);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(ScenarioProblem);
    expect((error as ScenarioProblem).path).toEqual(['states', 1, 'level']);
    expect((error as ScenarioProblem).found).toMatch(/^Infinity at sample 0$/);
  });

  it('a run of such a point says which point, and the file is named by the use case', async () => {
    const s = twoStateScenario({ levels: [0, 1e308], carrier: 'none', shots: 1024 });
    s.signal.gain = 10;
    const run = runPoints([{ parameters: {}, scenario: twoStateScenario({ shots: 1024 }) }, { parameters: {}, scenario: s }], { engine: 'traces' });
    const error = await run.then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(ScenarioProblem);
    const p = error as ScenarioProblem;
    expect(p.point).toBe(1);
    expect(p.toInputError('x.yaml', false, 2).message).toMatch(/^x\.yaml: states\[1\]\.level: expected a level, carrier and gain whose record stays finite, found Infinity at sample 0 \(at sweep point 1\)$/);
  });

  it('the threshold search refuses NaN instead of looping', () => {
    expect(() => optimalThreshold(Float64Array.of(1, NaN, 2), Float64Array.of(5, 6))).toThrow(/a calibration value is NaN/);
    expect(() => optimalThreshold(Float64Array.of(NaN), Float64Array.of(NaN))).toThrow(/NaN/);
    // infinities are ordered: they pass
    expect(optimalThreshold(Float64Array.of(-Infinity, 1), Float64Array.of(5, Infinity)).errors).toBe(0);
  });
});
