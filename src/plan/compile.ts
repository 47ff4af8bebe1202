/**
 * Everything a batch needs that depends only on the scenario of one sweep point, computed once:
 * the sample grid, each state's waveform, the chain's jump tables, the processing kernels.
 */
import { makeChain, type Chain } from '../physics/chain.ts';
import { cumulativeMixture } from '../physics/flips.ts';
import { carrierTables, stateWaveform } from '../signal/carrier.ts';
import { makeGrid, type Grid } from '../signal/grid.ts';
import { makeReference } from '../dsp/demodulate.ts';
import { boxcarKernels, type LinearKernels } from '../dsp/integrate.ts';
import { transitionCause } from '../analysis/causes.ts';
import type { PipelineSpec, Scenario } from '../scenario/types.ts';

export interface CompiledPipeline {
  spec: PipelineSpec;
  /** The demodulation reference phase actually used (rad). */
  referencePhase: number;
  kernels: LinearKernels;
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

export function compilePoint(scenario: Scenario): CompiledPoint {
  const grid = makeGrid(scenario.timing);
  const { carrier, gain } = scenario.signal;
  const tables = carrierTables(carrier, grid.samples, grid.sampleRate);
  const waveforms = scenario.states.map((s) => stateWaveform(tables, s.level.re, s.level.im, gain, new Float64Array(grid.samples)));
  const whiteSigma = scenario.signal.white ? gain * scenario.signal.white.density * Math.sqrt(grid.sampleRate / 2) : 0;
  const pipelines = scenario.pipelines.map((spec) => {
    const referencePhase = spec.referencePhase === 'auto' ? automaticReferencePhase(scenario) : spec.referencePhase;
    const reference = makeReference(grid.samples, grid.sampleRate, carrier.frequency, referencePhase);
    return { spec, referencePhase, kernels: boxcarKernels(grid.samples, grid.windowLo, grid.windowHi, reference) };
  });
  const n = scenario.states.length;
  const jumpCause = new Uint8Array(n * n);
  for (const t of scenario.transitions) {
    jumpCause[t.from * n + t.to] = transitionCause(t.kind);
  }
  return {
    scenario, grid, waveforms, whiteSigma,
    chain: makeChain(n, scenario.transitions),
    prepareCumulative: cumulativeMixture(scenario.prepare),
    pipelines,
    synthLo: Math.min(...pipelines.map((p) => p.kernels.lo)),
    synthHi: Math.max(...pipelines.map((p) => p.kernels.hi)),
    jumpCause,
  };
}
