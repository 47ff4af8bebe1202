/**
 * The sensor front end through the scenario path: levels, readout-induced relaxation and
 * detuning noise follow from the sensor dot (Beenakker, Phys. Rev. B 44, 1646 (1991)).
 */
import { sourcesOf } from '../support/noise-helpers.ts';
import { describe, expect, it } from 'vitest';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { sensorCurrent, sensorSlope, type SensorParams } from '../../src/physics/sensor.ts';
import { ELEMENTARY_CHARGE } from '../../src/physics/constants.ts';

const ueV = 1e-6 * ELEMENTARY_CHARGE;

function sensorYaml(sensor: string, signal = ''): string {
  return `
name: sensor test
timing: { sampleRate: 10 MHz, recordLength: 20 us }
states:
  - { name: empty, outcome: "0" }
  - { name: loaded, outcome: "1" }
prepare: { empty: 3, loaded: 1 }
transitions:
  - { from: loaded, to: empty, lifetime: 1 ms }
sensor:
${sensor}
signal:
  unit: A
${signal}
`;
}

const resolve = (text: string) => resolveScenario(parseScenarioText(text, 's.yaml'), 's.yaml');

const BASE = `  tunnelRates: { left: 1 GHz, right: 2 GHz }
  temperature: 100 mK
  operatingPoint: 15 ueV
  shifts: { loaded: 20 ueV }`;

describe('sensor levels through the scenario path', () => {
  it('each state\'s level is the sensor current at the operating detuning plus its shift', () => {
    const { scenario } = resolve(sensorYaml(`${BASE}\n  bias: 30 uV`));
    const p: SensorParams = { gammaL: 1e9, gammaR: 2e9, temperature: 0.1, bias: 30e-6 };
    expect(scenario.states[0]!.level.re).toBeCloseTo(sensorCurrent(p, 15 * ueV), 22);
    expect(scenario.states[1]!.level.re).toBeCloseTo(sensorCurrent(p, 35 * ueV), 22);
    const compiled = compilePoint(scenario);
    expect(compiled.scenario.states[1]!.level.re).toBe(scenario.states[1]!.level.re);
  });

  it('sweeping the bias at a fixed operating point: the signal rises, peaks and falls (common practice, no source)', () => {
    const biases = [2, 5, 10, 20, 40, 80, 160, 320, 640, 1280];
    const signal = biases.map((b) => {
      const s = compilePoint(resolve(sensorYaml(`${BASE}\n  bias: ${b} uV`)).scenario).scenario;
      return Math.abs(s.states[1]!.level.re - s.states[0]!.level.re);
    });
    const peak = signal.indexOf(Math.max(...signal));
    const text = `bias ${biases.join(', ')} µV → signal ${signal.map((x) => x.toExponential(3)).join(', ')}`;
    expect(peak, text).toBeGreaterThan(0);
    expect(peak, text).toBeLessThan(biases.length - 1);
    for (let i = 1; i <= peak; i++) expect(signal[i]!, `${text}: rises before the peak`).toBeGreaterThan(signal[i - 1]!);
    for (let i = peak + 1; i < biases.length; i++) expect(signal[i]!, `${text}: falls after the peak`).toBeLessThan(signal[i - 1]!);
    // large bias: both levels on the plateau, the signal falls towards zero
    expect(signal[biases.length - 1]! / signal[peak]!).toBeLessThan(0.2);
  });

  it('gate-voltage detunings use the lever arm', () => {
    const a = resolve(sensorYaml(`${BASE}\n  bias: 30 uV`)).scenario;
    const b = resolve(sensorYaml(`  tunnelRates: { left: 1 GHz, right: 2 GHz }
  temperature: 100 mK
  leverArm: 0.05
  operatingPoint: 0.3 mV
  shifts: { loaded: 0.4 mV }
  bias: 30 uV`)).scenario;
    // 0.05 eV/V × 0.3 mV = 15 µeV, × 0.4 mV = 20 µeV
    expect(b.states[1]!.level.re).toBeCloseTo(a.states[1]!.level.re, 20);
    expect(b.states[0]!.level.re).toBeCloseTo(a.states[0]!.level.re, 20);
  });
});

describe('readout-induced relaxation (phenomenological law, no source)', () => {
  const relax = (law: string) => compilePoint(resolve(sensorYaml(`${BASE}\n  bias: 60 uV\n  readoutRelaxation:\n    - ${law}`)).scenario).chain.rate;
  it('a power law adds rate·(V/atBias)^exponent to the transition', () => {
    const rate = relax('{ from: loaded, to: empty, law: power, rate: 200 Hz, atBias: 30 uV, exponent: 2 }');
    expect(rate[1 * 2 + 0]).toBeCloseTo(1e3 + 200 * 4, 9);
  });
  it('an exponential law can replace it', () => {
    const rate = relax('{ from: loaded, to: empty, law: exponential, rate: 10 Hz, scale: 20 uV, combine: replace }');
    expect(rate[1 * 2 + 0]).toBeCloseTo(10 * Math.exp(3), 9);
  });
  it('a law between states with no transition creates one', () => {
    const rate = relax('{ from: empty, to: loaded, law: power, rate: 5 Hz, atBias: 60 uV, exponent: 1 }');
    expect(rate[0 * 2 + 1]).toBeCloseTo(5, 12);
    expect(rate[1 * 2 + 0]).toBeCloseTo(1e3, 9);
  });
});

describe('noise in detuning units and the sensor current', () => {
  it('1/f detuning noise becomes (dI/dε)²·A, a detuning fluctuator the exact current step, and shot noise uses the mean current', () => {
    const { scenario } = resolve(sensorYaml(`${BASE}\n  bias: 30 uV`, `  noise:
    components: { sensorCurrent: sensor, fano: 0.5 }
    flicker: { density: 0.5 ueV/rtHz, low: 1 Hz, high: 100 kHz, injection: sensor }
    telegraph: { amplitude: 3 ueV, rateUp: 10 Hz, rateDown: 20 Hz, injection: sensor }`));
    const c = compilePoint(scenario).scenario;
    const p: SensorParams = { gammaL: 1e9, gammaR: 2e9, temperature: 0.1, bias: 30e-6 };
    const slope = sensorSlope(p, 15 * ueV);
    const f = sourcesOf(c.signal, 'flicker')[0]!;
    expect(f.inDetuning).toBe(false);
    expect(f.amplitude / ((0.5 * ueV) ** 2 * slope * slope)).toBeCloseTo(1, 12);
    const t = sourcesOf(c.signal, 'telegraph')[0]!;
    expect(t.amplitude).toBeCloseTo(sensorCurrent(p, 18 * ueV) - sensorCurrent(p, 15 * ueV), 22);
    // prepared 3:1, so the shot-noise current is ¾|I(ε0)| + ¼|I(ε0 + δ)|
    const mean = 0.75 * Math.abs(sensorCurrent(p, 15 * ueV)) + 0.25 * Math.abs(sensorCurrent(p, 35 * ueV));
    expect(c.signal.components!.current).toBeCloseTo(mean, 22);
    const point = compilePoint(scenario);
    const shot = point.noise.white.find((w) => w.name === 'shot')!;
    // Schottky, Ann. Phys. 57, 541 (1918): S = 2eIF
    expect(shot.density).toBeCloseTo(Math.sqrt(2 * ELEMENTARY_CHARGE * mean * 0.5), 24);
  });
});
