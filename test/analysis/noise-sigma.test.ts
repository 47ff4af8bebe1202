/**
 * σ of the demodulated boxcar output against the closed forms for white noise of one-sided
 * density S (per-sample variance S·fs/2):
 *   baseband:              σ² = S/(2τ)
 *   sine carrier, I output: σ² = S/τ   (factor-2 demodulation doubles the amplitude: 4·S fs/2 ·½ / (τ fs))
 *   square carrier, I:      σ² = S/τ   (the reference is sinusoidal whatever the carrier shape)
 * Derivation: I = (1/L)Σ 2cos(θ_k)·n_k, Var = (4/L²)·Σcos²θ_k·S fs/2 = (4/L²)(L/2)(S fs/2) = S fs/L = S/τ
 * for a whole number of carrier periods in the window (Σcos² = L/2 exactly then).
 * Tolerance: 1 % at 10⁵ shots; the standard error of a sample σ is σ/√(2N) = 0.22 %.
 */
import { describe, expect, it } from 'vitest';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeScratch, simulateBatch } from '../../src/engine/trace/batch.ts';
import { twoStateScenario } from '../support/scenarios.ts';

function simulatedSigma(carrier: 'none' | 'sine' | 'square'): { sigma: number; expected: number } {
  const fs = 100e6, tau = 2e-6, sigmaPerSample = 3;
  const density = sigmaPerSample / Math.sqrt(fs / 2);
  const S = density * density;
  const sc = twoStateScenario({ carrier, sampleRate: fs, recordLength: tau, sigmaPerSample, levels: [0, 0], shots: 102400, batchSize: 4096, seed: 11 });
  const point = compilePoint(sc);
  const scratch = makeScratch(point);
  let n = 0, mean = 0, m2 = 0;
  for (let b = 0; b < sc.shots / sc.batchSize; b++) {
    const batch = simulateBatch(point, 0, 'score', b, sc.batchSize, scratch);
    for (const x of batch.values[0]!.inPhase) {
      n++;
      const d = x - mean;
      mean += d / n;
      m2 += d * (x - mean);
    }
  }
  const expected = carrier === 'none' ? Math.sqrt(S / (2 * tau)) : Math.sqrt(S / tau);
  return { sigma: Math.sqrt(m2 / (n - 1)), expected };
}

describe('σ of the integrated value vs the white-noise formula (102 400 shots, 1 % tolerance)', () => {
  it.each(['none', 'sine', 'square'] as const)('carrier %s', (carrier) => {
    const { sigma, expected } = simulatedSigma(carrier);
    const rel = Math.abs(sigma / expected - 1);
    expect(rel, `carrier ${carrier}: simulated σ ${sigma}, expected ${expected}, |rel| ${rel} > 0.01`).toBeLessThan(0.01);
  });
});
