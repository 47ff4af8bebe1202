/**
 * The noise prediction on baseband I and Q against an independent reference (the algebra below,
 * done here; common practice, no source).
 *
 * Each channel carries its own white noise, per-sample variance σ², independent between samples
 * and channels. A boxcar of L samples with reference phase φ gives the pipeline's outputs
 *   I' = Σ_k (1/L)·( cos φ·I_k + sin φ·Q_k ),   Q' = Σ_k (1/L)·( cos φ·Q_k − sin φ·I_k ),
 * and the decision statistic on the axis at angle θ is V = cos θ·I' + sin θ·Q'
 *   = Σ_k (1/L)·( cos(φ + θ)·I_k + sin(φ + θ)·Q_k ),
 * so with K = 1/L on the L window samples and ψ = φ + θ,
 *   Var V = σ²·Σ K²·cos²ψ + σ²·Σ K²·sin²ψ = σ²·Σ K²·(cos²ψ + sin²ψ) = σ²/L,
 * whatever the angles. Had the two channels shared one noise realisation, Var V would be
 * σ²/L·(cos ψ + sin ψ)², which the Monte Carlo check below rejects (its negative control).
 */
import { describe, expect, it } from 'vitest';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { predictNoise } from '../../src/analysis/noise-prediction.ts';
import { projectKernel } from '../../src/classify/project.ts';
import { simulateBatch } from '../../src/engine/trace/batch.ts';
import { twoStateScenario } from '../support/scenarios.ts';

const sigma = 2.5, fs = 50e6;

function point(phi: number) {
  const s = twoStateScenario({ carrier: 'baseband-iq', sampleRate: fs, recordLength: 4e-6, windowStart: 0.5e-6, windowLength: 3e-6, sigmaPerSample: sigma, shots: 16384, batchSize: 16384, seed: 77 });
  s.states[1]!.level = { re: 0.6, im: 0.8 };
  s.prepare = [1, 0];
  s.pipelines[0]!.referencePhase = phi;
  return compilePoint(s);
}

describe('σ_V² = σ²·Σ K²·(cos²ψ + sin²ψ) on I and Q', () => {
  const angles: [number, number][] = [[0, 0], [0.4, 0], [0, 1.1], [-2.3, 0.9], [Math.PI / 4, Math.PI / 4]];

  it.each(angles)('reference phase %s, axis %s: the prediction is σ²/L to 1e−12', (phi, theta) => {
    const p = point(phi);
    const k = p.pipelines[0]!.kernels;
    const L = p.grid.windowHi - p.grid.windowLo;
    expect(L).toBe(150);
    const kernel = projectKernel(k, { cos: Math.cos(theta), sin: Math.sin(theta) }, p.channels);
    const prediction = predictNoise(p.noise, kernel, k.lo, k.hi, fs);
    const expected = (sigma * sigma) / L;
    expect(Math.abs(prediction.variance / expected - 1), `predicted ${prediction.variance}, σ²/L ${expected}`).toBeLessThan(1e-12);
    // the kernel itself: cos ψ/L on I and sin ψ/L on Q over the window
    const n = p.grid.samples, psi = phi + theta;
    expect(kernel[p.grid.windowLo]).toBeCloseTo(Math.cos(psi) / L, 15);
    expect(kernel[n + p.grid.windowLo]).toBeCloseTo(Math.sin(psi) / L, 15);
  });

  it('the trace engine\'s V has that variance (16384 shots, 99.9 % band of s²/σ_V², and not the shared-noise one)', () => {
    const phi = 0.4, theta = 0.35, psi = phi + theta;
    const p = point(phi);
    const b = simulateBatch(p, 0, 'score', 0, 16384);
    const v = b.values[0]!;
    const n = b.count;
    let mean = 0;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) { x[i] = Math.cos(theta) * v.inPhase[i]! + Math.sin(theta) * v.quadrature[i]!; mean += x[i]! / n; }
    let s2 = 0;
    for (let i = 0; i < n; i++) s2 += (x[i]! - mean) ** 2 / (n - 1);
    const L = 150, expected = (sigma * sigma) / L;
    // (n−1)s²/σ² is χ²(n−1): s²/σ² within 1 ± 3.29·√(2/(n−1)) (normal approximation, common practice, no source)
    const band = 3.29 * Math.sqrt(2 / (n - 1));
    expect(Math.abs(s2 / expected - 1), `s² ${s2}, σ²/L ${expected}, band ${band}`).toBeLessThan(band);
    const shared = expected * (Math.cos(psi) + Math.sin(psi)) ** 2;
    expect(Math.abs(s2 / shared - 1), `the shared-noise model ${shared} must fall outside`).toBeGreaterThan(band);
  });
});
