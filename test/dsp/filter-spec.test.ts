import { describe, expect, it } from 'vitest';
import { butterworthSections } from '../../src/dsp/butterworth.ts';
import { designFilter, type FilterSpec, filterImpulseResponse } from '../../src/dsp/filter-spec.ts';
import { expectAllClose, expectComplexClose, filterInChunks, xorshiftRecord } from './helpers.ts';

const fs = 1e6;
const specs: { name: string; spec: FilterSpec }[] = [
  { name: 'none', spec: { kind: 'none' } },
  { name: 'boxcar 8', spec: { kind: 'boxcar', length: 8 } },
  { name: 'single-pole 50 kHz', spec: { kind: 'single-pole', cutoff: 50e3 } },
  { name: 'butterworth 4 at 50 kHz', spec: { kind: 'butterworth', order: 4, cutoff: 50e3 } },
  { name: 'butterworth 5 at 120 kHz', spec: { kind: 'butterworth', order: 5, cutoff: 120e3 } },
  { name: 'fir 31 hann at 100 kHz', spec: { kind: 'fir', taps: 31, cutoff: 100e3, window: 'hann' } },
];
const freqs = Array.from({ length: 33 }, (_, i) => (i * fs) / 64); // 0 … fs/2

describe('designFilter: every kind behaves alike', () => {
  it.each(specs)('DC gain is 1: $name', ({ spec }) => {
    // closed form: every low-pass here is normalised to H(0) = 1 (the identity trivially)
    const h = designFilter(spec, fs).response([0]);
    expectAllClose('H(0)', [h.re[0], h.im[0]], [1, 0], () => 1e-12);
  });

  it.each(specs)('response equals the DTFT of the impulse response: $name', ({ spec }) => {
    // closed form: H(e^{jω}) = Σ h[n] e^{−jωn}; 4096 samples, where every IIR tail here is < 1e−30
    const designed = designFilter(spec, fs);
    const h = filterImpulseResponse(designed, 4096);
    const dtft = { re: new Float64Array(freqs.length), im: new Float64Array(freqs.length) };
    freqs.forEach((f, i) => {
      for (let n = 0; n < h.length; n++) {
        const w = (2 * Math.PI * f * n) / fs;
        dtft.re[i] += h[n] * Math.cos(w);
        dtft.im[i] -= h[n] * Math.sin(w);
      }
    });
    expectComplexClose('H vs DTFT', designed.response(freqs), dtft, 1e-10, 1e-13);
  });

  it.each(specs)('chunked apply with carried state equals one call exactly, and in place: $name', ({ spec }) => {
    const designed = designFilter(spec, fs);
    const x = xorshiftRecord(0x5eed_0006, 4000);
    const wholeState = designed.makeState();
    const whole = designed.apply(x, new Float64Array(x.length), wholeState);
    const chunkState = designed.makeState();
    const chunked = filterInChunks(designed.apply, x, chunkState, [1, 5, 64, 333]);
    expectAllClose('chunked y', chunked, whole, () => 0);
    expectAllClose('final state', chunkState, wholeState, () => 0);
    const buffer = x.slice();
    expect(designed.apply(buffer, buffer, designed.makeState())).toBe(buffer);
    expectAllClose('in-place y', buffer, whole, () => 0);
  });
});

describe('designFilter: each kind', () => {
  it('none is the identity with an empty state', () => {
    const designed = designFilter({ kind: 'none' }, fs);
    const x = xorshiftRecord(0x5eed_0007, 50);
    expect(designed.makeState().length).toBe(0);
    expectAllClose('y', designed.apply(x, new Float64Array(50), designed.makeState()), x, () => 0);
    expectAllClose('impulse', filterImpulseResponse(designed, 4), [1, 0, 0, 0], () => 0);
  });

  it('boxcar of L samples is the moving average with the Dirichlet response', () => {
    // closed form: H = (1/L)·sin(πfL/fs)/sin(πf/fs)·e^{−jπf(L−1)/fs} (Oppenheim & Schafer,
    // Discrete-Time Signal Processing, 3rd ed., 2010, ch. 2)
    const L = 8;
    const designed = designFilter({ kind: 'boxcar', length: L }, fs);
    expectAllClose('impulse', filterImpulseResponse(designed, 10), [...new Array(L).fill(1 / L), 0, 0], () => 1e-17);
    const f = freqs.slice(1);
    const expected = {
      re: new Float64Array(f.length),
      im: new Float64Array(f.length),
    };
    f.forEach((fi, i) => {
      const a = Math.sin((Math.PI * fi * L) / fs) / (L * Math.sin((Math.PI * fi) / fs));
      const phase = (-Math.PI * fi * (L - 1)) / fs;
      expected.re[i] = a * Math.cos(phase);
      expected.im[i] = a * Math.sin(phase);
    });
    expectComplexClose('H', designed.response(f), expected, 0, 1e-14);
  });

  it('butterworth uses butterworthSections; single-pole α and FIR taps are exposed', () => {
    const b = designFilter({ kind: 'butterworth', order: 4, cutoff: 50e3 }, fs);
    const coefficients = b.coefficients;
    expect(coefficients.kind).toBe('sections');
    if (coefficients.kind === 'sections') expectAllClose('sos', coefficients.sos, butterworthSections(4, 50e3, fs).sos, () => 0);
    expect(b.makeState().length).toBe(4);
    const s = designFilter({ kind: 'single-pole', cutoff: 50e3 }, fs);
    // closed form: α = 1 − e^(−2π fc/fs)
    if (s.coefficients.kind === 'single-pole') expectAllClose('α', [s.coefficients.alpha], [1 - Math.exp((-2 * Math.PI * 50e3) / fs)], () => 1e-15);
    else expect.unreachable('single-pole coefficients');
    const f = designFilter({ kind: 'fir', taps: 31, cutoff: 100e3, window: 'hann' }, fs);
    expect(f.coefficients.kind === 'taps' && f.coefficients.taps.length).toBe(31);
    expect(f.makeState().length).toBe(30);
  });

  it.each([
    { name: 'boxcar length 0', spec: { kind: 'boxcar', length: 0 } as FilterSpec },
    { name: 'single-pole cutoff −1', spec: { kind: 'single-pole', cutoff: -1 } as FilterSpec },
    { name: 'butterworth at Nyquist', spec: { kind: 'butterworth', order: 2, cutoff: fs / 2 } as FilterSpec },
    { name: 'fir 0 taps', spec: { kind: 'fir', taps: 0, cutoff: 1e3, window: 'hamming' } as FilterSpec },
  ])('rejects $name', ({ spec }) => {
    expect(() => designFilter(spec, fs)).toThrow(RangeError);
  });
});
