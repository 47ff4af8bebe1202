import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { welchDensity } from '../../src/analysis/welch.ts';
import { seededStream } from './seeded-stream.ts';

interface WelchFixture {
  sampleRate: number;
  x: number[];
  cases: { segmentLength: number; removeMean: boolean; frequencies: number[]; density: number[] }[];
}
const fixture = JSON.parse(
  readFileSync(new URL('../fixtures/welch.json', import.meta.url), 'utf8'),
) as WelchFixture;

describe('Welch PSD (Welch, IEEE Trans. Audio Electroacoust. 15, 70 (1967))', () => {
  // reference library: scipy.signal.welch, fixture from test/fixtures/make-welch.py
  it.each(fixture.cases)('matches scipy.signal.welch, L = $segmentLength, removeMean = $removeMean', (c) => {
    const x = Float64Array.from(fixture.x);
    const est = welchDensity(x, fixture.sampleRate, { segmentLength: c.segmentLength, removeMean: c.removeMean });
    expect(est.density.length).toBe(c.density.length);
    const peak = Math.max(...c.density);
    for (let k = 0; k < c.density.length; k++) {
      expect(est.frequencies[k]).toBeCloseTo(c.frequencies[k]!, 12);
      const tol = 1e-10 * peak;
      expect(
        Math.abs(est.density[k]! - c.density[k]!),
        `bin ${k}: got ${est.density[k]}, scipy ${c.density[k]}, tol ${tol}`,
      ).toBeLessThan(tol);
    }
  });

  it('white noise of standard deviation σ has density 2σ²/fs', () => {
    const fs = 1000;
    const sigma = 2;
    const n = 2 ** 16;
    const s = seededStream('welch-white');
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = sigma * s.nextNormal();
    const est = welchDensity(x, fs, { segmentLength: 256 });
    const expected = (2 * sigma * sigma) / fs; // one-sided density of white noise (definition)
    // 511 half-overlapping Hann segments: per-bin relative SD ≈ √(1.06/511) ≈ 4.5 % (Welch 1967,
    // overlap correlation of Hann at 50 % ≈ 0.167 — from memory); bins 1 … 127 are nearly
    // independent, so their mean has relative SD ≈ 0.4 %. Tolerances: 25 % per bin, 2 % on the mean (≈ 5 SD).
    let sum = 0;
    for (let k = 1; k < 128; k++) {
      const r = est.density[k]! / expected;
      expect(Math.abs(r - 1), `bin ${k}: ${est.density[k]} vs ${expected}, tol 25 %`).toBeLessThan(0.25);
      sum += r;
    }
    const mean = sum / 127;
    expect(Math.abs(mean - 1), `mean ratio ${mean}, expected 1 ± 0.02`).toBeLessThan(0.02);
  });

  it.each([
    { label: 'on a bin', f0: (40 * 2000) / 512, removeMean: true, tol: 1e-12 },
    { label: 'between bins', f0: (40.37 * 2000) / 512, removeMean: false, tol: 1e-8 },
  ])('a tone of amplitude a carries power a²/2 (Parseval), $label', ({ f0, removeMean, tol }) => {
    const fs = 2000;
    const a = 3;
    const n = 8192;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = a * Math.sin((2 * Math.PI * f0 * i) / fs + 0.3);
    const est = welchDensity(x, fs, { segmentLength: 512, removeMean });
    const df = fs / 512;
    let power = 0;
    let peakBin = 0;
    for (let k = 0; k < est.density.length; k++) {
      power += est.density[k]! * df;
      if (est.density[k]! > est.density[peakBin]!) peakBin = k;
    }
    // Parseval: Σ S Δf = mean square of the windowed record = a²/2 (exact for a tone on a bin,
    // where the window's power at 2f0 vanishes; off the grid the 2f0 term is ~1e-11 here).
    expect(Math.abs(power / (a * a / 2) - 1), `power ${power}, expected ${a * a / 2}, tol ${tol}`).toBeLessThan(tol);
    expect(Math.abs(est.frequencies[peakBin]! - f0)).toBeLessThanOrEqual(df / 2);
  });

  it('rejects a segment longer than the record', () => {
    expect(() => welchDensity(new Float64Array(100), 1, { segmentLength: 128 })).toThrow(RangeError);
  });
});
