import { describe, expect, it } from 'vitest';
import {
  bandCovariance, flickerFunctionalVariance, makeFlickerTimeline, planFlickerTimeline, quadraticForm,
  type FlickerBand,
} from '../../src/signal/flicker-timeline.ts';
import { flickerVariance } from '../../src/signal/flicker.ts';
import { welchDensity } from '../../src/analysis/welch.ts';
import { fitLine } from '../support/fit.ts';
import { filterFunctionVariance } from '../../src/signal/filter-function.ts';
import type { NoiseStream } from '../../src/signal/stream.ts';
import { seededStream } from './seeded-stream.ts';

/** Streams keyed by (band, pair), as the engine keys its own (deterministic per key). */
function keyedStreams(seed: string, calls?: string[]): (band: number, pair: number) => NoiseStream {
  return (band, pair) => {
    calls?.push(`${band}/${pair}`);
    return seededStream(`${seed}:${band}:${pair}`);
  };
}

describe('bandCovariance: the cross-fade window factor', () => {
  it.each([256, 1024])('N = %i: c(d) closed form equals the direct sum (1/H)·Σ sin(πu/N)·sin(π(u+d)/N)', (size) => {
    // a band whose only power is in bin 0: R_per(d) = σ0², so R̄(d) = σ0²·c(d)
    const partSigma = new Float64Array(size / 2 + 1);
    partSigma[0] = 1;
    const band: FlickerBand = { level: 0, stride: 1, rate: 1, size, lo: 0, hi: 1, partSigma, variance: 1 };
    const lags = [0, 1, 7, size / 4, size / 2, size - 1];
    const r = bandCovariance(band, size - 1);
    for (const d of lags) {
      let direct = 0;
      for (let u = 0; u + d < size; u++) direct += Math.sin((Math.PI * u) / size) * Math.sin((Math.PI * (u + d)) / size);
      direct /= size / 2;
      // exact identity (Lagrange's trigonometric sum), so only rounding separates them
      expect(Math.abs(r[d]! - direct), `N=${size} d=${d}: closed ${r[d]}, direct ${direct}`).toBeLessThan(1e-12);
    }
  });
});

describe('planFlickerTimeline', () => {
  it('splits the band on nested grids and covers [fLo, fHi] exactly once', () => {
    const spec = { amplitude: 2, exponent: 1.2, fLo: 0.05, fHi: 1e5, baseRate: 8e5, span: 1e8 };
    const bands = planFlickerTimeline(spec);
    expect(bands[0]!.hi).toBe(1e5);
    expect(bands[bands.length - 1]!.lo).toBe(0.05);
    for (let b = 1; b < bands.length; b++) {
      expect(bands[b]!.hi, `band ${b} meets band ${b - 1}`).toBeCloseTo(bands[b - 1]!.lo, 9);
      expect(bands[b]!.stride).toBe(8 * bands[b - 1]!.stride);
    }
    // the bin powers of all bands add up to ∫S df over the whole band (exact by construction)
    const total = bands.reduce((a, b) => a + b.variance, 0);
    const expected = flickerVariance(2, 1.2, 0.05, 1e5);
    expect(Math.abs(total / expected - 1), `Σ band variances ${total}, ∫S df ${expected}`).toBeLessThan(1e-12);
  });

  it('rejects a band above rate/8 and a timeline too long for its blocks', () => {
    expect(() => planFlickerTimeline({ amplitude: 1, exponent: 1, fLo: 1, fHi: 2e5, baseRate: 1e6, span: 10 })).toThrow(RangeError);
    expect(() => planFlickerTimeline({ amplitude: 1, exponent: 1, fLo: 1, fHi: 1e5, baseRate: 8e5, span: 1e15 })).toThrow(RangeError);
  });
});

describe('flicker timeline spectrum (Timmer & König, Astron. Astrophys. 300, 707 (1995); Welch 1967)', () => {
  // base rate 2 kHz, band [2, 250] Hz: band 0 [15.6, 250] Hz at 2 kHz, band 1 [2, 15.6] Hz at 250 Hz
  // interpolated onto the base grid; 2^18 base samples (131 s), Welch segments of 2048 (≈ 1 Hz).
  const rate = 2000;
  const amplitude = 1e-4;
  const n = 2 ** 18;
  it.each([0.8, 1, 1.5])('α = %f: slope −α ± 0.1 and level A within 10 % across the band join', (alpha) => {
    const bands = planFlickerTimeline({ amplitude, exponent: alpha, fLo: 2, fHi: 250, baseRate: rate, span: n + 16 });
    expect(bands.length).toBe(2);
    const timeline = makeFlickerTimeline(bands, keyedStreams(`psd-${alpha}`));
    const x = timeline.addRange(new Float64Array(n), 0, 0, n);
    const est = welchDensity(x, rate, { segmentLength: 2048 });
    const lf: number[] = [], ld: number[] = [];
    let ratio = 0;
    for (let k = 0; k < est.density.length; k++) {
      const f = est.frequencies[k]!;
      if (f < 8 || f > 125) continue;
      lf.push(Math.log(f));
      ld.push(Math.log(est.density[k]!));
      ratio += est.density[k]! / (amplitude * f ** -alpha);
    }
    const slope = fitLine(lf, ld).slope;
    const level = ratio / lf.length;
    expect(Math.abs(slope + alpha), `α=${alpha}: slope ${slope}, expected ${-alpha} ± 0.1`).toBeLessThan(0.1);
    expect(Math.abs(level - 1), `α=${alpha}: level ${level}, expected 1 ± 0.1`).toBeLessThan(0.1);
  });
});

describe('flicker timeline: random access', () => {
  const bands = planFlickerTimeline({ amplitude: 1, exponent: 1, fLo: 0.5, fHi: 1e3, baseRate: 8e3, span: 4e6 });

  it('any range, in any order, from a fresh or a used timeline, equals one long generation', () => {
    const n = 300000;
    const whole = makeFlickerTimeline(bands, keyedStreams('ra')).addRange(new Float64Array(n), 0, 0, n);
    const used = makeFlickerTimeline(bands, keyedStreams('ra'));
    const ranges = [[250000, 40000], [17, 5], [120000, 3000], [0, 1], [299990, 10], [65530, 20000], [4095, 2]];
    for (const [j0, count] of ranges) {
      for (const t of [used, makeFlickerTimeline(bands, keyedStreams('ra'))]) {
        const out = t.addRange(new Float64Array(count! + 3), 3, j0!, count!);
        for (let i = 0; i < count!; i++) {
          if (out[3 + i] !== whole[j0! + i]) expect(out[3 + i], `base sample ${j0! + i}`).toBe(whole[j0! + i]);
        }
      }
    }
  });

  it('draws only the block pairs that requested samples touch (gaps are skipped)', () => {
    const calls: string[] = [];
    const t = makeFlickerTimeline(bands, keyedStreams('gaps', calls));
    // 50 short records, one every 10^5 base samples (blocks of band 0 are 4096 long)
    for (let i = 0; i < 50; i++) t.addRange(new Float64Array(40), 0, i * 100000, 40);
    const band0 = calls.filter((c) => c.startsWith('0/')).length;
    // each record touches at most 2 pairs of band 0; generating the whole 5·10^6 samples would draw ~1200
    expect(band0, `band-0 pairs drawn: ${band0}`).toBeLessThanOrEqual(100);
  });
});

describe('flickerFunctionalVariance: the σ prediction of a linear functional', () => {
  it('of a boxcar over the base grid equals ∫S|H|² df of the ideal spectrum within 3 %', () => {
    // band [1, 1000] Hz at 8 kHz; boxcar of 64 base samples (8 ms)
    const rate = 8000;
    const bands = planFlickerTimeline({ amplitude: 1, exponent: 1, fLo: 1, fHi: 1000, baseRate: rate, span: 1e6 });
    const g = new Float64Array(64).fill(1 / 64);
    const predicted = flickerFunctionalVariance(bands, g, 8000, 3).total;
    const ideal = filterFunctionVariance((f) => 1 / f, g, 0, 64, rate, 1, 1000);
    // Wiener–Khinchin (filter-function integral); the generator's bins, cross-fade and interpolation
    // change the spectrum only slightly
    expect(Math.abs(predicted / ideal - 1), `predicted ${predicted}, ideal ${ideal}`).toBeLessThan(0.03);
  });

  it('of a single base sample matches the variance of a long generated record (5 SD)', () => {
    const rate = 8000;
    const n = 2 ** 20; // 131 s
    const bands = planFlickerTimeline({ amplitude: 1, exponent: 1, fLo: 1, fHi: 1000, baseRate: rate, span: n + 16 });
    const predicted = flickerFunctionalVariance(bands, new Float64Array([1]), 1, 0).total;
    const x = makeFlickerTimeline(bands, keyedStreams('single')).addRange(new Float64Array(n), 0, 0, n);
    let m = 0;
    for (const v of x) m += v;
    m /= n;
    let v = 0;
    for (const y of x) v += (y - m) ** 2;
    v /= n - 1;
    // sample variance of a Gaussian record of T seconds: SD ≈ √(∫S² df / T) (Bartlett,
    // J. R. Stat. Soc. Suppl. 8, 27 (1946) — from memory)
    const sd = Math.sqrt(flickerVariance(1, 2, 1, 1000) / (n / rate));
    expect(Math.abs(v - predicted), `sample variance ${v}, predicted ${predicted}, 5 SD = ${5 * sd}`).toBeLessThan(5 * sd);
    // interpolating the slow band between its knots loses a little variance, never adds any
    const ideal = flickerVariance(1, 1, 1, 1000);
    expect(predicted / ideal, `predicted ${predicted}, ∫S df ${ideal}`).toBeGreaterThan(0.98);
    expect(predicted / ideal).toBeLessThanOrEqual(1 + 1e-12);
  });

  it('quadraticForm equals the double sum', () => {
    const g = new Float64Array([0.3, -1, 2, 0.5, 0]);
    const r = new Float64Array([2, 0.7, -0.2]);
    let direct = 0;
    for (let a = 0; a < g.length; a++) for (let b = 0; b < g.length; b++) {
      const d = Math.abs(a - b);
      direct += g[a]! * g[b]! * (d < r.length ? r[d]! : 0);
    }
    expect(quadraticForm(g, r)).toBeCloseTo(direct, 12);
  });
});
