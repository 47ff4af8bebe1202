/** Engine runs for the noise tests: a two-state scenario with extra noise, its simulated σ and the prediction. */
import { compilePoint, type CompiledPoint } from '../../src/engine/compile-point.ts';
import { makeScratch, simulateBatch } from '../../src/engine/trace/batch.ts';
import { predictNoise, seenFrom, type NoisePrediction } from '../../src/analysis/noise-prediction.ts';
import { projectKernel } from '../../src/classify/project.ts';
import { filterFunctionVariance } from '../../src/signal/filter-function.ts';
import { responsePowerGain } from '../../src/signal/response.ts';
import type { Scenario, SignalSpec } from '../../src/scenario/types.ts';
import type { FlickerSourceSpec } from '../../src/signal/noise/flicker.ts';
import type { TelegraphSourceSpec } from '../../src/signal/noise/telegraph.ts';
import type { CorrelatedSourceSpec } from '../../src/signal/noise/correlated.ts';
import { twoStateScenario, type TwoStateOptions } from './scenarios.ts';

/** A 1/f source spec (signal units). */
export function flicker(injection: 'sensor' | 'amplifier', amplitude: number, low: number, high: number, exponent = 1): FlickerSourceSpec {
  return { kind: 'flicker', name: `${injection}Flicker`, amplitude, exponent, low, high, injection, inDetuning: false };
}

/** A fluctuator spec (signal units). */
export function fluctuator(name: string, amplitude: number, rateUp: number, rateDown: number, injection: 'sensor' | 'amplifier'): TelegraphSourceSpec {
  return { kind: 'telegraph', name, amplitude, rateUp, rateDown, injection, inDetuning: false };
}

/** A correlated (Ornstein–Uhlenbeck) source spec (signal units). */
export function correlated(name: string, sigma: number, correlationTime: number, injection: 'sensor' | 'amplifier'): CorrelatedSourceSpec {
  return { kind: 'correlated', name, sigma, correlationTime, injection, inDetuning: false };
}

/** The sources of one kind of a signal section. */
export function sourcesOf(signal: Partial<SignalSpec>, kind: 'flicker'): FlickerSourceSpec[];
export function sourcesOf(signal: Partial<SignalSpec>, kind: 'telegraph'): TelegraphSourceSpec[];
export function sourcesOf(signal: Partial<SignalSpec>, kind: string): unknown[] {
  return (signal.sources ?? []).filter((s) => s.kind === kind);
}

export interface NoiseCase extends TwoStateOptions {
  /** Per-sample white σ, or 0 for none. */
  white?: number;
  shotPeriod?: number;
  signal?: Partial<SignalSpec>;
  /** Rotates both levels by this angle (rad): on baseband I and Q the decision axis then mixes both channels. */
  levelAngle?: number;
}

/** The scenario of a noise case: baseband or 1 MHz sine at 10 MS/s, 20 µs records by default. */
export function noiseScenario(c: NoiseCase): Scenario {
  const sc = twoStateScenario({
    sampleRate: 10e6, recordLength: 20e-6, carrierFrequency: 1e6, shots: 20480, batchSize: 4096, seed: 5,
    ...c, sigmaPerSample: c.white ?? 0,
  });
  sc.timing.shotPeriod = c.shotPeriod ?? sc.timing.recordLength;
  if (!c.white) sc.signal.white = null;
  Object.assign(sc.signal, c.signal ?? {});
  const a = c.levelAngle ?? 0;
  if (a !== 0) for (const s of sc.states) s.level = { re: s.level.re * Math.cos(a) - s.level.im * Math.sin(a), im: s.level.re * Math.sin(a) + s.level.im * Math.cos(a) };
  return sc;
}

export interface NoiseRun {
  point: CompiledPoint;
  /** Pooled within-state σ of the I output over all shots. */
  sigma: number;
  /** Mean I output per intended state. */
  means: number[];
  /** All I outputs per intended state. */
  values: number[][];
  prediction: NoisePrediction;
}

/** Simulates every shot of the scenario (score purpose) and predicts its noise on the I axis. */
export function runNoise(sc: Scenario): NoiseRun {
  const point = compilePoint(sc);
  const scratch = makeScratch(point);
  const values: number[][] = sc.states.map(() => []);
  for (let b = 0; b * sc.batchSize < sc.shots; b++) {
    const count = Math.min(sc.batchSize, sc.shots - b * sc.batchSize);
    const r = simulateBatch(point, 0, 'score', b, count, scratch);
    for (let i = 0; i < r.count; i++) values[r.intended[i]!]!.push(r.values[0]!.inPhase[i]!);
  }
  let m2 = 0, dof = 0;
  const means = values.map((v) => {
    if (v.length === 0) return NaN;
    const m = v.reduce((a, x) => a + x, 0) / v.length;
    for (const x of v) m2 += (x - m) ** 2;
    dof += v.length - 1;
    return m;
  });
  const k = point.pipelines[0]!.kernels;
  const prediction = predictNoise(point.noise, projectKernel(k, { cos: 1, sin: 0 }, point.channels), k.lo, k.hi, point.grid.sampleRate);
  return { point, sigma: Math.sqrt(m2 / dof), means, values, prediction };
}

/**
 * σ of a 1/f source through the ideal continuous filter function: ∫ A/f^α·|H_response(f)|²·|H(f)|² df,
 * H the I kernel times the gain (and the carrier for sensor-side noise) — independent of the
 * generator's blocks and grids (Wiener–Khinchin). On baseband I and Q the variances of the
 * source's independent realisations add (one per channel on the amplifier side, one along the
 * separation on the sensor side: signal/injection.ts), each with its own H.
 */
export function idealFlickerSigma(point: CompiledPoint, f: FlickerSourceSpec): number {
  const k = point.pipelines[0]!.kernels;
  const kernel = projectKernel(k, { cos: 1, sin: 0 }, point.channels);
  const tau = f.injection === 'sensor' ? point.noise.response?.timeConstant : undefined;
  const density = (fr: number) => (f.amplitude / fr ** f.exponent) * (tau ? responsePowerGain(tau, fr) : 1);
  let variance = 0;
  for (const x of seenFrom(point.noise, f.injection, kernel, k.lo, k.hi)) {
    variance += filterFunctionVariance(density, x, k.lo, k.hi, point.grid.sampleRate, f.low, f.high);
  }
  return Math.sqrt(variance);
}
