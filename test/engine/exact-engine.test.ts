/**
 * The exact-statistic engine against the trace engine.
 * - Same seed: identical histories, and with the noise switched off identical values shot by
 *   shot (to rounding) — the prefix-sum and analog-response formulas reproduce the synthesised
 *   record exactly, jumps and all.
 * - Different seeds: the integrated I and Q agree in distribution (two-sample Kolmogorov–Smirnov,
 *   p > 0.01, Kolmogorov 1933 / Stephens 1970 via analysis/ks.ts) on three scenarios, and the
 *   error rates agree within a 99.9 % interval of their difference; a deliberately wrong exact
 *   engine input (T1 halved) is rejected by the same KS test (the check has power).
 * - The white part of all outputs has the covariance σ²·Σ K_a·K_b (independent samples of
 *   variance σ²; common practice, no source), across the two pipelines too.
 */
import { describe, expect, it } from 'vitest';
import { ksTwoSample } from '../support/ks.ts';
import { zForConfidence } from '../../src/analysis/intervals.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { simulateBatch, type ShotBatch } from '../../src/engine/trace/batch.ts';
import { simulateExactBatch, exactTables } from '../../src/engine/exact/batch.ts';
import { whiteCovariance } from '../../src/analysis/linear-statistic.ts';
import { runPoints } from '../../src/run/run-points.ts';
import type { Scenario } from '../../src/scenario/types.ts';
import type { FlickerSourceSpec } from '../../src/signal/noise/flicker.ts';
import { twoStateScenario } from '../support/scenarios.ts';

const base = { recordLength: 4e-6, sampleRate: 50e6, batchSize: 4096 };

/** White noise and relaxation on a sine carrier. */
function whiteRelaxation(seed: number): Scenario {
  return twoStateScenario({ ...base, t1: 12e-6, sigmaPerSample: 3, seed });
}

/** A sine carrier behind a first-order analog response (ring-up from zero), relaxation and excitation. */
function finiteBandwidth(seed: number): Scenario {
  const s = twoStateScenario({ ...base, t1: 8e-6, sigmaPerSample: 3, seed, windowStart: 0.4e-6, windowLength: 3.2e-6 });
  s.states[1]!.level = { re: 1, im: 0.4 };
  s.transitions.push({ from: 0, to: 1, rate: 3e4, kind: 'excitation' });
  s.signal.response = { timeConstant: 0.25e-6, from: 'zero' };
  return s;
}

/** Preparation and mapping errors, a square carrier with complex levels, a third (leakage) state, two pipelines. */
function mixedErrors(seed: number): Scenario {
  const s = twoStateScenario({ ...base, carrier: 'square', t1: 15e-6, sigmaPerSample: 3, seed, preparationError: 0.04 });
  s.states = [
    { name: 'ground', level: { re: 0.1, im: -0.3 }, outcome: 0 },
    { name: 'excited', level: { re: 0.8, im: 0.5 }, outcome: 1 },
    { name: 'leaked', level: { re: 0.5, im: -0.6 }, outcome: 1 },
  ];
  s.prepare = [0.5, 0.5, 0];
  s.preparationError = [{ probability: 0.04, into: 1, origin: 'test' }, null, null];
  s.mappingError = [null, { probability: 0.06, into: 0, origin: 'test' }, null];
  s.transitions.push({ from: 1, to: 2, rate: 4e4, kind: 'leakage' }, { from: 2, to: 0, rate: 1e5, kind: 'relaxation' });
  s.pipelines.push({ name: 'rotated', referencePhase: 0.9, threshold: { method: 'midpoint', value: 0 } });
  return s;
}

/**
 * Sensor-side 1/f noise (it rides on the carrier like the signal, so demodulation keeps it) and a
 * weaker amplifier-side source, on white noise and relaxation. The band starts at 50 kHz, so
 * successive shots (4 µs apart) are correlated over a few shots only and the samples the
 * distribution tests compare are nearly independent.
 */
function withFlicker(seed: number): Scenario {
  const s = twoStateScenario({ ...base, t1: 12e-6, sigmaPerSample: 3, seed });
  const flickers: FlickerSourceSpec[] = [
    { kind: 'flicker', name: 'sensor 1/f', amplitude: 0.15, exponent: 1, low: 50e3, high: 10e6, injection: 'sensor', inDetuning: false },
    { kind: 'flicker', name: 'amplifier 1/f', amplitude: 0.05, exponent: 1.2, low: 50e3, high: 10e6, injection: 'amplifier', inDetuning: false },
  ];
  s.signal.sources = flickers;
  return s;
}

const scenarios: [string, (seed: number) => Scenario][] = [
  ['white noise + relaxation', whiteRelaxation],
  ['carrier + finite bandwidth', finiteBandwidth],
  ['preparation, mapping, leakage, square carrier, two pipelines', mixedErrors],
  ['1/f noise (sensor- and amplifier-side) + relaxation', withFlicker],
];

type Engine = (point: ReturnType<typeof compilePoint>, pointIndex: number, purpose: "score", batch: number, count: number) => ShotBatch;

function batches(engine: Engine, s: Scenario, n: number): ShotBatch[] {
  const p = compilePoint(s);
  return Array.from({ length: n }, (_, b) => engine(p, 0, 'score', b, s.batchSize));
}

function column(list: ShotBatch[], pipeline: number, which: 'inPhase' | 'quadrature'): Float64Array {
  const out = new Float64Array(list.reduce((n, b) => n + b.count, 0));
  let k = 0;
  for (const b of list) { out.set(b.values[pipeline]![which], k); k += b.count; }
  return out;
}

describe('same seed: the engines share every history', () => {
  it.each(scenarios)('%s: truth columns identical', (_name, make) => {
    const s = make(11);
    const [t] = batches(simulateBatch, s, 1), [e] = batches(simulateExactBatch, s, 1);
    for (const k of ['intended', 'prepared', 'initial', 'atWindowStart', 'atWindowEnd', 'jumpCause', 'firstJump'] as const) {
      expect(Array.from(e![k]), k).toEqual(Array.from(t![k]));
    }
  });

  it.each([
    ...scenarios,
    ['settled analog response', (seed: number) => ({ ...finiteBandwidth(seed), signal: { ...finiteBandwidth(seed).signal, response: { timeConstant: 0.4e-6, from: 'settled' as const } } })],
  ] as [string, (seed: number) => Scenario][])('%s: without noise, values equal shot by shot', (_name, make) => {
    const s = make(12);
    s.signal.white = null;
    const [t] = batches(simulateBatch, s, 1), [e] = batches(simulateExactBatch, s, 1);
    let jumps = 0, worst = 0, scale = 0;
    for (let i = 0; i < t!.count; i++) if (!Number.isNaN(t!.firstJump[i]!)) jumps++;
    t!.values.forEach((v, p) => {
      for (const k of ['inPhase', 'quadrature'] as const) {
        for (let i = 0; i < t!.count; i++) {
          worst = Math.max(worst, Math.abs(v[k][i]! - e!.values[p]![k][i]!));
          scale = Math.max(scale, Math.abs(v[k][i]!));
        }
      }
    });
    expect(jumps, 'the scenario must exercise jumps inside the record').toBeGreaterThan(200);
    // tolerance: a few hundred roundings of sums of ~200 terms (common practice, no source)
    expect(worst, `max |trace − exact| = ${worst} for values up to ${scale}`).toBeLessThanOrEqual(1e-12 * scale);
  });
});

describe('different seeds: the engines agree in distribution', () => {
  it.each(scenarios)('%s: KS on every output, p > 0.01', (_name, make) => {
    const t = batches(simulateBatch, make(21), 3), e = batches(simulateExactBatch, make(22), 3);
    const pipelines = t[0]!.values.length;
    for (let p = 0; p < pipelines; p++) {
      for (const k of ['inPhase', 'quadrature'] as const) {
        const r = ksTwoSample(column(t, p, k), column(e, p, k));
        expect(r.pValue, `pipeline ${p} ${k}: D = ${r.statistic}, n_e = ${r.effectiveN}, p = ${r.pValue} (need > 0.01)`).toBeGreaterThan(0.01);
      }
    }
  });

  it('the KS check has power: T1 halved in the exact engine is rejected (p < 0.01)', () => {
    const wrong = whiteRelaxation(22);
    wrong.transitions[0]!.rate *= 2;
    const r = ksTwoSample(column(batches(simulateBatch, whiteRelaxation(21), 3), 0, 'inPhase'), column(batches(simulateExactBatch, wrong, 3), 0, 'inPhase'));
    expect(r.pValue, `D = ${r.statistic}, p = ${r.pValue}`).toBeLessThan(0.01);
  });

  it('the KS check sees the 1/f part: the exact engine without it is rejected against the trace engine with it (p < 0.01)', () => {
    const without = withFlicker(22);
    without.signal.sources = [];
    const r = ksTwoSample(column(batches(simulateBatch, withFlicker(21), 3), 0, 'inPhase'), column(batches(simulateExactBatch, without, 3), 0, 'inPhase'));
    expect(r.pValue, `D = ${r.statistic}, p = ${r.pValue}`).toBeLessThan(0.01);
  });

  it.each(scenarios)('%s: error rates agree within the 99.9-percent interval of their difference', async (_name, make) => {
    const shots = 20480;
    const run = (engine: 'exact' | 'traces', seed: number) => runPoints([{ parameters: {}, scenario: { ...make(seed), shots } }], { engine });
    const [t, e] = [await run('traces', 31), await run('exact', 32)];
    expect(t.engine).toBe('traces');
    expect(e.engine).toBe('exact');
    const z = zForConfidence(0.999);
    t.points[0]!.summaries.forEach((st, p) => {
      const se = e.points[0]!.summaries[p]!;
      const [a, b] = [st.meanError.rate, se.meanError.rate];
      // independent binomial rates: SE of the difference √(a(1−a)/n + b(1−b)/m) (common practice, no source)
      const sd = Math.sqrt(a * (1 - a) / st.shots + b * (1 - b) / se.shots);
      expect(Math.abs(a - b), `pipeline ${st.pipeline}: traces ${a}, exact ${b}, allowed ${z * sd}`).toBeLessThanOrEqual(z * sd);
      expect(a, 'the comparison needs errors to compare').toBeGreaterThan(20 / st.shots);
    });
  }, 60_000);
});

describe('the 1/f part of the outputs', () => {
  it('is the trace engine\'s, shot for shot, and a sizeable part of the noise here', () => {
    const s = withFlicker(51);
    s.signal.white = null;
    const [t] = batches(simulateBatch, s, 1), [e] = batches(simulateExactBatch, s, 1);
    const quiet = withFlicker(51);
    quiet.signal.white = null;
    quiet.signal.sources = [];
    const [c] = batches(simulateExactBatch, quiet, 1);
    let worst = 0, scale = 0, power = 0;
    for (let i = 0; i < t!.count; i++) {
      const f = e!.values[0]!.inPhase[i]! - c!.values[0]!.inPhase[i]!;
      power += f * f;
      worst = Math.max(worst, Math.abs(t!.values[0]!.inPhase[i]! - e!.values[0]!.inPhase[i]!));
      scale = Math.max(scale, Math.abs(t!.values[0]!.inPhase[i]!));
    }
    const sigmaFlicker = Math.sqrt(power / t!.count);
    const sigmaWhite = compilePoint(withFlicker(51)).whiteSigma * Math.sqrt(2 / 200);
    // tolerance: roundings of sums of ~200 terms (common practice, no source)
    expect(worst, `max |trace − exact| = ${worst}`).toBeLessThanOrEqual(1e-12 * scale);
    expect(sigmaFlicker / sigmaWhite, `1/f σ ${sigmaFlicker} against white σ ${sigmaWhite}`).toBeGreaterThan(0.8);
  });
});

describe('the white part of the outputs', () => {
  it('has covariance σ²·Σ K_a·K_b between I and Q of both pipelines, in both engines', () => {
    const make = (white: boolean) => {
      const s = mixedErrors(41);
      if (!white) s.signal.white = null;
      return s;
    };
    const point = compilePoint(make(true));
    const t = exactTables(point);
    const kernels = Array.from({ length: t.outputs }, (_, d) => {
      const k = point.pipelines[t.pipeline[d]!]!.kernels;
      return { kernel: t.isQuadrature[d] ? k.quadrature! : k.inPhase, lo: k.lo, hi: k.hi };
    });
    const expected = whiteCovariance(kernels, point.whiteSigma);
    for (const engine of [simulateBatch, simulateExactBatch]) {
      // same seed without noise gives each shot's signal part (histories are drawn before the noise)
      const noisy = batches(engine, make(true), 2), clean = batches(engine, make(false), 2);
      const residual = (d: number) => {
        const which = t.isQuadrature[d] ? 'quadrature' : 'inPhase';
        const a = column(noisy, t.pipeline[d]!, which), b = column(clean, t.pipeline[d]!, which);
        return a.map((x, i) => x - b[i]!);
      };
      const r = Array.from({ length: t.outputs }, (_, d) => residual(d));
      const n = r[0]!.length;
      for (let a = 0; a < t.outputs; a++) {
        for (let b = 0; b <= a; b++) {
          let c = 0;
          for (let i = 0; i < n; i++) c += r[a]![i]! * r[b]![i]!;
          c /= n;
          const want = expected[a * t.outputs + b]!;
          // standard error of a sample covariance of zero-mean Gaussians: √((C_aa·C_bb + C_ab²)/n)
          const se = Math.sqrt((expected[a * t.outputs + a]! * expected[b * t.outputs + b]! + want * want) / n);
          expect(Math.abs(c - want), `${engine.name}: C[${a}][${b}] = ${c}, expected ${want} ± 5·${se}`).toBeLessThanOrEqual(5 * se);
        }
      }
    }
  });
});
