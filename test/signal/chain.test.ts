import { describe, expect, it } from 'vitest';
import { respondedWaveform, responsePowerGain, writeRespondedSignal, type ResponseTables } from '../../src/signal/response.ts';
import { digitize, quantisationStep } from '../../src/signal/digitizer.ts';
import { exponentialQuadraticForm, filterFunctionVariance, kernelPowerGain, squaredSum } from '../../src/signal/filter-function.ts';
import { makePathBuffer } from '../../src/physics/chain.ts';
import { seededStream } from './seeded-stream.ts';

const fs = 50e6;
const n = 400;
const tau = 0.37e-6;
const gain = 1.5;
// two complex levels on a 2.5 MHz carrier
const levels = [{ re: 0.2, im: -0.1 }, { re: 1.1, im: 0.6 }];
const theta = (k: number) => 2 * Math.PI * 2.5e6 * k / fs + 0.3;
const inPhase = Float64Array.from({ length: n }, (_, k) => gain * Math.cos(theta(k)));
const quadrature = Float64Array.from({ length: n }, (_, k) => gain * Math.sin(theta(k)));
const waves = levels.map((l) => Float64Array.from({ length: n }, (_, k) => l.re * inPhase[k]! - l.im * quadrature[k]!));

function tables(fromZero: boolean): ResponseTables {
  return {
    timeConstant: tau, fromZero, channels: 1, inPhase, quadrature,
    levelRe: Float64Array.from(levels, (l) => l.re), levelIm: Float64Array.from(levels, (l) => l.im), negligible: 1e-18,
  };
}

function path(times: number[], entered: number[]) {
  const p = makePathBuffer();
  times.forEach((t, j) => { p.times[j] = t; p.entered[j] = entered[j]!; });
  p.jumps = times.length;
  return p;
}

/** y(t) by fourth-order Runge–Kutta on dy/dt = (L(t) − y)/τ, 2000 steps per sample (independent of the closed form). */
function integrate(start: number, times: number[], entered: number[], fromZero: boolean): { re: number; im: number }[] {
  const out: { re: number; im: number }[] = [];
  const level = (t: number) => {
    let s = start;
    times.forEach((tj, j) => { if (t >= tj) s = entered[j]!; });
    return levels[s]!;
  };
  let yr = fromZero ? 0 : levels[start]!.re, yi = fromZero ? 0 : levels[start]!.im;
  const steps = 2000;
  const h = 1 / (fs * steps);
  for (let k = 0; k < n; k++) {
    out.push({ re: yr, im: yi });
    for (let s = 0; s < steps; s++) {
      const t = (k * steps + s) * h;
      // the level is constant within a step unless a jump falls inside: split the step there
      const L0 = level(t + 1e-3 * h), L1 = level(t + h * (1 - 1e-3));
      if (L0 !== L1) {
        const tj = times.find((x) => x > t && x < t + h)!;
        const a = tj - t;
        const e1 = Math.exp(-a / tau);
        yr = L0.re + (yr - L0.re) * e1; yi = L0.im + (yi - L0.im) * e1;
        const e2 = Math.exp(-(h - a) / tau);
        yr = L1.re + (yr - L1.re) * e2; yi = L1.im + (yi - L1.im) * e2;
        continue;
      }
      const f = (y: number, L: number) => (L - y) / tau;
      const k1r = f(yr, L0.re), k2r = f(yr + 0.5 * h * k1r, L0.re), k3r = f(yr + 0.5 * h * k2r, L0.re), k4r = f(yr + h * k3r, L0.re);
      const k1i = f(yi, L0.im), k2i = f(yi + 0.5 * h * k1i, L0.im), k3i = f(yi + 0.5 * h * k2i, L0.im), k4i = f(yi + h * k3i, L0.im);
      yr += (h / 6) * (k1r + 2 * k2r + 2 * k3r + k4r);
      yi += (h / 6) * (k1i + 2 * k2i + 2 * k3i + k4i);
    }
  }
  return out;
}

describe('first-order response on the level path', () => {
  it.each([
    { fromZero: false, start: 0, times: [1.234e-6, 4.001e-6], entered: [1, 0] },
    { fromZero: true, start: 1, times: [2.5e-6], entered: [0] },
    { fromZero: true, start: 0, times: [], entered: [] },
  ])('closed form equals RK4 integration of dy/dt = (L − y)/τ (fromZero $fromZero, jumps $times)', ({ fromZero, start, times, entered }) => {
    const out = new Float64Array(n);
    writeRespondedSignal(out, 0, n, waves, tables(fromZero), start, path(times, entered), fs);
    const y = integrate(start, times, entered, fromZero);
    for (let k = 0; k < n; k++) {
      const expected = y[k]!.re * inPhase[k]! - y[k]!.im * quadrature[k]!;
      expect(Math.abs(out[k]! - expected), `sample ${k}: ${out[k]} vs RK4 ${expected}`).toBeLessThan(1e-9);
    }
  });

  it('writing [lo, mid) and [mid, hi) separately equals writing [lo, hi) up to rounding (chunking)', () => {
    const t = tables(true);
    const p = path([1.234e-6, 4.001e-6], [1, 0]);
    const one = new Float64Array(n);
    writeRespondedSignal(one, 20, 380, waves, t, 0, p, fs);
    const two = new Float64Array(n);
    writeRespondedSignal(two, 20, 150, waves, t, 0, p, fs);
    writeRespondedSignal(two, 150, 380, waves, t, 0, p, fs);
    // each call evaluates the closed form from t = 0, so a split changes only the rounding
    for (let k = 0; k < n; k++) expect(Math.abs(two[k]! - one[k]!), `sample ${k}`).toBeLessThan(1e-14);
  });

  it('the no-jump ring-up is L·(1 − e^(−t/τ)) and the settled waveform is the level itself', () => {
    const ring = respondedWaveform(waves[1]!, tables(true), 1, fs, new Float64Array(n));
    for (const k of [0, 5, 50, 399]) {
      const f = 1 - Math.exp(-k / (fs * tau));
      expect(ring[k]).toBeCloseTo(f * waves[1]![k]!, 12);
    }
    expect(Array.from(respondedWaveform(waves[1]!, tables(false), 1, fs, new Float64Array(n)))).toEqual(Array.from(waves[1]!));
  });

  it('|H(f)|² is ½ at the bandwidth 1/(2πτ) and 1 at DC', () => {
    expect(responsePowerGain(tau, 1 / (2 * Math.PI * tau))).toBeCloseTo(0.5, 14);
    expect(responsePowerGain(tau, 0)).toBe(1);
  });
});

describe('digitizer', () => {
  it('clips to the range and counts the clipped samples', () => {
    const x = new Float64Array([-3, -1, 0, 1, 2.5, 3, NaN]);
    const clipped = digitize(x, 0, 6, { low: -1, high: 2.5, codes: 0 });
    expect(clipped).toBe(2);
    expect(Array.from(x.subarray(0, 6))).toEqual([-1, -1, 0, 1, 2.5, 2.5]);
  });

  it('quantises to code centres; the error variance is step²/12 for broad noise (Widrow, IRE Trans. Circuit Theory 3, 266 (1956))', () => {
    const d = { low: -4, high: 4, codes: 2 ** 6 };
    const step = quantisationStep(d);
    const s = seededStream('adc');
    const m = 200000;
    const x = Float64Array.from({ length: m }, () => 0.6 * s.nextNormal()); // ±4 is 6.7 σ: nothing clips
    const y = Float64Array.from(x);
    expect(digitize(y, 0, m, d)).toBe(0);
    let e2 = 0, offCentre = 0;
    for (let i = 0; i < m; i++) {
      const code = (y[i]! - d.low) / step - 0.5;
      offCentre = Math.max(offCentre, Math.abs(code - Math.round(code)));
      e2 += (y[i]! - x[i]!) ** 2;
    }
    expect(offCentre, 'largest distance of an output from a code centre, in steps').toBeLessThan(1e-9);
    // uniform error: relative SD of the mean square √(0.8/m) ≈ 0.2 %; bound 2 %
    expect(Math.abs(e2 / m / (step * step / 12) - 1), `mean square error ${e2 / m}, step²/12 ${step * step / 12}`).toBeLessThan(0.02);
  });
});

describe('filter function', () => {
  const s = seededStream('ff');
  const x = Float64Array.from({ length: 300 }, () => s.nextNormal());

  it('exponentialQuadraticForm equals the double sum Σ x_k x_k′ ρ^|k−k′|', () => {
    for (const rho of [0, 0.3, 0.97, 1]) {
      let direct = 0;
      for (let a = 10; a < 290; a++) for (let b = 10; b < 290; b++) direct += x[a]! * x[b]! * rho ** Math.abs(a - b);
      expect(exponentialQuadraticForm(x, 10, 290, rho)).toBeCloseTo(direct, 8);
    }
  });

  it('kernelPowerGain equals |Σ K e^(−i2πfk/fs)|² summed directly', () => {
    for (const f of [0, 1.3e5, 7.77e6, 24e6]) {
      let re = 0, im = 0;
      for (let k = 0; k < 300; k++) { re += x[k]! * Math.cos(2 * Math.PI * f * k / fs); im -= x[k]! * Math.sin(2 * Math.PI * f * k / fs); }
      expect(kernelPowerGain(x, 0, 300, fs, f)).toBeCloseTo(re * re + im * im, 8);
    }
  });

  it('white noise: ∫_0^(fs/2) S|H|² df = S·(fs/2)·Σ K² (Parseval) within 1 %', () => {
    const v = filterFunctionVariance(() => 2, x, 0, 300, fs, 1, fs / 2, 64);
    const expected = 2 * (fs / 2) * squaredSum(x, 0, 300);
    expect(Math.abs(v / expected - 1), `∫ ${v}, Parseval ${expected}`).toBeLessThan(0.01);
  });
});
