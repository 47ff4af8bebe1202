/**
 * One pipeline compiled for a sample grid: its chain (demodulation reference, designed filter,
 * decimation, window, bin weights) and the linear kernels K_I, K_Q on the record grid that give
 * the integrated value in one dot product.
 *
 * The chain, on a record x[k] with sample rate fs:
 *   1. demodulate on [processLo, processHi): I[k] = x[k]·2cos θ_k, Q[k] = −x[k]·2sin θ_k
 *      (baseband: I = x, no Q);
 *   2. filter I and Q from rest, starting at processLo: y = h ∗ I;
 *   3. decimate by D over the window [windowLo, windowHi): bin b is the filtered sample at the
 *      END of block b, y[windowLo + (b+1)·D − 1], b = 0 … bins−1, bins = ⌊L/D⌋ (an incomplete
 *      last block is dropped); with the default block-average filter (a moving average of D
 *      samples) bin b is the mean of block b;
 *   4. weights: value = Σ_b w_b·bin_b (boxcar w_b = 1/bins; matched/optimal from calibration).
 * processLo is where filtering from rest gives the same bins as filtering from the record start:
 * the window start for no filter, (taps − 1) samples earlier for an FIR, the record start for
 * an IIR filter. processHi is one past the last bin's sample.
 *
 * Steps 1–4 are linear in x, so value_I = Σ_m K_I[m]·x[m] with K_I[m] = 2cos θ_m·g[m], where
 * g = Hᵀu is the filter's transpose applied to the weights placed on the bin samples (u[t_b] = w_b):
 * `applyFilterAdjoint` filters the time-reversed u. dsp/process-record.ts runs the same chain
 * record by record; test/dsp/process-record.test.ts checks both agree.
 *
 * Baseband I and Q (two channels): step 1 is the identity followed by the rotation by the
 * reference phase (demodulate.ts); the filter acts on I' and Q' alike, so the kernels are
 * K[c·n + m] = ref[c·n + m]·g[m] on each channel c — the same formula on channel-major tables.
 */
import { applyFilterAdjoint, designFilter, type DesignedFilter, type FilterSpec } from './filter-spec.ts';
import { makeReference, type Reference } from './demodulate.ts';
import { boxcarKernels, type LinearKernels } from './integrate.ts';
import { firstSampleAtOrAfter, type Grid } from '../signal/grid.ts';
import type { AmbiguousBand, PipelineSpec, WeightsKind } from '../scenario/types.ts';

/** Everything the per-record processing of one pipeline needs. */
export interface PipelineChain {
  sampleRate: number;
  /** Channels of the record (1, or 2 for baseband I and Q). */
  channels: number;
  /** Demodulation reference on the record grid; null at baseband with one channel (no Q). */
  reference: Reference | null;
  /** The designed low-pass, or null for none. */
  filter: DesignedFilter | null;
  /** Decimation factor D. */
  factor: number;
  /** This pipeline's window in samples, [windowLo, windowHi). */
  windowLo: number;
  windowHi: number;
  /** Decimated bins in the window, ⌊(windowHi − windowLo)/D⌋ ≥ 1. */
  bins: number;
  /** First sample read (filtering from rest starts here). */
  processLo: number;
  /** One past the last sample read (the last bin's sample + 1). */
  processHi: number;
  /** Duration of one bin, D/fs (s). */
  binDuration: number;
  weights: WeightsKind;
  band: AmbiguousBand | null;
  /** Weights per bin (boxcar until calibrated weights are given). */
  binWeights: Float64Array;
  /** Whether binWeights came from calibration (compileChain's `weights`). */
  trained: boolean;
}

/** The filter a spec asks for: the given one, else none, or a block average of D when decimating. */
export function effectiveFilter(spec: PipelineSpec): FilterSpec {
  const factor = spec.decimate ?? 1;
  if (spec.filter !== undefined) return spec.filter;
  return factor > 1 ? { kind: 'boxcar', length: factor } : { kind: 'none' };
}

/** The window of a pipeline in samples on `grid` (its own window, else the grid's). */
export function pipelineWindow(spec: PipelineSpec, grid: Grid): { lo: number; hi: number } {
  if (spec.window === undefined) return { lo: grid.windowLo, hi: grid.windowHi };
  const fs = grid.sampleRate;
  const lo = Math.min(grid.samples, firstSampleAtOrAfter(spec.window.start, fs));
  const hi = Math.min(grid.samples, firstSampleAtOrAfter(spec.window.start + spec.window.length, fs));
  return { lo, hi };
}

/** Sample index that bin b of `chain` reads: the end of its block. */
export function binSample(chain: PipelineChain, b: number): number {
  return chain.windowLo + (b + 1) * chain.factor - 1;
}

/** What demodulation needs to know of the record: its carrier frequency (0 without) and its channels (2: baseband I and Q). */
export interface RecordCarrier {
  frequency: number;
  channels: number;
}

/**
 * Compiles a pipeline's chain on `grid` for records under `carrier`, with the demodulation
 * reference at `referencePhase`, and with calibrated bin weights when given (else boxcar).
 */
export function compileChain(
  spec: PipelineSpec, grid: Grid, carrier: RecordCarrier, referencePhase: number, weights: Float64Array | null = null,
): PipelineChain {
  const fs = grid.sampleRate;
  const { lo, hi } = pipelineWindow(spec, grid);
  const factor = spec.decimate ?? 1;
  const bins = Math.floor((hi - lo) / factor);
  if (bins < 1) throw new RangeError(`pipeline "${spec.name}": decimation by ${factor} leaves no bin in a window of ${hi - lo} samples`);
  const fspec = effectiveFilter(spec);
  const filter = fspec.kind === 'none' ? null : designFilter(fspec, fs);
  let processLo = lo;
  if (fspec.kind === 'boxcar') processLo = Math.max(0, lo - (fspec.length - 1));
  else if (fspec.kind === 'fir') processLo = Math.max(0, lo - (fspec.taps - 1));
  else if (fspec.kind === 'single-pole' || fspec.kind === 'butterworth') processLo = 0;
  const processHi = lo + bins * factor;
  let binWeights: Float64Array;
  let trained = false;
  if (weights !== null) {
    if (weights.length !== bins) {
      throw new RangeError(`pipeline "${spec.name}": ${weights.length} calibrated weights for ${bins} bins`);
    }
    binWeights = Float64Array.from(weights);
    trained = true;
  } else {
    binWeights = new Float64Array(bins).fill(1 / bins);
  }
  return {
    sampleRate: fs, channels: carrier.channels,
    reference: makeReference(grid.samples, fs, carrier.frequency, referencePhase, carrier.channels),
    filter, factor, windowLo: lo, windowHi: hi, bins, processLo, processHi, binDuration: factor / fs,
    weights: spec.weights ?? 'boxcar', band: spec.ambiguousBand ?? null,
    binWeights, trained,
  };
}

/**
 * The kernels K_I, K_Q of a chain with weights `weights` per bin (default its binWeights) on a
 * record of n samples per channel, nonzero on [processLo, processHi) of each channel. The plain
 * chain (no filter, D = 1, uniform weights) is exactly `boxcarKernels` over the window.
 */
export function chainKernels(chain: PipelineChain, n: number, weights: Float64Array = chain.binWeights): LinearKernels {
  const { reference, processLo, processHi, channels } = chain;
  if (chain.filter === null && chain.factor === 1 && !chain.trained && weights === chain.binWeights) {
    return boxcarKernels(n, chain.windowLo, chain.windowHi, reference);
  }
  const g = chainAdjoint(chain, weights);
  const inPhase = new Float64Array(channels * n);
  const quadrature = reference ? new Float64Array(channels * n) : null;
  for (let at = 0; at < channels * n; at += n) {
    for (let m = processLo; m < processHi; m++) {
      const v = g[m - processLo]!;
      inPhase[at + m] = reference ? v * reference.inPhase[at + m]! : v;
      if (quadrature && reference) quadrature[at + m] = v * reference.quadrature[at + m]!;
    }
  }
  return { inPhase, quadrature, lo: processLo, hi: processHi };
}

/**
 * g = Hᵀu on [processLo, processHi) (index m − processLo): the weight each demodulated sample
 * gets in the integrated value, before the reference.
 */
export function chainAdjoint(chain: PipelineChain, weights: Float64Array): Float64Array {
  const g = new Float64Array(chain.processHi - chain.processLo);
  for (let b = 0; b < chain.bins; b++) g[binSample(chain, b) - chain.processLo] = weights[b]!;
  if (chain.filter !== null) applyFilterAdjoint(chain.filter, g, g, chain.filter.makeState());
  return g;
}
