import { describe, expect, it } from 'vitest';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import { InputError } from '../../src/errors.ts';
import { thermalPopulation } from '../../src/physics/preparation.ts';
import { landauZenerProbability } from '../../src/physics/mapping.ts';

const e = 1.602176634e-19; // C, exact (SI Brochure 2019)

const FULL = `
name: IQ demo device
description: an invented resonator readout with a leakage state
seed: 777
shots: 5000
calibrationShots: 1000
batchSize: 2048
timing:
  sampleRate: 250 MHz
  recordLength: 4 us
  window: { start: 0.5 us, length: 2 us }
  shotPeriod: 10 us
states:
  - { name: ground, level: { re: 1 mV, im: 0 mV }, outcome: g }
  - { name: excited, level: { magnitude: 2 mV, phase: 90 deg }, outcome: e }
  - { name: leaked, level: -1.5 mV, outcome: e }
prepare: { ground: 3, excited: 1 }
preparationError:
  ground:
    thermal: { splitting: 150 ueV, temperature: 120 mK, degeneracy: 2 }
    into: excited
  excited: { probability: 0.001, into: ground }
mappingError:
  excited:
    landauZener: { coupling: 20 ueV, sweepRate: 0.5 meV/ns }
    dephasing: 0.002
    into: ground
  leaked: { dephasing: 0.01, into: ground }
transitions:
  - { from: excited, to: ground, lifetime: 40 us }
  - { from: ground, to: excited, rate: 500 Hz }
  - { from: excited, to: leaked, rate: 2 kHz, kind: leakage }
signal:
  unit: V
  carrier: { shape: sine, frequency: 25 MHz, phase: 30 deg }
  gain: 20
  noise:
    white: { perSample: 0.4 mV }
pipelines:
  - { name: auto-mid, referencePhase: auto, threshold: midpoint }
  - { name: tilted, referencePhase: 45 deg, threshold: optimal }
  - { name: fixed, threshold: { fixed: 0.5 mV } }
`;

function resolveText(text: string) {
  return resolveScenario(parseScenarioText(text, 'test.yaml'), 'test.yaml');
}

/** |a − b| ≤ rel·|b| with a message showing both. */
function near(actual: number, expected: number, rel = 1e-12): void {
  const tol = rel * Math.abs(expected);
  expect(Math.abs(actual - expected), `actual ${actual}, expected ${expected}, tol ${tol}`).toBeLessThanOrEqual(tol);
}

describe('resolveScenario: a full example', () => {
  const { scenario: s, warnings } = resolveText(FULL);

  it('takes the run settings as given', () => {
    expect([s.name, s.description, s.seed, s.shots, s.calibrationShots, s.batchSize]).toEqual([
      'IQ demo device', 'an invented resonator readout with a leakage state', 777, 5000, 1000, 2048,
    ]);
  });

  it('converts timing to SI', () => {
    expect(s.timing).toEqual({ sampleRate: 250e6, recordLength: 4e-6, windowStart: 0.5e-6, windowLength: 2e-6, shotPeriod: 10e-6 });
  });

  it('turns levels into complex amplitudes and outcomes into indices in order of appearance', () => {
    expect(s.outcomes).toEqual(['g', 'e']);
    expect(s.states.map((x) => [x.name, x.outcome])).toEqual([['ground', 0], ['excited', 1], ['leaked', 1]]);
    expect(s.states[0]!.level).toEqual({ re: 1e-3, im: 0 });
    // 2 mV at 90°: re = 2e-3·cos(π/2) ≈ 1.2e-19, im = 2e-3.
    expect(Math.abs(s.states[1]!.level.re)).toBeLessThan(1e-18);
    near(s.states[1]!.level.im, 2e-3);
    expect(s.states[2]!.level).toEqual({ re: -1.5e-3, im: 0 });
  });

  it('normalises the prepare weights (3:1:0)', () => {
    expect(s.prepare).toEqual([0.75, 0.25, 0]);
  });

  it('computes preparation errors (Boltzmann) and keeps given ones', () => {
    const thermal = s.preparationError[0]!;
    near(thermal.probability, thermalPopulation(150e-6 * e, 0.12, 2));
    expect(thermal.into).toBe(1);
    expect(thermal.origin).toBe('Boltzmann: 150 µeV at 120 mK, g = 2');
    expect(s.preparationError[1]).toEqual({ probability: 0.001, into: 0, origin: 'given probability' });
    expect(s.preparationError[2]).toBeNull();
  });

  it('combines Landau–Zener and dephasing as 1 − (1 − p)(1 − d)', () => {
    const lz = landauZenerProbability(20e-6 * e, (0.5e-3 * e) / 1e-9);
    const m = s.mappingError[1]!;
    near(m.probability, 1 - (1 - lz) * (1 - 0.002));
    expect(m.into).toBe(0);
    expect(m.origin).toBe('Landau–Zener: Δ = 20 µeV, v = 0.5 meV/ns + dephasing 0.002');
    near(s.mappingError[2]!.probability, 0.01);
    expect(s.mappingError[0]).toBeNull();
  });

  it('turns lifetimes into rates and fills the kind from the state order', () => {
    expect(s.transitions).toEqual([
      { from: 1, to: 0, rate: 1 / 40e-6, kind: 'relaxation' },
      { from: 0, to: 1, rate: 500, kind: 'excitation' },
      { from: 1, to: 2, rate: 2000, kind: 'leakage' },
    ]);
  });

  it('converts the signal chain; σ per sample becomes a density σ/√(fs/2)', () => {
    expect(s.signal.unit).toBe('V');
    expect(s.signal.gain).toBe(20);
    expect(s.signal.carrier.shape).toBe('sine');
    expect(s.signal.carrier.frequency).toBe(25e6);
    near(s.signal.carrier.phase, Math.PI / 6);
    near(s.signal.white!.density, 0.4e-3 / Math.sqrt(250e6 / 2));
  });

  it('keeps the pipelines in order', () => {
    expect(s.pipelines.map((p) => p.name)).toEqual(['auto-mid', 'tilted', 'fixed']);
    expect(s.pipelines[0]).toEqual({ name: 'auto-mid', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 } });
    near(s.pipelines[1]!.referencePhase as number, Math.PI / 4);
    expect(s.pipelines[1]!.threshold.method).toBe('optimal');
    expect(s.pipelines[2]).toEqual({ name: 'fixed', referencePhase: 'auto', threshold: { method: 'fixed', value: 0.5e-3 } });
  });

  it('gives no warnings', () => {
    expect(warnings).toEqual([]);
  });
});

const MINIMAL = `
name: minimal
timing: { sampleRate: 10 MHz, recordLength: 20 us }
states:
  - { name: a, level: 0, outcome: 0 }
  - { name: b, level: 1, outcome: 1 }
`;

describe('resolveScenario: defaults', () => {
  const { scenario: s, warnings } = resolveText(MINIMAL);

  it('fills run defaults', () => {
    expect([s.description, s.seed, s.shots, s.calibrationShots, s.batchSize]).toEqual(['', 1, 100000, 20000, 4096]);
  });

  it('defaults the window to the whole record and the shot period to the record length', () => {
    expect(s.timing).toEqual({ sampleRate: 1e7, recordLength: 2e-5, windowStart: 0, windowLength: 2e-5, shotPeriod: 2e-5 });
  });

  it('stringifies numeric outcomes, prepares equally, has no errors or transitions', () => {
    expect(s.outcomes).toEqual(['0', '1']);
    expect(s.prepare).toEqual([0.5, 0.5]);
    expect(s.preparationError).toEqual([null, null]);
    expect(s.mappingError).toEqual([null, null]);
    expect(s.transitions).toEqual([]);
  });

  it('is baseband, unit-less, gain 1, noiseless, one "main" pipeline', () => {
    expect(s.signal).toEqual({ carrier: { shape: 'none', frequency: 0, phase: 0 }, gain: 1, white: null, unit: '' });
    expect(s.pipelines).toEqual([{ name: 'main', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 } }]);
    expect(warnings).toEqual([]);
  });

  it('window length defaults to the rest of the record after its start', () => {
    const { scenario } = resolveText(MINIMAL.replace('recordLength: 20 us', 'recordLength: 20 us, window: { start: 5 us }'));
    expect(scenario.timing.windowStart).toBe(5e-6);
    expect(scenario.timing.windowLength).toBeCloseTo(15e-6, 18);
  });

  it('a window shorter than a sample period is fine if it holds a sample (sample k at k/fs)', () => {
    // 10 MHz: samples at 0, 100 ns, 200 ns, …; [150 ns, 210 ns) holds the one at 200 ns.
    const text = MINIMAL.replace('recordLength: 20 us', 'recordLength: 20 us, window: { start: 150 ns, length: 60 ns }');
    expect(resolveText(text).scenario.timing.windowLength).toBe(60e-9);
  });

  it('calibration shots default to min(shots, 20000), at least 2', () => {
    expect(resolveText(MINIMAL + 'shots: 500\n').scenario.calibrationShots).toBe(500);
    expect(resolveText(MINIMAL + 'shots: 1\n').scenario.calibrationShots).toBe(2);
  });

  it('into defaults to the other state when there are two', () => {
    const { scenario } = resolveText(MINIMAL + 'preparationError: { b: { probability: 0.1 } }\n');
    expect(scenario.preparationError).toEqual([null, { probability: 0.1, into: 0, origin: 'given probability' }]);
  });

  it('infers the signal unit from the levels', () => {
    const text = MINIMAL.replace('level: 1,', 'level: 1 nA,');
    expect(resolveText(text).scenario.signal.unit).toBe('A');
    expect(resolveText(text + 'signal: { noise: { white: { density: 1 pA/rtHz } } }\n').scenario.signal.white).toEqual({ density: 1e-12 });
  });

  it('makes a polar level at 0° or 180° exactly real at baseband', () => {
    const text = MINIMAL.replace('level: 1,', 'level: { magnitude: 1, phase: 180 deg },');
    expect(resolveText(text).scenario.states[1]!.level).toEqual({ re: -1, im: 0 });
  });

  it('accepts JSON as well as YAML', () => {
    const json = JSON.stringify({
      name: 'json',
      timing: { sampleRate: '10 MHz', recordLength: 2e-5 },
      states: [{ name: 'a', level: 0, outcome: 'x' }, { name: 'b', level: 1, outcome: 'y' }],
    });
    expect(resolveText(json).scenario.timing.sampleRate).toBe(1e7);
  });
});

describe('resolveScenario: warnings', () => {
  it.each([
    {
      what: 'sample rate below twice the carrier frequency',
      extra: 'signal: { carrier: { shape: sine, frequency: 6 MHz } }\n',
      key: 'signal.carrier.frequency',
      text: 'aliases',
    },
    {
      what: 'carrier period longer than the window',
      extra: 'signal: { carrier: { shape: square, frequency: 20 kHz } }\n',
      key: 'signal.carrier.frequency',
      text: 'longer than the window',
    },
    {
      what: 'T1 shorter than one sample',
      extra: 'transitions: [{ from: b, to: a, lifetime: 50 ns }]\n',
      key: 'transitions[0].lifetime',
      text: 'shorter than one sample',
    },
    {
      what: 'a rate above the sample rate',
      extra: 'transitions: [{ from: b, to: a, rate: 20 MHz }]\n',
      key: 'transitions[0].rate',
      text: 'shorter than one sample',
    },
    {
      what: 'fixed threshold outside the span of the levels',
      extra: 'processing: { threshold: { fixed: 2 } }\n',
      key: 'processing.threshold.fixed',
      text: 'outside the span of the levels',
    },
    {
      what: 'fixed threshold outside the span, in a pipeline list',
      extra: 'pipelines: [{ name: p, threshold: midpoint }, { name: q, threshold: { fixed: -1 } }]\n',
      key: 'pipelines[1].threshold.fixed',
      text: 'outside the span of the levels',
    },
  ])('$what', ({ extra, key, text }) => {
    const { warnings } = resolveText(MINIMAL + extra);
    expect(warnings).toHaveLength(1);
    expect(warnings[0]).toContain(`test.yaml: ${key}: `);
    expect(warnings[0]).toContain(text);
    expect(warnings[0]).not.toContain('\n');
  });

  it('a fixed threshold inside the span gives no warning', () => {
    expect(resolveText(MINIMAL + 'processing: { threshold: { fixed: 0.5 } }\n').warnings).toEqual([]);
  });
});

describe('resolveScenario: errors are InputErrors naming the key', () => {
  it.each([
    ['a number where a mapping is needed', 'timing: 5', 'timing'],
    ['an unknown key with no close match', 'timing: { sampleRate: 10 MHz, recordLength: 20 us, colour: red }', 'timing.colour'],
    ['a bad level form', 'states:\n  - { name: a, level: [1], outcome: 0 }\n  - { name: b, level: 1, outcome: 1 }', 'states[0].level'],
    ['an unknown key inside {re, im}', 'states:\n  - { name: a, level: { re: 1, im: 0, x: 2 }, outcome: 0 }\n  - { name: b, level: 1, outcome: 1 }', 'states[0].level.x'],
    ['a wrong unit inside {re, im}', 'states:\n  - { name: a, level: { re: 1 s, im: 0 }, outcome: 0 }\n  - { name: b, level: 1, outcome: 1 }', 'states[0].level.re'],
    ['a plain-number signal unit with a written unit', 'signal: { unit: none }\nstates:\n  - { name: a, level: 1 pA, outcome: 0 }\n  - { name: b, level: 1, outcome: 1 }', 'states[0].level'],
    ['a declared unit that the levels contradict', 'signal: { unit: V }\nstates:\n  - { name: a, level: 1 pA, outcome: 0 }\n  - { name: b, level: 1, outcome: 1 }', 'states[0].level'],
    ['a duplicate transition', 'transitions:\n  - { from: b, to: a, rate: 1 Hz }\n  - { from: b, to: a, rate: 2 Hz }', 'transitions[1].to'],
    ['a transition with neither lifetime nor rate', 'transitions:\n  - { from: b, to: a }', 'transitions[0]'],
    ['a flip into itself', 'mappingError: { a: { probability: 0.1, into: a } }', 'mappingError.a.into'],
    ['a mapping error with nothing in it', 'mappingError: { a: { into: b } }', 'mappingError.a'],
    ['an unknown state as a preparation error key', 'preparationError: { c: { probability: 0.1 } }', 'preparationError.c'],
    ['Infinity as a number', 'seed: .inf', 'seed'],
    ['a duplicate pipeline name', 'pipelines: [{ name: p }, { name: p }]', 'pipelines[1].name'],
    ['an empty pipeline list', 'pipelines: []', 'pipelines'],
    ['a bad reference phase', 'processing: { referencePhase: sideways }', 'processing.referencePhase'],
    ['a window between two samples', 'timing: { sampleRate: 10 MHz, recordLength: 20 us, window: { start: 120 ns, length: 50 ns } }', 'timing.window.length'],
    ['a record shorter than a sample', 'timing: { sampleRate: 10 MHz, recordLength: 1e-18 }', 'timing.recordLength'],
    ['a zero gain', 'signal: { gain: 0 }', 'signal.gain'],
    ['a batch size too large', 'batchSize: 2000000', 'batchSize'],
    ['a carrier that is neither none nor a mapping', 'signal: { carrier: sine }', 'signal.carrier'],
    ['both noise forms', 'signal: { noise: { white: { density: 1, perSample: 1 } } }', 'signal.noise.white'],
    ['neither noise form', 'signal: { noise: { white: {} } }', 'signal.noise.white'],
  ])('%s', (_what, change, path) => {
    // Later top-level keys replace earlier ones in YAML only if unique, so rebuild the document.
    const base = parseScenarioText(MINIMAL, 't') as Record<string, unknown>;
    const doc = { ...base, ...(parseScenarioText(change, 't') as Record<string, unknown>) };
    let error: unknown;
    try {
      resolveScenario(doc, 'test.yaml');
    } catch (e) {
      error = e;
    }
    expect(error, `no error for ${change}`).toBeInstanceOf(InputError);
    const err = error as InputError;
    expect(err.path).toBe(path);
    expect(err.message.startsWith(`test.yaml: ${path}: expected `), err.message).toBe(true);
    expect(err.message).not.toContain('\n');
  });
});
