/**
 * The engine choice: auto takes the exact engine exactly when every pipeline is linear in the
 * record and the noise is Gaussian — white, 1/f (analog response allowed); any other signal-chain
 * feature — or an unknown one — keeps the trace engine, and the reason names it. Asking for the
 * exact engine where it does not apply is an InputError naming the reason.
 */
import { describe, expect, it } from 'vitest';
import { chooseEngine, exactBlockers } from '../../src/engine/choose.ts';
import { InputError } from '../../src/errors.ts';
import type { NoiseSourceSpec, Scenario } from '../../src/scenario/types.ts';
import type { FlickerSourceSpec } from '../../src/signal/noise/flicker.ts';
import { twoStateScenario } from '../support/scenarios.ts';

function withChange(change: (s: Scenario) => void): Scenario {
  const s = twoStateScenario({ t1: 10e-6 });
  change(s);
  return s;
}

const exactCases: [string, Scenario][] = [
  ['white noise and relaxation', withChange(() => {})],
  ['an analog response', withChange((s) => { s.signal.response = { timeConstant: 1e-7, from: 'zero' }; })],
  ['a filter, decimation and an ambiguous band', withChange((s) => {
    s.pipelines[0] = { ...s.pipelines[0]!, decimate: 4, ambiguousBand: null, weights: 'boxcar', classifier: 'threshold' };
  })],
  ['no noise at all', withChange((s) => { s.signal.white = null; })],
  ['1/f noise (amplifier- and sensor-side)', withChange((s) => {
    const flickers: FlickerSourceSpec[] = [
      { kind: 'flicker', name: 'f', amplitude: 1e-3, exponent: 1, low: 1, high: 1e6, injection: 'amplifier', inDetuning: false },
      { kind: 'flicker', name: 'g', amplitude: 1e-4, exponent: 1.2, low: 10, high: 1e6, injection: 'sensor', inDetuning: false },
    ];
    s.signal.sources = flickers;
  })],
];

const traceCases: [string, Scenario, RegExp][] = [
  ['telegraph noise', withChange((s) => {
    s.signal.sources = [{ kind: 'telegraph', name: 't', amplitude: 0.1, rateUp: 1e3, rateDown: 1e3, injection: 'amplifier', inDetuning: false } as NoiseSourceSpec];
  }), /signal\.telegraph: telegraph noise is not Gaussian/],
  ['a digitizer', withChange((s) => { s.signal.digitizer = { low: -5, high: 5, bits: 8 }; }), /signal\.digitizer: clipping and quantisation are not linear/],
  ['the likelihood classifier', withChange((s) => { s.pipelines[0]!.classifier = 'likelihood'; }), /pipeline "main": the likelihood classifier is not linear/],
  ['matched weights', withChange((s) => { s.pipelines[0]!.weights = 'matched'; }), /pipeline "main": matched weights are calibrated from recorded traces/],
  ['a signal feature this file does not know', withChange((s) => { (s.signal as unknown as Record<string, unknown>).mystery = { on: true }; }), /signal\.mystery: not known to be white Gaussian/],
];

describe('engine choice', () => {
  it.each(exactCases)('%s: auto runs the exact engine', (_name, s) => {
    expect(exactBlockers(s)).toEqual([]);
    const c = chooseEngine([s], 'auto');
    expect(c.engine).toBe('exact');
    expect(c.reason).toMatch(/^auto: every pipeline is a linear functional of the record and the noise is Gaussian/);
  });

  it.each(traceCases)('%s: auto keeps the trace engine and says why', (_name, s, why) => {
    const c = chooseEngine([s], 'auto');
    expect(c.engine).toBe('traces');
    expect(c.reason).toMatch(/^auto: the exact engine does not apply/);
    expect(c.reason).toMatch(why);
  });

  it.each(traceCases)('%s: --engine exact is refused with the reason', (_name, s, why) => {
    expect(() => chooseEngine([s], 'exact')).toThrow(InputError);
    expect(() => chooseEngine([s], 'exact')).toThrow(why);
  });

  it('kept traces (a run option, not a scenario key) keep the trace engine and say why', () => {
    const s = exactCases[0]![1];
    expect(exactBlockers(s, { keepTraces: 'raw' })).toEqual(['keepTraces: traces are kept, which needs every record']);
    expect(chooseEngine([s], 'auto', { keepTraces: 'baseband' })).toMatchObject({ engine: 'traces', reason: expect.stringMatching(/keepTraces: traces are kept/) });
    expect(() => chooseEngine([s], 'exact', { keepTraces: 'raw' })).toThrow(/keepTraces: traces are kept/);
  });

  it('a sweep takes the exact engine only if every point allows it', () => {
    const c = chooseEngine([exactCases[0]![1], traceCases[2]![1]], 'auto');
    expect(c.engine).toBe('traces');
  });

  it('an explicit request is honoured and named', () => {
    expect(chooseEngine([exactCases[0]![1]], 'traces')).toMatchObject({ engine: 'traces', reason: expect.stringMatching(/^requested \(--engine traces\)/) });
    expect(chooseEngine([exactCases[0]![1]], 'exact')).toMatchObject({ engine: 'exact', reason: expect.stringMatching(/^requested \(--engine exact\)/) });
  });
});
