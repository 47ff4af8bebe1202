import { describe, expect, it } from 'vitest';
import { butterworthSections, sosFrequencyResponse } from '../../src/dsp/butterworth.ts';
import { complexMagnitude } from '../../src/dsp/complex-response.ts';
import { expectAllClose, expectComplexClose, type FixtureComplex, loadFixture } from './helpers.ts';

interface ButterworthCase {
  order: number;
  cutoff: number;
  sampleRate: number;
  sos: number[];
  zeros: FixtureComplex;
  poles: FixtureComplex;
  gain: number;
  freqs: number[];
  response: FixtureComplex;
}
// reference library: scipy.signal butter / sosfreqz, test/fixtures/make-butterworth.py
const fixture = loadFixture<{ cases: ButterworthCase[] }>('butterworth');
const cases = fixture.cases.map((c) => ({ ...c, name: `order ${c.order}, fc ${c.cutoff} Hz, fs ${c.sampleRate} Hz` }));

/** Matches every actual root to its nearest unused expected root; returns the worst relative miss. */
function worstRootMismatch(actual: FixtureComplex | { re: Float64Array; im: Float64Array }, expected: FixtureComplex) {
  const used = new Array<boolean>(expected.re.length).fill(false);
  let worst = { relative: 0, index: -1, actual: '', expected: '' };
  for (let i = 0; i < actual.re.length; i++) {
    let best = -1;
    let bestDistance = Infinity;
    for (let j = 0; j < expected.re.length; j++) {
      if (used[j]) continue;
      const d = Math.hypot(actual.re[i] - expected.re[j], actual.im[i] - expected.im[j]);
      if (d < bestDistance) {
        bestDistance = d;
        best = j;
      }
    }
    used[best] = true;
    const relative = bestDistance / Math.hypot(expected.re[best], expected.im[best]);
    if (relative > worst.relative || worst.index < 0) {
      worst = {
        relative,
        index: i,
        actual: `${actual.re[i]}${actual.im[i] < 0 ? '' : '+'}${actual.im[i]}j`,
        expected: `${expected.re[best]}${expected.im[best] < 0 ? '' : '+'}${expected.im[best]}j`,
      };
    }
  }
  return worst;
}

describe('butterworthSections against scipy.signal.butter', () => {
  const tol = 1e-9; // relative, as asked of the design
  it.each(cases)('poles equal scipy zpk poles as a set: $name', ({ order, cutoff, sampleRate, poles }) => {
    const design = butterworthSections(order, cutoff, sampleRate);
    expect(design.poles.re.length).toBe(poles.re.length);
    const worst = worstRootMismatch(design.poles, poles);
    expect(worst.relative, `pole ${worst.index}: actual ${worst.actual}, expected ${worst.expected}, tol ${tol}`).toBeLessThanOrEqual(tol);
  });

  it.each(cases)('zeros and gain equal scipy zpk: $name', ({ order, cutoff, sampleRate, zeros, gain }) => {
    const design = butterworthSections(order, cutoff, sampleRate);
    expect(design.zeros.re.length).toBe(zeros.re.length);
    const worst = worstRootMismatch(design.zeros, zeros);
    expect(worst.relative, `zero ${worst.index}: actual ${worst.actual}, expected ${worst.expected}, tol ${tol}`).toBeLessThanOrEqual(tol);
    const relative = Math.abs(design.gain - gain) / gain;
    expect(relative, `gain: actual ${design.gain}, expected ${gain}, tol ${tol}`).toBeLessThanOrEqual(tol);
  });

  it.each(cases)('sections equal scipy sos row by row: $name', ({ order, cutoff, sampleRate, sos }) => {
    const design = butterworthSections(order, cutoff, sampleRate);
    expect(design.sections).toBe(Math.ceil(order / 2));
    // Coefficients are O(1) except b of section 0 (which carries the gain): relative to the row's scale.
    const rowScale = (i: number) => Math.max(...sos.slice(6 * Math.floor(i / 6), 6 * Math.floor(i / 6) + 3).map(Math.abs));
    expectAllClose('sos', design.sos, sos, (i) => (i % 6 < 3 ? 1e-12 * rowScale(i) : 1e-12));
  });

  it.each(cases)('response equals sosfreqz on the grid: $name', ({ order, cutoff, sampleRate, freqs, response }) => {
    const { sos } = butterworthSections(order, cutoff, sampleRate);
    expectComplexClose('H', sosFrequencyResponse(sos, freqs, sampleRate), response, tol);
  });
});

describe('butterworthSections against closed forms', () => {
  // closed form: the bilinear-transformed Butterworth magnitude with pre-warping,
  // |H(f)|² = 1 / (1 + (tan(πf/fs) / tan(πfc/fs))^(2N)) (Oppenheim & Schafer, Discrete-Time Signal
  // Processing, 3rd ed., 2010, ch. 7); hence |H(0)| = 1 (DC gain) and |H(fc)| = 1/√2.
  it.each(cases)('magnitude follows the pre-warped Butterworth law: $name', ({ order, cutoff, sampleRate, freqs }) => {
    const { sos } = butterworthSections(order, cutoff, sampleRate);
    const magnitude = complexMagnitude(sosFrequencyResponse(sos, freqs, sampleRate), new Float64Array(freqs.length));
    const ratio = (f: number) => Math.tan((Math.PI * f) / sampleRate) / Math.tan((Math.PI * cutoff) / sampleRate);
    const expected = freqs.map((f) => 1 / Math.sqrt(1 + ratio(f) ** (2 * order)));
    expectAllClose('|H|', magnitude, expected, (i) => 1e-9 * expected[i]);
  });

  it.each(cases)('DC gain 1 and −3 dB at the cutoff: $name', ({ order, cutoff, sampleRate }) => {
    const { sos } = butterworthSections(order, cutoff, sampleRate);
    const h = sosFrequencyResponse(sos, [0, cutoff], sampleRate);
    const tol = 1e-12;
    expectAllClose('H(0) re, im', [h.re[0], h.im[0]], [1, 0], () => tol);
    expectAllClose('|H(fc)|', [Math.hypot(h.re[1], h.im[1])], [Math.SQRT1_2], () => tol);
  });

  it('odd orders have one section with a first-order denominator (a2 = 0), section 0 as in scipy', () => {
    // reference library: scipy.signal.zpk2sos(pairing='nearest') puts the real pole in section 0
    const { sos, sections } = butterworthSections(5, 50e3, 1e6);
    const a2 = Array.from({ length: sections }, (_, s) => sos[6 * s + 5]);
    expect(a2[0]).toBe(0);
    expect(a2.slice(1).every((v) => v > 0)).toBe(true);
  });

  it.each([
    { order: 0, cutoff: 1e3, sampleRate: 1e4 },
    { order: 2.5, cutoff: 1e3, sampleRate: 1e4 },
    { order: 2, cutoff: 0, sampleRate: 1e4 },
    { order: 2, cutoff: 5e3, sampleRate: 1e4 },
    { order: 2, cutoff: Number.NaN, sampleRate: 1e4 },
    { order: 2, cutoff: 1e3, sampleRate: -1 },
  ])('rejects order $order, cutoff $cutoff, fs $sampleRate', ({ order, cutoff, sampleRate }) => {
    expect(() => butterworthSections(order, cutoff, sampleRate)).toThrow(RangeError);
  });
});
