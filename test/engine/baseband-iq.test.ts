/**
 * Baseband I and Q records (carrier: baseband-iq) through both engines.
 *
 * - Rotation: multiplying both levels by e^(iα) rotates the IQ plane and nothing else (the white
 *   and amplifier-side noise are isotropic, the sensor-side noise follows the separation), so with
 *   `referencePhase: auto` the analytic SNR equals the unrotated twin's to 1e−12 (relative) and
 *   the simulated errors and SNR agree within their 99.9 % intervals (common practice, no source).
 * - The real twin: one baseband channel (carrier: none) with the same |L1 − L0| and the same noise
 *   per channel has the same analytic SNR to 1e−12 when the reference phase is the separation
 *   angle; at α = 0 with reference phase 0 the Q channel's noise is projected away exactly, and
 *   the trace engine gives the real twin's values shot for shot.
 * - The engines agree in distribution on white + correlated + 1/f noise (sensor and amplifier
 *   side), an analog response and relaxation: two-sample Kolmogorov–Smirnov p > 0.01 on I and Q
 *   (Kolmogorov 1933 / Stephens 1970, test/support/ks.ts); the simulated σ of the decision
 *   statistic is within 1 % of the noise prediction (exact engine, 131072 shots, white and
 *   correlated noise: the relative standard error of σ from n clean shots is 1/√(2n) ≈ 0.2 %, so
 *   1 % is about 5 of them).
 * - Where noise goes: sensor-side noise moves (I, Q) along the separation only (correlation ±1,
 *   σ_Q/σ_I = |tan α|); amplifier-side noise is independent on the two channels (|ρ| < 4/√n,
 *   common practice, no source) with equal variances.
 */
import { describe, expect, it } from 'vitest';
import { ksTwoSample } from '../support/ks.ts';
import { zForConfidence } from '../../src/analysis/intervals.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { simulateBatch, makeScratch, type ShotBatch } from '../../src/engine/trace/batch.ts';
import { simulateExactBatch } from '../../src/engine/exact/batch.ts';
import { runPoints } from '../../src/run/run-points.ts';
import type { PointSummary } from '../../src/analysis/summary.ts';
import type { Complex, Scenario } from '../../src/scenario/types.ts';
import { twoStateScenario } from '../support/scenarios.ts';
import { correlated, flicker } from '../support/noise-helpers.ts';

const base = { recordLength: 4e-6, sampleRate: 50e6, batchSize: 4096 };
const L0: Complex = { re: 0.3, im: 0.5 }, L1: Complex = { re: 1.1, im: -0.2 };
const rotate = (l: Complex, a: number): Complex => ({ re: l.re * Math.cos(a) - l.im * Math.sin(a), im: l.re * Math.sin(a) + l.im * Math.cos(a) });
const separation = Math.hypot(L1.re - L0.re, L1.im - L0.im);

/** Two levels rotated by α on I and Q, white noise, correlated noise on both sides, relaxation. */
function rotated(alpha: number, seed: number, shots = 40960): Scenario {
  const s = twoStateScenario({ ...base, carrier: 'baseband-iq', t1: 12e-6, sigmaPerSample: 3, seed, shots });
  s.states[0]!.level = rotate(L0, alpha);
  s.states[1]!.level = rotate(L1, alpha);
  s.signal.sources = [correlated('jitter', 0.25, 0.3e-6, 'sensor'), correlated('amplifier', 0.3, 0.1e-6, 'amplifier')];
  return s;
}

/** The same readout on one real baseband channel: levels 0 and |L1 − L0|, the same noise. */
function realTwin(seed: number, shots = 40960): Scenario {
  const s = rotated(0, seed, shots);
  s.signal.carrier = { shape: 'none', frequency: 0, phase: 0 };
  s.states[0]!.level = { re: 0, im: 0 };
  s.states[1]!.level = { re: separation, im: 0 };
  return s;
}

async function summary(s: Scenario, engine: 'exact' | 'traces'): Promise<PointSummary> {
  const r = await runPoints([{ parameters: {}, scenario: s }], { engine });
  expect(r.engine).toBe(engine);
  return r.points[0]!.summaries[0]!;
}

/** |a − b| within z·SE of the difference of two binomial rates (common practice, no source). */
function expectRatesAgree(a: { rate: number }, n: number, b: { rate: number }, m: number, what: string): void {
  const z = zForConfidence(0.999);
  const sd = Math.sqrt(a.rate * (1 - a.rate) / n + b.rate * (1 - b.rate) / m);
  expect(Math.abs(a.rate - b.rate), `${what}: ${a.rate} against ${b.rate}, allowed ${z * sd}`).toBeLessThanOrEqual(z * sd);
}

/**
 * |SNR_a − SNR_b| within z·SE of their difference: the relative standard error of Δ/σ from n
 * clean shots per state is √(1/(4n) + 2/(n·SNR²)) (σ pooled over 2n shots, each mean over n;
 * delta method, common practice, no source), and two estimates differ by √2 of it.
 */
function expectSnrAgree(a: PointSummary, b: PointSummary, what: string): void {
  const n = a.shots * 0.4; // at least 40 % of the shots per state are clean here (T1 = 3 records)
  const relative = Math.sqrt(1 / (4 * n) + 2 / (n * a.snr * a.snr));
  const allowed = zForConfidence(0.999) * Math.SQRT2 * relative * a.snr;
  expect(Math.abs(a.snr - b.snr), `${what}: SNR ${a.snr} against ${b.snr}, allowed ${allowed}`).toBeLessThanOrEqual(allowed);
}

describe('rotating the levels in the IQ plane changes nothing', () => {
  it.each([0.7, 2.0, -2.6])('α = %s rad: the exact engine against the unrotated twin', async (alpha) => {
    const [a, b] = [await summary(rotated(0, 3), 'exact'), await summary(rotated(alpha, 3), 'exact')];
    expect(Math.abs(b.analyticSnr - a.analyticSnr), `analytic SNR ${b.analyticSnr} against ${a.analyticSnr}`).toBeLessThanOrEqual(1e-12 * a.analyticSnr);
    expectSnrAgree(a, b, `α = ${alpha}`);
    expectRatesAgree(a.meanError, a.shots, b.meanError, b.shots, `α = ${alpha}, mean error`);
    a.states.forEach((st, s) => expectRatesAgree(st.error, st.shots, b.states[s]!.error, b.states[s]!.shots, `α = ${alpha}, state ${s}`));
    expect(a.meanError.rate * a.shots, 'the comparison needs errors to compare').toBeGreaterThan(200);
  }, 60_000);

  it('α = 2.0 rad: the trace engine against the unrotated twin (other seeds)', async () => {
    const [a, b] = [await summary(rotated(0, 5, 16384), 'traces'), await summary(rotated(2.0, 6, 16384), 'traces')];
    expect(Math.abs(b.analyticSnr - a.analyticSnr) / a.analyticSnr, 'analytic SNR (calibrated axes differ by the calibration noise)').toBeLessThan(1e-3);
    expectSnrAgree(a, b, 'traces');
    expectRatesAgree(a.meanError, a.shots, b.meanError, b.shots, 'traces, mean error');
  }, 60_000);
});

describe('the real twin on one baseband channel', () => {
  it.each([0, 0.7, -2.6])('α = %s rad with the reference phase at the separation angle: the same analytic SNR (1e−12), errors within intervals', async (alpha) => {
    const iq = rotated(alpha, 7);
    const angle = Math.atan2(iq.states[1]!.level.im - iq.states[0]!.level.im, iq.states[1]!.level.re - iq.states[0]!.level.re);
    iq.pipelines[0]!.referencePhase = angle;
    const [a, b] = [await summary(realTwin(7), 'exact'), await summary(iq, 'exact')];
    expect(Math.abs(b.analyticSnr - a.analyticSnr), `analytic SNR ${b.analyticSnr} against ${a.analyticSnr}`).toBeLessThanOrEqual(1e-12 * a.analyticSnr);
    expect(Math.abs(b.analyticSigma - a.analyticSigma)).toBeLessThanOrEqual(1e-12 * a.analyticSigma);
    expectSnrAgree(a, b, `α = ${alpha}`);
    expectRatesAgree(a.meanError, a.shots, b.meanError, b.shots, `α = ${alpha}, mean error`);
  }, 60_000);

  it('with referencePhase auto, errors within intervals (trace engine)', async () => {
    const [a, b] = [await summary(realTwin(8, 16384), 'traces'), await summary(rotated(-2.6, 9, 16384), 'traces')];
    expectSnrAgree(a, b, 'auto');
    expectRatesAgree(a.meanError, a.shots, b.meanError, b.shots, 'auto, mean error');
  }, 60_000);

  it('at α = 0 with reference phase 0 the Q channel is projected away: the trace engine gives the real twin\'s values shot for shot', () => {
    const iq = rotated(0, 11, 4096);
    iq.states[0]!.level = { re: 0, im: 0 };
    iq.states[1]!.level = { re: separation, im: 0 };
    iq.pipelines[0]!.referencePhase = 0;
    const real = realTwin(11, 4096);
    const [a, b] = [iq, real].map((s) => simulateBatch(compilePoint(s), 0, 'score', 0, 4096));
    expect(Array.from(a!.values[0]!.inPhase)).toEqual(Array.from(b!.values[0]!.inPhase));
    expect(Array.from(a!.intended)).toEqual(Array.from(b!.intended));
  });
});

/** IQ with every Gaussian kind on both sides, an analog response and relaxation. */
function everything(seed: number, shots = 12288): Scenario {
  const s = rotated(0.9, seed, shots);
  s.signal.response = { timeConstant: 0.2e-6, from: 'zero' };
  s.signal.sources = [
    flicker('sensor', 0.02, 50e3, 10e6), flicker('amplifier', 0.03, 50e3, 10e6),
    correlated('jitter', 0.25, 0.3e-6, 'sensor'), correlated('amplifier', 0.3, 0.1e-6, 'amplifier'),
  ];
  return s;
}

function batches(engine: typeof simulateBatch, s: Scenario): ShotBatch[] {
  const p = compilePoint(s);
  const scratch = makeScratch(p);
  return Array.from({ length: s.shots / s.batchSize }, (_, b) => engine(p, 0, 'score', b, s.batchSize, scratch as never));
}

function column(list: ShotBatch[], which: 'inPhase' | 'quadrature'): Float64Array {
  return Float64Array.from(list.flatMap((b) => Array.from(b.values[0]![which])));
}

describe('the engines agree on I and Q', () => {
  it('white + correlated + 1/f (both sides), analog response, relaxation: KS p > 0.01 on I and Q', () => {
    const t = batches(simulateBatch, everything(21)), e = batches(simulateExactBatch as never, everything(22));
    for (const k of ['inPhase', 'quadrature'] as const) {
      const r = ksTwoSample(column(t, k), column(e, k));
      expect(r.pValue, `${k}: D = ${r.statistic}, n_e = ${r.effectiveN}, p = ${r.pValue} (need > 0.01)`).toBeGreaterThan(0.01);
    }
  }, 60_000);

  it('the KS check has power here: the exact engine without the Q channel\'s amplifier-side noise is rejected (p < 0.01)', () => {
    const wrong = everything(22);
    wrong.signal.sources = wrong.signal.sources!.filter((s) => s.injection === 'sensor');
    wrong.signal.white = { density: wrong.signal.white!.density * 0.9 };
    const r = ksTwoSample(column(batches(simulateBatch, everything(21)), 'quadrature'), column(batches(simulateExactBatch as never, wrong), 'quadrature'));
    expect(r.pValue, `D = ${r.statistic}, p = ${r.pValue}`).toBeLessThan(0.01);
  }, 60_000);

  it('the simulated σ of the decision statistic is within 1 % of the prediction (exact engine, 131072 shots)', async () => {
    // white and correlated noise on both sides, response, relaxation (the 1/f timelines would make it slow)
    const s = everything(23, 131072);
    s.signal.sources = s.signal.sources!.filter((x) => x.kind === 'correlated');
    s.batchSize = 16384;
    const a = await summary(s, 'exact');
    expect(Math.abs(a.sigma / a.analyticSigma - 1), `simulated ${a.sigma}, predicted ${a.analyticSigma}`).toBeLessThan(0.01);
  }, 60_000);

  it('and within 3 % in the trace engine (12288 shots: 1/√(2n) ≈ 0.7 %, so 3 % is about 4 of them)', async () => {
    const a = await summary(everything(24), 'traces');
    expect(Math.abs(a.sigma / a.analyticSigma - 1), `simulated ${a.sigma}, predicted ${a.analyticSigma}`).toBeLessThan(0.03);
  }, 60_000);
});

describe('where the noise goes in the IQ plane', () => {
  /** Levels far apart at angle α, no relaxation; only the given noise; I and Q outputs on the unrotated axes. */
  function only(sources: Scenario['signal']['sources'], white: boolean, alpha: number): { i: Float64Array; q: Float64Array } {
    const s = twoStateScenario({ ...base, carrier: 'baseband-iq', seed: 31, shots: 8192, sigmaPerSample: white ? 3 : 0 });
    if (!white) s.signal.white = null;
    s.states[0]!.level = { re: 0, im: 0 };
    s.states[1]!.level = { re: 4 * Math.cos(alpha), im: 4 * Math.sin(alpha) };
    s.prepare = [1, 0];
    s.signal.sources = sources;
    s.pipelines[0]!.referencePhase = 0;
    const list = batches(simulateBatch, s);
    return { i: column(list, 'inPhase'), q: column(list, 'quadrature') };
  }
  const stats = (x: Float64Array, y: Float64Array) => {
    const n = x.length;
    const mx = x.reduce((a, v) => a + v, 0) / n, my = y.reduce((a, v) => a + v, 0) / n;
    let sxx = 0, syy = 0, sxy = 0;
    for (let k = 0; k < n; k++) { sxx += (x[k]! - mx) ** 2; syy += (y[k]! - my) ** 2; sxy += (x[k]! - mx) * (y[k]! - my); }
    return { sx: Math.sqrt(sxx / n), sy: Math.sqrt(syy / n), rho: sxy / Math.sqrt(sxx * syy) };
  };

  it('sensor-side noise moves (I, Q) along the separation only', () => {
    const alpha = 0.6;
    const { i, q } = only([correlated('jitter', 0.5, 0.3e-6, 'sensor')], false, alpha);
    const r = stats(i, q);
    expect(r.rho, `ρ = ${r.rho}`).toBeGreaterThan(1 - 1e-9);
    expect(r.sy / r.sx).toBeCloseTo(Math.tan(alpha), 9);
  });

  it('amplifier-side noise is independent on the two channels, with equal variances', () => {
    const { i, q } = only([correlated('amplifier', 0.5, 0.3e-6, 'amplifier'), flicker('amplifier', 0.03, 50e3, 10e6)], true, 0.6);
    const r = stats(i, q);
    expect(Math.abs(r.rho), `ρ = ${r.rho}, allowed 4/√n = ${4 / Math.sqrt(i.length)}`).toBeLessThan(4 / Math.sqrt(i.length));
    // two independent estimates of one σ from n shots: their ratio within ±3.3·√(1/n) (common practice, no source)
    expect(Math.abs(r.sy / r.sx - 1), `σ_Q/σ_I = ${r.sy / r.sx}`).toBeLessThan(3.3 / Math.sqrt(i.length));
  });
});
