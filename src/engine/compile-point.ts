/**
 * Everything a batch needs that depends only on one point's plan (its scenario and the run's
 * options for it), computed once: the sample grid, each state's waveform, the chain's jump
 * tables, the processing kernels.
 */
import { makeChain, type Chain } from '../physics/chain.ts';
import { cumulativeMixture } from '../physics/flips.ts';
import { carrierTables, recordChannels, stateWaveform } from '../signal/carrier.ts';
import { separationAngle } from '../signal/separation.ts';
import { makeGrid, type Grid } from '../signal/grid.ts';
import type { LinearKernels } from '../dsp/integrate.ts';
import { chainKernels, compileChain, type PipelineChain } from '../dsp/pipeline-chain.ts';
import { transitionCause } from '../analysis/causes.ts';
import type { PipelineSpec, Scenario } from '../scenario/types.ts';
import { applySensor } from '../physics/sensor-scenario.ts';
import { respondedWaveform } from '../signal/response.ts';
import { compileNoise, withPipelineKernels, type NoisePlan } from '../signal/noise-plan.ts';
import type { PointOptions } from './point-plan.ts';
import { ScenarioProblem } from '../errors.ts';

export interface CompiledPipeline {
  spec: PipelineSpec;
  /** The demodulation reference phase actually used (rad). */
  referencePhase: number;
  kernels: LinearKernels;
  /** The chain behind the kernels, for per-record processing (plan/process.ts). */
  chain: PipelineChain;
}

export interface CompiledPoint {
  scenario: Scenario;
  grid: Grid;
  /**
   * Channels of the record: 1, or 2 for baseband I and Q. Every per-sample array of the point
   * (record, waveforms, kernels, noise tables) holds channels × grid.samples entries,
   * channel-major (signal/carrier.ts).
   */
  channels: number;
  /** waveforms[s][k]: noise-free output of state s at sample k (carrier and gain included). */
  waveforms: Float64Array[];
  /** Per-sample σ of the white noise at the output (gain included). */
  whiteSigma: number;
  chain: Chain;
  prepareCumulative: Float64Array;
  pipelines: CompiledPipeline[];
  /** Samples that must be synthesised: the union of the pipelines' supports. */
  synthLo: number;
  synthHi: number;
  /** Per state: the cause code of a jump out of it, per destination (for attribution). */
  jumpCause: Uint8Array;
  /** Noise sources, analog response and digitizer (compile-noise.ts). */
  noise: NoisePlan;
  /** levelWaves[s][k]: state s's waveform before the analog response (equals waveforms without one). */
  levelWaves: Float64Array[];
  /** Keep every scored shot's record (a run option, point-plan.ts), or null. */
  keepTraces: 'raw' | 'baseband' | null;
}

/** The reference phase that puts the outcome separation on the I axis. */
export function automaticReferencePhase(scenario: Scenario): number {
  return scenario.signal.carrier.phase + separationAngle(scenario);
}

/** Pipeline i of a (sensor-applied) scenario on `grid`, with calibrated bin weights when given. */
function compilePipeline(scenario: Scenario, i: number, grid: Grid, weights: Float64Array | null): CompiledPipeline {
  const spec = scenario.pipelines[i]!;
  const referencePhase = spec.referencePhase === 'auto' ? automaticReferencePhase(scenario) : spec.referencePhase;
  const carrier = { frequency: scenario.signal.carrier.frequency, channels: recordChannels(scenario.signal.carrier) };
  const chain = compileChain(spec, grid, carrier, referencePhase, weights);
  return { spec, referencePhase, kernels: chainKernels(chain, grid.samples), chain };
}

/** Index of the first value that is not finite, or -1. */
function firstNonFinite(a: Float64Array | null): number {
  if (a === null) return -1;
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i]!)) return i;
  return -1;
}

/**
 * Stops a point whose tables are not finite (a value of the scenario beyond what the arithmetic
 * holds), naming the key, rather than letting NaN reach the values. Validation bounds every value
 * (scenario/bounds.ts), so this is the last line, not the first.
 */
function checkCompiled(waveforms: readonly Float64Array[], pipelines: readonly CompiledPipeline[], whiteSigma: number): void {
  waveforms.forEach((w, s) => {
    const k = firstNonFinite(w);
    if (k >= 0) throw new ScenarioProblem(['states', s, 'level'], 'a level, carrier and gain whose record stays finite', `${w[k]} at sample ${k}`);
  });
  pipelines.forEach((p, i) => {
    for (const kernel of [p.kernels.inPhase, p.kernels.quadrature]) {
      const k = firstNonFinite(kernel);
      if (k >= 0) throw new ScenarioProblem(['pipelines', i], 'processing (filter, decimation, window) whose weights stay finite', `${kernel![k]} at sample ${k}`);
    }
  });
  if (!Number.isFinite(whiteSigma)) throw new ScenarioProblem(['signal', 'noise'], 'noise whose σ per sample is finite', String(whiteSigma));
}

/** Compiles a point's scenario with the run's options for it (calibrated weights, kept traces). */
export function compilePoint(input: Scenario, options: PointOptions = {}): CompiledPoint {
  // levels, rates and noise that a sensor section derives (a no-op without one)
  const scenario = applySensor(input);
  const grid = makeGrid(scenario.timing);
  const { carrier, gain } = scenario.signal;
  const tables = carrierTables(carrier, grid.samples, grid.sampleRate);
  const { channels } = tables;
  const levelWaves = scenario.states.map((s) => stateWaveform(tables, s.level.re, s.level.im, gain, new Float64Array(channels * grid.samples)));
  const pipelines = scenario.pipelines.map((_, i) => compilePipeline(scenario, i, grid, options.weights?.[i] ?? null));
  const n = scenario.states.length;
  const jumpCause = new Uint8Array(n * n);
  for (const t of scenario.transitions) {
    jumpCause[t.from * n + t.to] = transitionCause(t.kind);
  }
  const synthLo = Math.min(...pipelines.map((p) => p.kernels.lo));
  const synthHi = Math.max(...pipelines.map((p) => p.kernels.hi));
  const noise = compileNoise(scenario, grid, tables, synthLo, synthHi, pipelines.map((p) => p.kernels));
  const response = noise.response;
  const waveforms = response
    ? levelWaves.map((w, s) => respondedWaveform(w, response, s, grid.sampleRate, new Float64Array(channels * grid.samples)))
    : levelWaves;
  checkCompiled(waveforms, pipelines, noise.whiteSigma);
  return {
    scenario, grid, channels, waveforms, whiteSigma: noise.whiteSigma, noise, levelWaves,
    chain: makeChain(n, scenario.transitions),
    prepareCumulative: cumulativeMixture(scenario.prepare),
    pipelines,
    synthLo,
    synthHi,
    jumpCause,
    keepTraces: options.keepTraces ?? null,
  };
}

/**
 * The point with calibrated weights in the pipelines that have them (null: unchanged): their
 * chains and kernels, and what the noise kinds derive from them (the 1/f kernels carried onto its timeline) are made again; nothing else is.
 * The kernels' support does not depend on the weights, so the synthesised range stays.
 */
export function withWeights(point: CompiledPoint, weights: readonly (Float64Array | null)[]): CompiledPoint {
  if (weights.every((w) => w === null)) return point;
  const pipelines = point.pipelines.map((p, i) => (weights[i] ? compilePipeline(point.scenario, i, point.grid, weights[i]!) : p));
  return { ...point, pipelines, noise: withPipelineKernels(point.noise, pipelines.map((p) => p.kernels)) };
}
