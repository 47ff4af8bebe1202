/**
 * Simulated σ of the integrated value against the filter-function prediction (plan/predict-noise.ts),
 * source by source, through the trace engine: 20 480 shots each, 3 % tolerance.
 *
 * Statistics: the standard error of a pooled σ of N independent shots is σ/√(2N) = 0.5 %; 1/f
 * noise correlates the shots, so the band starts at 100 Hz with shots 100 µs apart (2 s of
 * timeline, 200 periods of the slowest component), which keeps the error of the σ estimate near
 * 1 % (Bartlett's variance of a variance estimate, from memory). Each prediction is also checked
 * against the ideal continuous filter-function integral ∫S|H|² df (Wiener–Khinchin), which knows
 * nothing of the generator's blocks, grids or interpolation, so the agreement is not circular.
 */
import { describe, expect, it } from 'vitest';
import { flicker, idealFlickerSigma, noiseScenario, runNoise, sourcesOf, type NoiseCase } from '../support/noise-helpers.ts';

const A = 1e-4;
const cases: { name: string; c: NoiseCase; ideal?: boolean }[] = [
  // white: σ² = S/(2τ) at baseband, S/τ with a sine carrier (DESIGN.md §4; test/plan/noise-sigma.test.ts)
  { name: 'white noise at baseband', c: { carrier: 'none', white: 1 } },
  { name: 'white noise with a 1 MHz carrier', c: { carrier: 'sine', white: 1 } },
  { name: 'amplifier-side 1/f at baseband', c: { carrier: 'none', shotPeriod: 100e-6, signal: { sources: [flicker('amplifier', A, 100, 200e3)] } }, ideal: true },
  { name: 'amplifier-side 1/f with a carrier', c: { carrier: 'sine', shotPeriod: 100e-6, signal: { sources: [flicker('amplifier', A, 100, 200e3)] } }, ideal: true },
  { name: 'sensor-side 1/f with a carrier', c: { carrier: 'sine', shotPeriod: 100e-6, signal: { sources: [flicker('sensor', A, 100, 200e3)] } }, ideal: true },
  {
    name: 'sensor-side 1/f through an 8 kHz bandwidth, with a carrier',
    c: {
      carrier: 'sine', shotPeriod: 100e-6,
      signal: { sources: [flicker('sensor', A, 100, 500e3, 0.7)], response: { timeConstant: 1 / (2 * Math.PI * 8e3), from: 'settled' } },
    },
    ideal: true,
  },
  // baseband I and Q, levels at 50°: the decision axis mixes both channels (signal/injection.ts)
  { name: 'white noise on baseband I and Q', c: { carrier: 'baseband-iq', white: 1, levelAngle: 0.87 } },
  { name: 'amplifier-side 1/f on baseband I and Q', c: { carrier: 'baseband-iq', levelAngle: 0.87, shotPeriod: 100e-6, signal: { sources: [flicker('amplifier', A, 100, 200e3)] } }, ideal: true },
  { name: 'sensor-side 1/f on baseband I and Q', c: { carrier: 'baseband-iq', levelAngle: 0.87, shotPeriod: 100e-6, signal: { sources: [flicker('sensor', A, 100, 200e3)] } }, ideal: true },
  {
    name: 'white + both 1/f injections + gain 2.5',
    c: { carrier: 'sine', white: 0.3, shotPeriod: 100e-6, signal: { gain: 2.5, sources: [flicker('sensor', A, 100, 200e3), flicker('amplifier', 3 * A, 100, 100e3, 1.3)] } },
  },
];

describe('simulated σ = filter-function prediction within 3 % (20 480 shots)', () => {
  it.each(cases)('$name', ({ name, c, ideal }) => {
    const run = runNoise(noiseScenario(c));
    const predicted = run.prediction.sigma;
    const rel = run.sigma / predicted - 1;
    expect(Math.abs(rel), `${name}: simulated σ ${run.sigma}, predicted ${predicted}, rel ${rel}, tol 0.03`).toBeLessThan(0.03);
    if (c.white && !c.signal) {
      const tau = 20e-6, S = (c.white * c.white) / (10e6 / 2);
      // on I and Q each channel's white noise is integrated like one baseband channel: cos² + sin² = 1
      const formula = Math.sqrt(c.carrier === 'none' || c.carrier === 'baseband-iq' ? S / (2 * tau) : S / tau);
      expect(Math.abs(predicted / formula - 1), `${name}: predicted ${predicted}, formula ${formula}`).toBeLessThan(1e-9);
    }
    if (ideal) {
      const f = sourcesOf(c.signal!, 'flicker')[0]!;
      const expected = idealFlickerSigma(run.point, f);
      expect(Math.abs(predicted / expected - 1), `${name}: prediction ${predicted}, ideal ∫S|H|² ${expected}`).toBeLessThan(0.03);
    }
  });

  it('the bandwidth matters in that case (the prediction without it is > 10 % higher)', () => {
    const c = cases[5]!.c;
    const without = runNoise(noiseScenario({ ...c, shots: 1024, signal: { ...c.signal, response: null } })).prediction.sigma;
    const withIt = runNoise(noiseScenario({ ...c, shots: 1024 })).prediction.sigma;
    expect(without / withIt, `σ without ${without}, with ${withIt}`).toBeGreaterThan(1.1);
  });
});

describe('where the noise enters decides what a carrier does (common practice, no source)', () => {
  const amp = (carrier: 'none' | 'sine') => runNoise(noiseScenario({ carrier, shotPeriod: 100e-6, signal: { sources: [flicker('amplifier', A, 100, 200e3)] } })).sigma;
  const sensor = (carrier: 'none' | 'sine') => runNoise(noiseScenario({ carrier, shotPeriod: 100e-6, signal: { sources: [flicker('sensor', A, 100, 200e3)] } })).sigma;

  it('a carrier lowers amplifier-side 1/f σ by ≥ 10× against baseband', () => {
    const base = amp('none'), carried = amp('sine');
    expect(base / carried, `baseband σ ${base}, carrier σ ${carried}`).toBeGreaterThanOrEqual(10);
  });

  it('a carrier does not lower sensor-side 1/f σ', () => {
    const base = sensor('none'), carried = sensor('sine');
    expect(carried / base, `baseband σ ${base}, carrier σ ${carried}`).toBeGreaterThan(0.95);
  });
});
