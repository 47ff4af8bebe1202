import { describe, expect, it } from 'vitest';
import {
  applySinglePole,
  makeSinglePoleState,
  singlePoleAlpha,
  singlePoleAlphaFromTimeConstant,
  singlePoleResponse,
} from '../../src/dsp/single-pole.ts';
import { expectAllClose, expectComplexClose, type FixtureComplex, filterInChunks, loadFixture, xorshiftRecord } from './helpers.ts';

interface SinglePoleCase {
  cutoff: number;
  sampleRate: number;
  alpha: number;
  freqs: number[];
  response: FixtureComplex;
  filtered: number[];
}
// reference library: scipy.signal freqz / lfilter of [α], [1, α − 1], test/fixtures/make-single-pole.py
const fixture = loadFixture<{ record: number[]; cases: SinglePoleCase[] }>('single-pole');
const cases = fixture.cases.map((c) => ({ ...c, name: `fc ${c.cutoff} Hz, fs ${c.sampleRate} Hz` }));

describe('single-pole low-pass against scipy.signal', () => {
  it.each(cases)('α = 1 − e^(−2π fc/fs) as in the fixture: $name', ({ cutoff, sampleRate, alpha }) => {
    expectAllClose('α', [singlePoleAlpha(cutoff, sampleRate)], [alpha], () => 4 * Number.EPSILON * alpha);
  });

  it.each(cases)('response equals freqz([α], [1, α − 1]): $name', ({ alpha, sampleRate, freqs, response }) => {
    expectComplexClose('H', singlePoleResponse(alpha, freqs, sampleRate), response, 1e-12);
  });

  it.each(cases)('recurrence equals lfilter([α], [1, α − 1]): $name', ({ alpha, filtered }) => {
    const out = applySinglePole(alpha, Float64Array.from(fixture.record), new Float64Array(filtered.length), makeSinglePoleState());
    const scale = Math.max(...filtered.map(Math.abs));
    expectAllClose('y', out, filtered, () => 1e-13 * scale);
  });
});

describe('single-pole low-pass against closed forms', () => {
  it.each(cases)('impulse response decays like the sampled RC response e^(−t/τ), τ = 1/(2π fc): $name', ({ cutoff, sampleRate }) => {
    // closed form: RC low-pass impulse response h(t) = e^(−t/τ)/τ, so h((n+1)T)/h(nT) = e^(−T/τ)
    // (impulse invariance, Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed., 2010, ch. 7)
    const alpha = singlePoleAlpha(cutoff, sampleRate);
    const impulse = new Float64Array(8);
    impulse[0] = 1;
    const h = applySinglePole(alpha, impulse, new Float64Array(8), makeSinglePoleState());
    const expectedRatio = Math.exp(-(2 * Math.PI * cutoff) / sampleRate);
    const ratios = Array.from({ length: 7 }, (_, n) => h[n + 1] / h[n]);
    expectAllClose('h[n+1]/h[n]', ratios, new Array(7).fill(expectedRatio), () => 1e-13);
    expectAllClose('h[0]', [h[0]], [alpha], () => 0);
  });

  it.each(cases)('response equals the DTFT of the (converged) impulse response: $name', ({ cutoff, sampleRate, freqs }) => {
    // closed form: H(e^{jω}) = Σ h[n] e^{−jωn} with h[n] = α(1 − α)^n; truncated where (1 − α)^n < 1e−18
    const alpha = singlePoleAlpha(cutoff, sampleRate);
    const n = Math.ceil(Math.log(1e-18) / Math.log(1 - alpha));
    const impulse = new Float64Array(n);
    impulse[0] = 1;
    const h = applySinglePole(alpha, impulse, impulse, makeSinglePoleState());
    const picked = freqs.filter((_, i) => i % 16 === 0);
    const dtft = { re: new Float64Array(picked.length), im: new Float64Array(picked.length) };
    picked.forEach((f, i) => {
      for (let k = 0; k < n; k++) {
        const w = (2 * Math.PI * f * k) / sampleRate;
        dtft.re[i] += h[k] * Math.cos(w);
        dtft.im[i] -= h[k] * Math.sin(w);
      }
    });
    expectComplexClose('H vs DTFT', singlePoleResponse(alpha, picked, sampleRate), dtft, 1e-11, 1e-13);
  });

  it.each(cases)('DC gain is 1: $name', ({ cutoff, sampleRate }) => {
    // closed form: H(1) = α / (1 − (1 − α)) = 1
    const h = singlePoleResponse(singlePoleAlpha(cutoff, sampleRate), [0], sampleRate);
    expectAllClose('H(0)', [h.re[0], h.im[0]], [1, 0], () => 2 * Number.EPSILON);
  });

  it('for fc ≪ fs the magnitude at fc approaches the analog 1/√2', () => {
    // closed form: RC low-pass |H(fc)| = 1/√2; the digital value differs by O(fc/fs)
    const fs = 1e9;
    const fc = 1e5;
    const h = singlePoleResponse(singlePoleAlpha(fc, fs), [fc], fs);
    expectAllClose('|H(fc)|', [Math.hypot(h.re[0], h.im[0])], [Math.SQRT1_2], () => 10 * (fc / fs));
  });

  it('a time constant τ gives the same α as the cutoff 1/(2πτ)', () => {
    // closed form: fc = 1/(2πτ) for the RC low-pass
    const tau = 3.3e-7;
    const fs = 20e6;
    expectAllClose('α', [singlePoleAlphaFromTimeConstant(tau, fs)], [singlePoleAlpha(1 / (2 * Math.PI * tau), fs)], () => 1e-15);
  });
});

describe('state in, state out', () => {
  const record = xorshiftRecord(0x5eed_0002, 10_000);
  const alpha = singlePoleAlpha(50e3, 1e6);

  it('chunked filtering with carried state equals one call exactly', () => {
    const wholeState = makeSinglePoleState();
    const whole = applySinglePole(alpha, record, new Float64Array(record.length), wholeState);
    const chunkState = makeSinglePoleState();
    const chunked = filterInChunks((i, o, s) => applySinglePole(alpha, i, o, s), record, chunkState, [1, 3, 250, 999]);
    expectAllClose('chunked y', chunked, whole, () => 0);
    expectAllClose('final state', chunkState, wholeState, () => 0);
    expect(wholeState[0]).toBe(whole[whole.length - 1]);
  });

  it('in place equals a separate output; a non-zero initial state is honoured', () => {
    const start = Float64Array.of(0.75);
    const separate = applySinglePole(alpha, record, new Float64Array(record.length), start.slice());
    const buffer = record.slice();
    expect(applySinglePole(alpha, buffer, buffer, start.slice())).toBe(buffer);
    expectAllClose('in-place y', buffer, separate, () => 0);
    // closed form: y[0] = y[−1] + α(x[0] − y[−1])
    expectAllClose('y[0]', [separate[0]], [0.75 + alpha * (record[0] - 0.75)], () => 0);
  });
});
