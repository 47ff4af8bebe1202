import { describe, expect, it } from 'vitest';
import { mixtureCdf, mixtureDensity, valueMixture, type MixtureInput } from '../../src/analysis/value-density.ts';
import { kolmogorovTail } from '../support/ks.ts';
import { normalCdf } from '../../src/analysis/special.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeScratch, simulateBatch } from '../../src/engine/trace/batch.ts';
import { twoStateScenario } from '../support/scenarios.ts';

function inputOf(sc: ReturnType<typeof twoStateScenario>) {
  const c = compilePoint(sc);
  const k = c.pipelines[0]!.kernels;
  const input: MixtureInput = {
    kernel: k.inPhase, lo: k.lo, hi: k.hi, sampleRate: c.grid.sampleRate, waveforms: c.waveforms, rate: c.chain.rate,
    preparation: sc.preparationError, mapping: sc.mappingError,
  };
  let s2 = 0;
  for (let j = k.lo; j < k.hi; j++) s2 += k.inPhase[j]! ** 2;
  return { c, input, sigma: c.whiteSigma * Math.sqrt(s2) };
}

describe('analytic distribution of the integrated value', () => {
  const sc = twoStateScenario({ carrier: 'none', sampleRate: 10e6, recordLength: 10e-6, sigmaPerSample: 2, t1: 20e-6, preparationError: 0.02, shots: 16384 });
  const { c, input, sigma } = inputOf(sc);

  it.each([0, 1])('state %i: weights sum to 1 and the density integrates to 1', (state) => {
    const m = valueMixture(input, state);
    expect(Math.abs(m.weights.reduce((a, w) => a + w, 0) - 1)).toBeLessThan(1e-12);
    const n = 4001, lo = -2, hi = 3;
    const xs = Float64Array.from({ length: n }, (_, i) => lo + ((hi - lo) * i) / (n - 1));
    const d = mixtureDensity(m, sigma, xs, new Float64Array(n));
    let area = 0;
    for (let i = 1; i < n; i++) area += 0.5 * (d[i]! + d[i - 1]!) * (xs[i]! - xs[i - 1]!);
    // trapezoid rule error for a smooth density on a fine grid (common practice, no source)
    expect(Math.abs(area - 1)).toBeLessThan(1e-6);
  });

  it('without transitions or flips it is one Gaussian (normal CDF from Abramowitz & Stegun 26.2)', () => {
    const plain = inputOf(twoStateScenario({ carrier: 'none', sampleRate: 10e6, recordLength: 10e-6, sigmaPerSample: 2 }));
    const m = valueMixture(plain.input, 1);
    expect(m.means.length).toBe(1);
    expect(m.means[0]).toBeCloseTo(1, 12);
    const xs = Float64Array.from([0.5, 1, 1.3]);
    const cdf = mixtureCdf(m, plain.sigma, xs, new Float64Array(3));
    xs.forEach((x, i) => expect(Math.abs(cdf[i]! - normalCdf(x, 1, plain.sigma))).toBeLessThan(16 * Number.EPSILON));
  });

  it.each([0, 1])('state %i: simulated values follow it (one-sample Kolmogorov–Smirnov, fixed seed)', (state) => {
    const values: number[] = [];
    const scratch = makeScratch(c);
    for (let b = 0; b < 16; b++) {
      const batch = simulateBatch(c, 0, 'score', b, 1024, scratch);
      for (let i = 0; i < batch.count; i++) if (batch.intended[i] === state) values.push(batch.values[0]!.inPhase[i]!);
    }
    values.sort((a, b) => a - b);
    const xs = Float64Array.from(values);
    const cdf = mixtureCdf(valueMixture(input, state), sigma, xs, new Float64Array(xs.length));
    const n = xs.length;
    let d = 0;
    for (let i = 0; i < n; i++) d = Math.max(d, Math.abs((i + 1) / n - cdf[i]!), Math.abs(i / n - cdf[i]!));
    // Kolmogorov, G. Ist. Ital. Attuari 4, 83 (1933): P(√n·D > λ) → Q_KS(λ); refuse at p < 0.001
    const p = kolmogorovTail(Math.sqrt(n) * d);
    expect(p, `n = ${n}, D = ${d}, p = ${p}`).toBeGreaterThan(0.001);
  });
});
