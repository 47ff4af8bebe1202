/**
 * Exponentially correlated (Ornstein–Uhlenbeck) noise, src/signal/noise/correlated.ts:
 * - the simulated σ of the integrated value within 1 % of the prediction σ²·Σ x_k x_k' a^|k−k'|
 *   (exact discretisation, Gillespie, Phys. Rev. E 54, 2084 (1996)) for correlation times of
 *   0.1×, 1× and 10× the window, sensor- and amplifier-side;
 * - the Welch spectrum of records matches the sampled Lorentzian within its confidence band
 *   (Welch, IEEE Trans. Audio Electroacoust. 15, 70 (1967));
 * - the exact and trace engines agree in distribution (two-sample Kolmogorov–Smirnov, p > 0.01).
 */
import { describe, expect, it } from 'vitest';
import { correlated, noiseScenario, runNoise } from '../support/noise-helpers.ts';
import { correlatedKind } from '../../src/signal/noise/correlated.ts';
import { welchDensity } from '../../src/analysis/welch.ts';
import { makeStream } from '../../src/random/streams.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { simulateBatch } from '../../src/engine/trace/batch.ts';
import { simulateExactBatch } from '../../src/engine/exact/batch.ts';
import { ksTwoSample } from '../support/ks.ts';
import { makeGrid } from '../../src/signal/grid.ts';
import { injectionRealisations } from '../../src/signal/injection.ts';

const WINDOW = 20e-6;

describe('σ of the integrated value against the prediction (2·10⁵ shots: σ to ±0.5 % at 3 standard errors)', () => {
  const cases = [0.1, 1, 10].flatMap((times) => (['amplifier', 'sensor'] as const).map((injection) => ({ times, injection })));
  it.each(cases)('correlation time $times × the window, $injection-side', ({ times, injection }) => {
    const sc = noiseScenario({
      carrier: injection === 'sensor' ? 'sine' : 'none', white: 0.2, shots: 200_000, batchSize: 8192, shotPeriod: 40e-6,
      signal: { sources: [correlated('drift', 0.3, times * WINDOW, injection)] },
    });
    const r = runNoise(sc);
    const predicted = r.prediction.sigma;
    expect(Math.abs(r.sigma / predicted - 1), `simulated ${r.sigma}, predicted ${predicted}`).toBeLessThan(0.01);
    // the correlated part is the larger share: the test sees it
    const share = r.prediction.sources.find((s) => s.name === 'drift')!.share;
    expect(share).toBeGreaterThan(0.5);
  }, 60_000);
});

describe('spectrum', () => {
  it('the Welch spectrum of generated records matches the sampled Lorentzian within its 99.9 % band', () => {
    const fs = 10e6, tau = 2e-6, sigma = 0.5, n = 4096, records = 400, L = 256;
    const timing = { sampleRate: fs, recordLength: n / fs, windowStart: 0, windowLength: n / fs, shotPeriod: n / fs };
    const grid = makeGrid(timing);
    const kind = correlatedKind.compile([{ kind: 'correlated', name: 'c', sigma, correlationTime: tau, injection: 'amplifier', inDetuning: false }], {
      grid, timing, shots: 1, calibrationShots: 1, gain: 1, channels: 1, sensorWeight: new Float64Array(n).fill(1),
      realisations: injectionRealisations(1, n, 1, new Float64Array(n).fill(1)), synthLo: 0, synthHi: n, responseTimeConstant: null, kernels: [],
    });
    const stream = makeStream(5, 0, 'aux', 3);
    let mean: Float64Array | null = null, freqs: Float64Array | null = null;
    for (let r = 0; r < records; r++) {
      const x = new Float64Array(n);
      kind.perShot!.addShot(x, 0, n, [stream]);
      const w = welchDensity(x, fs, { segmentLength: L, removeMean: false });
      mean ??= new Float64Array(w.density.length);
      freqs = w.frequencies;
      for (let i = 0; i < mean.length; i++) mean[i] += w.density[i]! / records;
    }
    // the AR(1) process x[k+1] = a·x[k] + √(1−a²)·σ·n is the Lorentzian sampled at fs, with
    // autocovariance σ²·a^|τ| (Gillespie 1996). The expected Welch estimate is exact from it: a
    // Hann-windowed segment's periodogram has mean (2/(fs·Σw²))·Σ_τ σ²a^|τ|·r_w(τ)·cos(2πfτ/fs),
    // r_w the window's autocorrelation (Welch 1967), which keeps the window's smoothing of the
    // steep spectrum out of the comparison.
    const a = Math.exp(-1 / (fs * tau));
    const w = Float64Array.from({ length: L }, (_, k) => 0.5 - 0.5 * Math.cos((2 * Math.PI * k) / L));
    const rw = Float64Array.from({ length: L }, (_, t) => { let r = 0; for (let k = 0; k + t < L; k++) r += w[k]! * w[k + t]!; return r; });
    const expectedWelch = (f: number) => {
      let sum = sigma * sigma * rw[0]!;
      for (let t = 1; t < L; t++) sum += 2 * sigma * sigma * a ** t * rw[t]! * Math.cos((2 * Math.PI * f * t) / fs);
      return (2 * sum) / (fs * rw[0]!);
    };
    // segments per record 2·(n/L) − 1 = 31, 400 records: 12 400 averaged periodograms of relative
    // σ ≈ √(1/(0.95·K)) for half-overlapping Hann segments (Welch 1967); 99.9 %: 3.29 of them
    const band = 3.29 / Math.sqrt(0.95 * records * (2 * (n / L) - 1));
    let checked = 0;
    for (let i = 2; i < freqs!.length - 1; i++) {
      const f = freqs![i]!;
      const expected = expectedWelch(f);
      expect(Math.abs(mean![i]! / expected - 1), `f = ${f}: Welch ${mean![i]}, expected ${expected}`).toBeLessThan(band);
      checked++;
      // where the window's smoothing is negligible, that is the sampled Lorentzian
      // 2σ²(1 − a²)/(fs·|1 − a·e^(−i2πf/fs)|²), and well below fs the kind's continuous spectrum
      const sampled = (2 * sigma * sigma * (1 - a * a)) / (fs * (1 - 2 * a * Math.cos((2 * Math.PI * f) / fs) + a * a));
      if (f > 1e6 && f < 2e6) expect(Math.abs(expected / sampled - 1)).toBeLessThan(0.01);
      if (f < fs / 50) expect(Math.abs(kind.spectrum(0, f) / sampled - 1)).toBeLessThan(0.02);
    }
    expect(checked).toBeGreaterThan(100);
  });
});

describe('the exact and trace engines agree in distribution (two-sample KS, p > 0.01)', () => {
  it.each(['sensor', 'amplifier'] as const)('%s-side, sine carrier, 1 MHz, τc = the window', (injection) => {
    const make = (seed: number) => noiseScenario({
      carrier: 'sine', white: 0.4, shots: 16384, batchSize: 8192, seed, t1: 30e-6,
      signal: { sources: [correlated('drift', 0.25, WINDOW, injection)] },
    });
    const values = (simulate: typeof simulateBatch, seed: number): Float64Array => {
      const point = compilePoint(make(seed));
      const out: number[] = [];
      for (let b = 0; b < 2; b++) {
        const batch = simulate(point, 0, 'score', b, 8192);
        for (let i = 0; i < batch.count; i++) if (batch.intended[i] === 1) out.push(batch.values[0]!.inPhase[i]!);
      }
      return Float64Array.from(out);
    };
    const r = ksTwoSample(values(simulateBatch, 11), values(simulateExactBatch as typeof simulateBatch, 12));
    expect(r.pValue, `D = ${r.statistic}`).toBeGreaterThan(0.01);
  }, 60_000);
});
