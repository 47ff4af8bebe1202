/**
 * The processing keys of a pipeline (sections/processing.ts): filter, decimate, window,
 * weights, classifier, ambiguousBand — resolved to SI units, left out when not written (so a
 * plain pipeline resolves as before), and refused with an InputError naming the key.
 */
import { describe, expect, it } from 'vitest';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import { InputError } from '../../src/errors.ts';

const BASE = `
name: processing keys
calibrationShots: 4000
timing: { sampleRate: 100 MHz, recordLength: 10 us, window: { start: 1 us, length: 8 us } }
states:
  - { name: a, level: 0 pA, outcome: "0" }
  - { name: b, level: 100 pA, outcome: "1" }
transitions: [{ from: b, to: a, lifetime: 20 us }]
signal: { carrier: { shape: sine, frequency: 5 MHz }, noise: { white: { density: 50 fA/rtHz } } }
`;

function resolve(extra: string) {
  const base = parseScenarioText(BASE, 't') as Record<string, unknown>;
  const doc = { ...base, ...(parseScenarioText(extra, 't') as Record<string, unknown>) };
  return resolveScenario(doc, 'test.yaml');
}

function failure(extra: string): InputError {
  try {
    resolve(extra);
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error(`accepted: ${extra}`);
}

describe('pipeline processing keys', () => {
  it('a pipeline without the new keys resolves exactly as before', () => {
    expect(resolve('processing: { threshold: optimal }\n').scenario.pipelines).toEqual([
      { name: 'main', referencePhase: 'auto', threshold: { method: 'optimal', value: 0 } },
    ]);
  });

  it('reads every key in SI units', () => {
    const { scenario } = resolve(`pipelines:
  - { name: rc, filter: { singlePole: { cutoff: 2 MHz } }, decimate: 10, weights: matched }
  - { name: bw, filter: { butterworth: { order: 4, cutoff: 3 MHz } }, weights: optimal, decimate: 20 }
  - { name: fir, filter: { fir: { taps: 31, cutoff: 4 MHz, window: blackman } }, ambiguousBand: { fraction: 0.1 } }
  - { name: hmm, classifier: likelihood, decimate: 25, ambiguousBand: { fraction: 0.05 } }
  - { name: short, window: { start: 2 us, length: 3 us }, ambiguousBand: { width: 10 pA } }
  - { name: raw, filter: none }
`);
    const [rc, bw, fir, hmm, short, raw] = scenario.pipelines;
    expect(rc).toMatchObject({ filter: { kind: 'single-pole', cutoff: 2e6 }, decimate: 10, weights: 'matched' });
    expect(bw).toMatchObject({ filter: { kind: 'butterworth', order: 4, cutoff: 3e6 }, weights: 'optimal' });
    expect(fir).toMatchObject({ filter: { kind: 'fir', taps: 31, cutoff: 4e6, window: 'blackman' }, ambiguousBand: { kind: 'fraction', value: 0.1 } });
    expect(hmm).toMatchObject({ classifier: 'likelihood', decimate: 25 });
    expect(short!.window!.start).toBeCloseTo(2e-6, 15);
    expect(short!.window!.length).toBeCloseTo(3e-6, 15);
    expect(short!.ambiguousBand).toMatchObject({ kind: 'width' });
    expect(short!.ambiguousBand!.value).toBeCloseTo(10e-12, 20);
    expect(raw!.filter).toEqual({ kind: 'none' });
  });

  it('an FIR window defaults to hamming; a window length defaults to the timing window end', () => {
    const { scenario } = resolve('pipelines:\n  - { name: f, filter: { fir: { taps: 9, cutoff: 1 MHz } }, window: { start: 5 us } }\n');
    expect(scenario.pipelines[0]!.filter).toMatchObject({ window: 'hamming' });
    expect(scenario.pipelines[0]!.window!.length).toBeCloseTo(4e-6, 15);
  });

  it('warns when decimating without an anti-alias filter', () => {
    const { warnings } = resolve('processing: { filter: none, decimate: 10 }\n');
    expect(warnings.join('\n')).toMatch(/processing\.filter: decimating by 10 without an anti-alias filter/);
  });

  it.each([
    ['two filter kinds at once', 'processing: { filter: { singlePole: { cutoff: 1 MHz }, fir: { taps: 3, cutoff: 1 MHz } } }', 'processing.filter'],
    ['a misspelt filter kind', 'processing: { filter: { butterwort: { order: 2, cutoff: 1 MHz } } }', 'processing.filter.butterwort'],
    ['a cutoff above Nyquist', 'processing: { filter: { butterworth: { order: 2, cutoff: 60 MHz } } }', 'processing.filter.butterworth.cutoff'],
    ['a Butterworth order of zero', 'processing: { filter: { butterworth: { order: 0, cutoff: 1 MHz } } }', 'processing.filter.butterworth.order'],
    ['a cutoff in seconds', 'pipelines: [{ name: p, filter: { singlePole: { cutoff: 1 us } } }]', 'pipelines[0].filter.singlePole.cutoff'],
    ['a decimation longer than the window', 'processing: { decimate: 900 }', 'processing.decimate'],
    ['an unknown weights kind', 'processing: { weights: triangle }', 'processing.weights'],
    ['an unknown classifier', 'processing: { classifier: neural }', 'processing.classifier'],
    ['a threshold with the likelihood classifier', 'processing: { classifier: likelihood, threshold: optimal }', 'processing.threshold'],
    ['weights with the likelihood classifier', 'processing: { classifier: likelihood, weights: matched }', 'processing.weights'],
    ['a band with both forms', 'processing: { ambiguousBand: { fraction: 0.1, width: 1 pA } }', 'processing.ambiguousBand'],
    ['a band fraction of one', 'processing: { ambiguousBand: { fraction: 1 } }', 'processing.ambiguousBand.fraction'],
    ['a band width with the likelihood classifier', 'processing: { classifier: likelihood, ambiguousBand: { width: 1 pA } }', 'processing.ambiguousBand.width'],
    ['a band width in volts when levels are in amperes', 'processing: { ambiguousBand: { width: 1 mV } }', 'processing.ambiguousBand.width'],
    ['a pipeline window ending after the timing window', 'pipelines: [{ name: p, window: { start: 2 us, length: 8 us } }]', 'pipelines[0].window.length'],
    ['a pipeline window starting after the timing window', 'processing: { window: { start: 9.5 us } }', 'processing.window.start'],
    ['optimal weights with too few calibration shots', 'calibrationShots: 100\nprocessing: { weights: optimal, decimate: 8 }', 'processing.weights'],
  ])('%s → %s', (_what, extra, path) => {
    const e = failure(extra);
    expect(e.path, e.message).toBe(path);
    expect(e.message).toContain(`test.yaml: ${path}: expected `);
    expect(e.message).not.toContain('\n');
  });
});
