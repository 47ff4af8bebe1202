import { sourcesOf } from '../support/noise-helpers.ts';
import { describe, expect, it } from 'vitest';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import { InputError } from '../../src/errors.ts';

const BASE = `
name: noise sections
timing: { sampleRate: 10 MHz, recordLength: 20 us, shotPeriod: 50 us }
states:
  - { name: low, level: 0 pA, outcome: "0" }
  - { name: high, level: 100 pA, outcome: "1" }
`;

const SENSOR_STATES = `
name: noise sections
timing: { sampleRate: 10 MHz, recordLength: 20 us }
states:
  - { name: low, outcome: "0" }
  - { name: high, outcome: "1" }
sensor:
  tunnelRates: { left: 1 GHz, right: 1 GHz }
  temperature: 100 mK
  bias: 20 uV
  shifts: { high: 10 ueV }
`;

const resolve = (text: string) => resolveScenario(parseScenarioText(text, 't.yaml'), 't.yaml');

function errorAt(text: string): string {
  try {
    resolve(text);
  } catch (e) {
    if (e instanceof InputError) return e.message;
    throw e;
  }
  return 'no error';
}

describe('signal.noise: flicker, telegraph, components', () => {
  it('reads a 1/f source as its density at a reference frequency: A = density²·at^α', () => {
    const s = resolve(`${BASE}signal:\n  noise:\n    flicker: { density: 5 pA/rtHz, at: 10 Hz, exponent: 1.5, low: 1 Hz, high: 100 kHz, injection: sensor }\n`).scenario;
    const f = sourcesOf(s.signal, 'flicker')[0]!;
    expect(f.amplitude).toBeCloseTo(25e-24 * 10 ** 1.5, 30);
    expect([f.name, f.exponent, f.low, f.high, f.injection, f.inDetuning]).toEqual(['flicker', 1.5, 1, 1e5, 'sensor', false]);
  });

  it('takes a list of sources with names and defaults (α = 1, at 1 Hz)', () => {
    const s = resolve(`${BASE}signal:\n  noise:\n    flicker:\n      - { density: 1 pA/rtHz, low: 1 Hz, high: 10 kHz, injection: sensor }\n      - { name: amp, density: 2 pA/rtHz, low: 1 Hz, high: 10 kHz, injection: amplifier }\n`).scenario;
    expect(sourcesOf(s.signal, 'flicker').map((f) => [f.name, f.amplitude, f.exponent])).toEqual([['flicker', 1e-24, 1], ['amp', 4e-24, 1]]);
  });

  it('reads fluctuators from rates or dwell times', () => {
    const s = resolve(`${BASE}signal:\n  noise:\n    telegraph:\n      - { amplitude: 20 pA, rateUp: 2 kHz, dwellHigh: 1 ms, injection: amplifier }\n`).scenario;
    const t = sourcesOf(s.signal, 'telegraph')[0]!;
    expect([t.amplitude, t.rateUp, t.rateDown, t.injection]).toEqual([20e-12, 2000, 1000, 'amplifier']);
  });

  it('reads components, the response and the digitizer in SI units', () => {
    const s = resolve(`${BASE}signal:
  response: { bandwidth: 1 MHz, from: zero }
  digitizer: { low: -1 nA, high: 1 nA, bits: 12 }
  noise:
    components: { senseResistor: 1 MOhm, temperature: 4 K, sensorCurrent: 1 nA, fano: 0.7, amplifierVoltage: 1 nV/rtHz, amplifierCurrent: 5 fA/rtHz }
`).scenario;
    expect(s.signal.components).toEqual({ resistance: 1e6, temperature: 4, current: 1e-9, fano: 0.7, amplifierVoltage: 1e-9, amplifierCurrent: 5e-15 });
    expect(s.signal.response!.timeConstant).toBeCloseTo(1 / (2 * Math.PI * 1e6), 20);
    expect(s.signal.response!.from).toBe('zero');
    expect(s.signal.digitizer).toEqual({ low: -1e-9, high: 1e-9, bits: 12 });
  });

  it('with a sensor, noise may be written in detuning units', () => {
    const s = resolve(`${SENSOR_STATES}signal:\n  noise:\n    flicker: { density: 1 ueV/rtHz, low: 1 Hz, high: 10 kHz, injection: sensor }\n    telegraph: { amplitude: 2 ueV, rateUp: 1 Hz, rateDown: 1 Hz, injection: sensor }\n`).scenario;
    expect(sourcesOf(s.signal, 'flicker')[0]!.inDetuning).toBe(true);
    expect(sourcesOf(s.signal, 'telegraph')[0]!.inDetuning).toBe(true);
    expect(s.signal.unit).toBe('A');
  });

  it.each([
    ['a band upside down', 'flicker: { density: 1 pA/rtHz, low: 10 kHz, high: 1 kHz, injection: sensor }', 'signal.noise.flicker.high'],
    ['a band above fs/2', 'flicker: { density: 1 pA/rtHz, low: 1 Hz, high: 6 MHz, injection: sensor }', 'signal.noise.flicker.high'],
    ['a missing injection', 'flicker: { density: 1 pA/rtHz, low: 1 Hz, high: 10 kHz }', 'signal.noise.flicker.injection'],
    ['detuning units without a sensor', 'flicker: { density: 1 ueV/rtHz, low: 1 Hz, high: 10 kHz, injection: sensor }', 'signal.noise.flicker.density'],
    ['a density in the wrong unit', 'flicker: { density: 1 pA, low: 1 Hz, high: 10 kHz, injection: sensor }', 'signal.noise.flicker.density'],
    ['both rateUp and dwellLow', 'telegraph: { amplitude: 1 pA, rateUp: 1 Hz, dwellLow: 1 s, rateDown: 1 Hz, injection: sensor }', 'signal.noise.telegraph'],
    ['a duplicate source name', 'flicker: [{ name: a, density: 1 pA/rtHz, low: 1 Hz, high: 1 kHz, injection: sensor }, { name: a, density: 1 pA/rtHz, low: 1 Hz, high: 1 kHz, injection: sensor }]', 'signal.noise.flicker[1].name'],
    ['a resistor without temperature', 'components: { senseResistor: 1 MOhm }', 'signal.noise.components.temperature'],
    ['e_n without a resistor', 'components: { amplifierVoltage: 1 nV/rtHz }', 'signal.noise.components.senseResistor'],
    ['sensorCurrent: sensor without a sensor', 'components: { sensorCurrent: sensor }', 'signal.noise.components.sensorCurrent'],
    ['components in volts', 'components: { amplifierCurrent: 1 fA/rtHz }\n  unit: V', 'signal.noise.components'],
  ])('%s is an InputError at its key', (_what, noise, path) => {
    const [first, ...rest] = noise.split('\n');
    const message = errorAt(`${BASE.replace(/pA/g, rest.length ? 'mV' : 'pA')}signal:\n  noise:\n    ${first}\n${rest.join('\n')}\n`);
    expect(message, message).toContain(`${path}:`);
  });

  it.each([
    ['both bandwidth and timeConstant', 'response: { bandwidth: 1 MHz, timeConstant: 1 us }', 'signal.response'],
    ['a digitizer range upside down', 'digitizer: { low: 1 nA, high: -1 nA }', 'signal.digitizer.high'],
    ['too many ADC bits', 'digitizer: { low: -1 nA, high: 1 nA, bits: 40 }', 'signal.digitizer.bits'],
  ])('%s is an InputError at its key', (_what, key, path) => {
    const message = errorAt(`${BASE}signal:\n  ${key}\n`);
    expect(message, message).toContain(`${path}:`);
  });
});

describe('sensor section', () => {
  it.each([
    ['a level given with a sensor', SENSOR_STATES.replace('{ name: low, outcome: "0" }', '{ name: low, level: 1 pA, outcome: "0" }'), 'states[0].level'],
    ['no level and no sensor', BASE.replace('level: 0 pA, ', ''), 'states[0].level'],
    ['a gate-voltage shift without a lever arm', SENSOR_STATES.replace('shifts: { high: 10 ueV }', 'shifts: { high: 1 mV }'), 'sensor.leverArm'],
    ['a shift of an unknown state', SENSOR_STATES.replace('shifts: { high: 10 ueV }', 'shifts: { hihg: 10 ueV }'), 'sensor.shifts.hihg'],
    ['a power law without its exponent', `${SENSOR_STATES}  readoutRelaxation:\n    - { from: high, to: low, law: power, rate: 1 kHz, atBias: 10 uV }\n`, 'sensor.readoutRelaxation[0].exponent'],
    ['a bias that is not a voltage', SENSOR_STATES.replace('bias: 20 uV', 'bias: 20 ueV'), 'sensor.bias'],
  ])('%s is an InputError at its key', (_what, text, path) => {
    const message = errorAt(text);
    expect(message, message).toContain(`${path}:`);
  });

  it('warns when the tunnel rates broaden the level beyond the sequential-tunnelling model', () => {
    const { warnings } = resolve(SENSOR_STATES.replace('{ left: 1 GHz, right: 1 GHz }', '{ left: 200 GHz, right: 200 GHz }'));
    expect(warnings.join('\n')).toMatch(/sensor\.tunnelRates: .*lifetime broadening/);
  });
});
