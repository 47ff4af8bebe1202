import { describe, expect, it } from 'vitest';
import { applyFir, firResponse, type FirWindow, makeFirHistory, windowedSincTaps } from '../../src/dsp/fir.ts';
import { expectAllClose, expectComplexClose, type FixtureComplex, filterInChunks, loadFixture, xorshiftRecord } from './helpers.ts';

interface FirCase {
  numTaps: number;
  cutoff: number;
  sampleRate: number;
  window: FirWindow;
  taps: number[];
  freqs: number[];
  response: FixtureComplex;
  filtered: number[];
}
// reference library: scipy.signal firwin / freqz / lfilter, test/fixtures/make-fir.py
const fixture = loadFixture<{ record: number[]; cases: FirCase[] }>('fir');
const cases = fixture.cases.map((c) => ({ ...c, name: `${c.numTaps} taps, ${c.window}, fc ${c.cutoff} Hz, fs ${c.sampleRate} Hz` }));

describe('windowedSincTaps against scipy.signal.firwin', () => {
  it.each(cases)('taps equal firwin: $name', ({ numTaps, cutoff, sampleRate, window, taps }) => {
    const scale = Math.max(...taps.map(Math.abs));
    expectAllClose('taps', windowedSincTaps(numTaps, cutoff, sampleRate, window), taps, () => 1e-13 * scale);
  });

  it.each(cases)('firResponse equals freqz of the firwin taps: $name', ({ taps, sampleRate, freqs, response }) => {
    // Rounding of an N-term sum: absolute tolerance against Σ|h| ≈ 1.
    expectComplexClose('H', firResponse(Float64Array.from(taps), freqs, sampleRate), response, 0, 1e-13);
  });

  it.each(cases)('applyFir equals lfilter(taps, 1, x): $name', ({ taps, filtered }) => {
    const out = applyFir(Float64Array.from(taps), Float64Array.from(fixture.record), new Float64Array(filtered.length), makeFirHistory(taps.length));
    expectAllClose('y', out, filtered, () => 1e-13);
  });
});

describe('windowed-sinc FIR against closed forms', () => {
  it.each(cases)('DC gain is 1 and the response has linear phase: $name', ({ numTaps, cutoff, sampleRate, window, freqs }) => {
    // closed form: symmetric taps h[n] = h[N−1−n] give H(e^{jω}) = e^{−jω(N−1)/2}·A(ω) with A real
    // (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed., 2010, ch. 5); Σh = 1 by construction.
    const taps = windowedSincTaps(numTaps, cutoff, sampleRate, window);
    const h = firResponse(taps, freqs, sampleRate);
    expectAllClose('H(0)', [h.re[0], h.im[0]], [1, 0], () => 1e-14);
    const rotatedImag = freqs.map((f, i) => {
      const w = (2 * Math.PI * f * (numTaps - 1)) / (2 * sampleRate);
      return h.re[i] * Math.sin(w) + h.im[i] * Math.cos(w); // Im(H·e^{+jω(N−1)/2})
    });
    expectAllClose('Im(H e^{jω(N−1)/2})', rotatedImag, new Array(freqs.length).fill(0), () => 1e-13);
    const mirrored = Array.from(taps).reverse();
    expectAllClose('h[N−1−n]', taps, mirrored, () => 0);
  });

  it.each(cases)('applyFir equals the direct convolution sum: $name', ({ numTaps, cutoff, sampleRate, window }) => {
    // closed form: y[n] = Σ_k h[k] x[n−k], x[n] = 0 before the record
    const taps = windowedSincTaps(numTaps, cutoff, sampleRate, window);
    const x = xorshiftRecord(0x5eed_0003, 300);
    const expected = Array.from(x, (_, n) => {
      let y = 0;
      for (let k = 0; k < taps.length && k <= n; k++) y += taps[k] * x[n - k];
      return y;
    });
    expectAllClose('y', applyFir(taps, x, new Float64Array(x.length), makeFirHistory(numTaps)), expected, () => 1e-14);
  });

  it('one tap is the identity; 3 rectangular taps at fs/4 are the normalised sinc samples', () => {
    // closed form: one tap is sinc(0)·w = 1 after normalisation; with c = 2fc/fs = ½ and no window,
    // h ∝ (sinc(−½), sinc(0), sinc(½)) = (2/π, 1, 2/π).
    expectAllClose('1 tap', windowedSincTaps(1, 1e3, 1e4, 'hann'), [1], () => 0);
    const s = 2 / Math.PI; // sinc(½) = sin(π/2)/(π/2)
    const expected = [s, 1, s].map((v) => v / (1 + 2 * s));
    expectAllClose('3 taps', windowedSincTaps(3, 2.5e3, 1e4, 'rectangular'), expected, () => 1e-16);
  });

  it.each([
    { numTaps: 0, cutoff: 1e3, sampleRate: 1e4, window: 'hann' as FirWindow },
    { numTaps: 3.5, cutoff: 1e3, sampleRate: 1e4, window: 'hann' as FirWindow },
    { numTaps: 11, cutoff: 5e3, sampleRate: 1e4, window: 'hann' as FirWindow },
    { numTaps: 11, cutoff: 1e3, sampleRate: 1e4, window: 'kaiser' as FirWindow },
  ])('rejects $numTaps taps, fc $cutoff, fs $sampleRate, $window', ({ numTaps, cutoff, sampleRate, window }) => {
    expect(() => windowedSincTaps(numTaps, cutoff, sampleRate, window)).toThrow(RangeError);
  });
});

describe('history in, history out', () => {
  const record = xorshiftRecord(0x5eed_0004, 5_000);
  const designs = [
    { name: '51-tap Hamming', taps: windowedSincTaps(51, 50e3, 1e6, 'hamming') },
    { name: '32-tap Blackman', taps: windowedSincTaps(32, 3e6, 20e6, 'blackman') },
    { name: '2-tap', taps: Float64Array.of(0.25, 0.75) },
    { name: '1-tap', taps: Float64Array.of(1) },
  ];

  it.each(designs)('chunked filtering (chunks shorter and longer than the history) equals one call exactly: $name', ({ taps }) => {
    const wholeHistory = makeFirHistory(taps.length);
    const whole = applyFir(taps, record, new Float64Array(record.length), wholeHistory);
    const chunkHistory = makeFirHistory(taps.length);
    const chunked = filterInChunks((i, o, s) => applyFir(taps, i, o, s), record, chunkHistory, [1, 2, 17, 3, 64, 500, 0]);
    expectAllClose('chunked y', chunked, whole, () => 0);
    expectAllClose('final history', chunkHistory, wholeHistory, () => 0);
    // The history is the last taps.length − 1 inputs, oldest first.
    expectAllClose('history = input tail', wholeHistory, record.subarray(record.length - (taps.length - 1)), () => 0);
  });

  it.each(designs)('in place (output = input) equals a separate output: $name', ({ taps }) => {
    const separate = applyFir(taps, record, new Float64Array(record.length), makeFirHistory(taps.length));
    const buffer = record.slice();
    expect(applyFir(taps, buffer, buffer, makeFirHistory(taps.length))).toBe(buffer);
    expectAllClose('in-place y', buffer, separate, () => 0);
  });
});
