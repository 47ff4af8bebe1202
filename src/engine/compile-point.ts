/**
 * Everything a batch needs that depends only on the scenario of one sweep point, computed once:
 * the sample grid, each state's waveform, the chain's jump tables, the processing kernels.
 */
import { makeChain, type Chain } from '../physics/chain.ts';
import { cumulativeMixture } from '../physics/flips.ts';
import { carrierTables, stateWaveform } from '../signal/carrier.ts';
import { makeGrid, type Grid } from '../signal/grid.ts';
import type { LinearKernels } from '../dsp/integrate.ts';
import { chainKernels, compileChain, type PipelineChain } from '../dsp/pipeline-chain.ts';
import { transitionCause } from '../analysis/causes.ts';
import type { PipelineSpec, Scenario } from '../scenario/types.ts';
import { applySensor } from '../physics/sensor-scenario.ts';
import { respondedWaveform } from '../signal/response.ts';
import { compileNoise, type NoisePlan } from '../signal/noise-plan.ts';

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
}

/** The mean level of each outcome group under the prepared mixture (for 'auto' phase). */
export function outcomeMeans(scenario: Scenario): { re: number; im: number }[] {
  return scenario.outcomes.map((_, o) => {
    let re = 0, im = 0, w = 0;
    scenario.states.forEach((s, i) => {
      if (s.outcome !== o) return;
      const p = scenario.prepare[i]! > 0 ? scenario.prepare[i]! : 1e-300;
      re += p * s.level.re; im += p * s.level.im; w += p;
    });
    return { re: re / w, im: im / w };
  });
}

/** The reference phase that puts the outcome separation on the I axis. */
export function automaticReferencePhase(scenario: Scenario): number {
  const [m0, m1] = outcomeMeans(scenario);
  return scenario.signal.carrier.phase + Math.atan2(m1!.im - m0!.im, m1!.re - m0!.re);
}

export function compilePoint(input: Scenario): CompiledPoint {
  // levels, rates and noise that a sensor section derives (a no-op without one)
  const scenario = applySensor(input);
  const grid = makeGrid(scenario.timing);
  const { carrier, gain } = scenario.signal;
  const tables = carrierTables(carrier, grid.samples, grid.sampleRate);
  const levelWaves = scenario.states.map((s) => stateWaveform(tables, s.level.re, s.level.im, gain, new Float64Array(grid.samples)));
  const pipelines = scenario.pipelines.map((spec) => {
    const referencePhase = spec.referencePhase === 'auto' ? automaticReferencePhase(scenario) : spec.referencePhase;
    const chain = compileChain(spec, grid, carrier.frequency, referencePhase);
    return { spec, referencePhase, kernels: chainKernels(chain, grid.samples), chain };
  });
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
    ? levelWaves.map((w, s) => respondedWaveform(w, response, s, grid.sampleRate, new Float64Array(grid.samples)))
    : levelWaves;
  return {
    scenario, grid, waveforms, whiteSigma: noise.whiteSigma, noise, levelWaves,
    chain: makeChain(n, scenario.transitions),
    prepareCumulative: cumulativeMixture(scenario.prepare),
    pipelines,
    synthLo,
    synthHi,
    jumpCause,
  };
}
