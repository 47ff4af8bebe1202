/**
 * The noise-source contract's kinds (src/signal/noise/): their spectra against published
 * formulas, their variance against the spectrum's integral, and the registry's shape.
 */
import { describe, expect, it } from 'vitest';
import { NOISE_KINDS, noiseKind, sourcesByKind } from '../../src/signal/noise/registry.ts';
import { flickerKind, type FlickerSourceSpec } from '../../src/signal/noise/flicker.ts';
import { telegraphKind, type TelegraphSourceSpec } from '../../src/signal/noise/telegraph.ts';
import type { NoisePointContext } from '../../src/signal/noise/contract.ts';
import { makeGrid } from '../../src/signal/grid.ts';
import { injectionRealisations } from '../../src/signal/injection.ts';
import { responsePowerGain } from '../../src/signal/response.ts';

const timing = { sampleRate: 10e6, recordLength: 20e-6, windowStart: 0, windowLength: 20e-6, shotPeriod: 40e-6 };
function context(): NoisePointContext {
  const grid = makeGrid(timing);
  const sensorWeight = new Float64Array(grid.samples).fill(1);
  return {
    grid, timing, shots: 4096, calibrationShots: 1024, gain: 1, channels: 1, sensorWeight,
    realisations: injectionRealisations(1, grid.samples, 1, sensorWeight),
    synthLo: 0, synthHi: grid.samples, responseTimeConstant: null, kernels: [],
  };
}

/** ∫ S(f) df on [a, b] by the trapezoid rule on a log grid. */
function integrate(s: (f: number) => number, a: number, b: number, n = 200_000): number {
  let sum = 0;
  let prevF = a, prevS = s(a);
  for (let i = 1; i <= n; i++) {
    const f = a * (b / a) ** (i / n);
    const v = s(f);
    sum += 0.5 * (v + prevS) * (f - prevF);
    prevF = f; prevS = v;
  }
  return sum;
}

describe('telegraph kind', () => {
  const spec: TelegraphSourceSpec = { kind: 'telegraph', name: 't', amplitude: 0.7, rateUp: 300, rateDown: 900, injection: 'amplifier', inDetuning: false };
  const kind = telegraphKind.compile([spec], context());

  it('its one-sided spectrum is Machlup\'s Lorentzian 4a²π(1−π)λ/(λ² + (2πf)²) (Machlup, J. Appl. Phys. 25, 341 (1954))', () => {
    const lambda = 1200, p = 300 / 1200, a = 0.7;
    for (const f of [0, 10, 191, 1e3, 1e5]) {
      const expected = (4 * a * a * p * (1 - p) * lambda) / (lambda * lambda + (2 * Math.PI * f) ** 2);
      expect(Math.abs(kind.spectrum(0, f) / expected - 1), `f = ${f}`).toBeLessThan(1e-14);
    }
  });

  it('its spectrum integrates to the process variance a²π(1−π) (Parseval; within 1e-3)', () => {
    const total = integrate((f) => kind.spectrum(0, f), 1e-3, 1e9);
    expect(Math.abs(total / (0.7 * 0.7 * 0.25 * 0.75) - 1)).toBeLessThan(1e-3);
  });

  it('one sample seen alone has the variance a²π(1−π) (x = δ_k)', () => {
    const x = new Float64Array(200);
    x[17] = 1;
    expect(kind.variance(0, x, 0, 200, timing.sampleRate)).toBeCloseTo(0.7 * 0.7 * 0.25 * 0.75, 15);
  });

  it('is blocked from the exact engine, with the reason the user sees', () => {
    expect(telegraphKind.exactBlocker).toBe('telegraph noise is not Gaussian');
    expect(kind.linear).toBe(false);
  });
});

describe('flicker kind', () => {
  const spec: FlickerSourceSpec = { kind: 'flicker', name: 'f', amplitude: 2e-3, exponent: 1.3, low: 100, high: 1e5, injection: 'sensor', inDetuning: false };

  it('its spectrum is A/f^α inside [low, high] and zero outside (the defining formula)', () => {
    const kind = flickerKind.compile([spec], context());
    expect(kind.spectrum(0, 50)).toBe(0);
    expect(kind.spectrum(0, 2e5)).toBe(0);
    for (const f of [100, 1234, 1e5]) expect(Math.abs(kind.spectrum(0, f) / (2e-3 / f ** 1.3) - 1)).toBeLessThan(1e-14);
  });

  it('sensor-side, through an analog response, its spectrum carries the response\'s power gain |H(f)|²', () => {
    const tau = 1 / (2 * Math.PI * 3e4);
    const kind = flickerKind.compile([spec], { ...context(), responseTimeConstant: tau });
    for (const f of [300, 3e4, 9e4]) expect(Math.abs(kind.spectrum(0, f) / ((2e-3 / f ** 1.3) * responsePowerGain(tau, f)) - 1)).toBeLessThan(1e-14);
  });

  it('a detuning amplitude becomes (dI/dε)²·A in signal units (linear response)', () => {
    const d = flickerKind.fromDetuning({ ...spec, inDetuning: true }, { slope: 3, step: (x) => 3 * x });
    expect(d.amplitude).toBeCloseTo(9 * 2e-3, 15);
    expect(d.inDetuning).toBe(false);
  });
});

describe('the registry', () => {
  it('lists each kind once, with a config the scenario can read, and finds a spec\'s kind', () => {
    const names = NOISE_KINDS.map((k) => k.kind);
    expect(new Set(names).size).toBe(names.length);
    for (const k of NOISE_KINDS) {
      expect(Object.keys(k.config.fields)).toContain('injection');
      expect(k.config.maxEntries).toBeGreaterThan(0);
    }
    expect(noiseKind({ kind: 'telegraph', name: 'x', injection: 'sensor', inDetuning: false })).toBe(NOISE_KINDS.find((k) => k.kind === 'telegraph'));
    expect(() => noiseKind({ kind: 'nonsense', name: 'x', injection: 'sensor', inDetuning: false })).toThrow(/unknown kind "nonsense"/);
  });

  it('groups sources by kind in registry order, whatever their order in the list', () => {
    const t = { kind: 'telegraph', name: 't', injection: 'sensor' as const, inDetuning: false };
    const f = { kind: 'flicker', name: 'f', injection: 'sensor' as const, inDetuning: false };
    expect(sourcesByKind([t, f, t]).map((g) => [g.kind.kind, g.specs.length])).toEqual([['flicker', 1], ['telegraph', 2]]);
    expect(sourcesByKind(undefined)).toEqual([]);
  });
});
