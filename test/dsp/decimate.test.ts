import { describe, expect, it } from 'vitest';
import { butterworthSections, sosFrequencyResponse } from '../../src/dsp/butterworth.ts';
import { antiAliasCutoff, averagedLength, averageDown, decimate, decimatedLength } from '../../src/dsp/decimate.ts';
import { applySections, makeSectionState } from '../../src/dsp/sosfilt.ts';
import { expectAllClose, toneAmplitude, xorshiftRecord } from './helpers.ts';

describe('decimate and averageDown', () => {
  const ramp = Float64Array.from({ length: 23 }, (_, n) => n);

  it.each([1, 2, 3, 5, 23, 30])('decimate by %i picks samples 0, f, 2f, …', (factor) => {
    const count = decimatedLength(ramp.length, factor);
    expect(count).toBe(Math.ceil(23 / factor));
    const out = decimate(ramp, factor, new Float64Array(count));
    expectAllClose('picked', out, Array.from({ length: count }, (_, i) => i * factor), () => 0);
  });

  it.each([1, 2, 3, 5, 23, 30])('averageDown by %i averages complete blocks (ramp: block mean i·f + (f − 1)/2)', (factor) => {
    // closed form: mean of i·f, …, i·f + f − 1 is i·f + (f − 1)/2
    const count = averagedLength(ramp.length, factor);
    expect(count).toBe(Math.floor(23 / factor));
    const out = averageDown(ramp, factor, new Float64Array(count));
    expectAllClose('block means', out, Array.from({ length: count }, (_, i) => i * factor + (factor - 1) / 2), () => 1e-15 * 23);
  });

  it('both work in place (output = input)', () => {
    const x = xorshiftRecord(0x5eed_0005, 1000);
    const picked = decimate(x, 7, new Float64Array(decimatedLength(x.length, 7)));
    const averaged = averageDown(x, 7, new Float64Array(averagedLength(x.length, 7)));
    const a = x.slice();
    const b = x.slice();
    expect(decimate(a, 7, a)).toBe(a);
    expect(averageDown(b, 7, b)).toBe(b);
    expectAllClose('decimate in place', a.subarray(0, picked.length), picked, () => 0);
    expectAllClose('averageDown in place', b.subarray(0, averaged.length), averaged, () => 0);
  });

  it('antiAliasCutoff is 80 % of the new Nyquist frequency', () => {
    // common practice, no source: 0.8 · fs / (2 · factor)
    expect(antiAliasCutoff(1e6, 10)).toBeCloseTo(40e3, 9);
    expect(antiAliasCutoff(250e6, 4)).toBeCloseTo(25e6, 3);
  });
});

describe('aliasing of a tone above the new Nyquist frequency', () => {
  // fs = 1 MS/s decimated by 10 to 100 kS/s; a 73 kHz tone lies above the new Nyquist (50 kHz).
  const fs = 1e6;
  const factor = 10;
  const newRate = fs / factor;
  const tone = 73e3;
  // closed form: sampling at fs' folds f to |f − round(f/fs')·fs'| = |73 − 100| kHz = 27 kHz
  const alias = Math.abs(tone - Math.round(tone / newRate) * newRate);
  const settle = 10_000; // samples dropped while the filter's transient decays
  const kept = 10_000; // 1000 decimated samples: 27 kHz falls on a DFT bin (100 Hz spacing)
  const x = Float64Array.from({ length: settle + kept }, (_, n) => Math.cos((2 * Math.PI * tone * n) / fs + 0.4));

  it('the alias frequency is 27 kHz', () => {
    expect(alias).toBeCloseTo(27e3, 6);
  });

  it('without an anti-alias filter the tone reappears at full amplitude at the alias frequency', () => {
    const picked = decimate(x.subarray(settle), factor, new Float64Array(kept / factor));
    // closed form: cos(2π·73k·10n/1M + φ) = cos(2π·27k·n/100k − φ): amplitude 1 at 27 kHz
    expectAllClose('amplitude at alias', [toneAmplitude(picked, alias, newRate)], [1], () => 1e-9);
    expectAllClose('amplitude one bin away', [toneAmplitude(picked, alias + 100, newRate)], [0], () => 1e-9);
  });

  it('with the anti-alias Butterworth the alias is attenuated by at least the designed amount', () => {
    const order = 8;
    const cutoff = antiAliasCutoff(fs, factor);
    const { sos, sections } = butterworthSections(order, cutoff, fs);
    const h = sosFrequencyResponse(sos, [tone], fs);
    const designed = Math.hypot(h.re[0], h.im[0]);
    // closed form (pre-warped bilinear Butterworth): |H| = (1 + (tan(πf/fs)/tan(πfc/fs))^(2N))^(−½) ≈ −43 dB
    expect(20 * Math.log10(designed)).toBeLessThan(-40);
    const filtered = applySections(sos, x, new Float64Array(x.length), makeSectionState(sections));
    const picked = decimate(filtered.subarray(settle), factor, new Float64Array(kept / factor));
    const measured = toneAmplitude(picked, alias, newRate);
    expect(measured, `measured ${measured}, designed ${designed}`).toBeLessThanOrEqual(designed * (1 + 1e-6));
    // After the transient the filtered tone is exactly |H|·cos(…): the measurement equals the design.
    expectAllClose('measured / designed', [measured / designed], [1], () => 1e-6);
  });

  it('a passband tone survives filtering and decimation with the designed gain', () => {
    const passTone = 12e3;
    const { sos, sections } = butterworthSections(8, antiAliasCutoff(fs, factor), fs);
    const h = sosFrequencyResponse(sos, [passTone], fs);
    const designed = Math.hypot(h.re[0], h.im[0]);
    const y = Float64Array.from({ length: settle + kept }, (_, n) => Math.cos((2 * Math.PI * passTone * n) / fs));
    applySections(sos, y, y, makeSectionState(sections));
    const picked = decimate(y.subarray(settle), factor, new Float64Array(kept / factor));
    expect(designed).toBeGreaterThan(0.999);
    expectAllClose('amplitude', [toneAmplitude(picked, passTone, newRate)], [designed], () => 1e-6);
  });
});
