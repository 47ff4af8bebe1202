/**
 * The honest per-record path of a pipeline, as a lab's software runs it on each record:
 * demodulate, filter with state (from rest at the chain's processLo), decimate to the window's
 * bins, and weight. The kernels of compile-pipeline.ts give the same integrated values in one
 * dot product; this path exists for what needs the bins themselves — kept records, calibration
 * of matched/optimal weights, the likelihood classifier — and to check the kernels.
 */
import { demodulate } from './demodulate.ts';
import { decimate } from './decimate.ts';
import type { PipelineChain } from './pipeline-chain.ts';

/** Decimated bins of every shot of a batch, row after row (count × bins). */
export interface KeptBins {
  bins: number;
  inPhase: Float64Array;
  /** null at baseband. */
  quadrature: Float64Array | null;
}

/** Work buffers of one chain (reused record after record; no per-record allocation). */
export interface ProcessScratch {
  inPhase: Float64Array;
  quadrature: Float64Array;
  /** Filter state, reset to rest for every record. */
  state: Float64Array;
}

/** Scratch for `chain` on records of `samples` samples. */
export function makeProcessScratch(chain: PipelineChain, samples: number): ProcessScratch {
  return {
    inPhase: new Float64Array(samples),
    quadrature: new Float64Array(samples),
    state: chain.filter ? chain.filter.makeState() : new Float64Array(0),
  };
}

/**
 * Runs `chain` on one record (samples [processLo, processHi) are read) and writes its bins:
 * I into outI[offset … offset + bins), Q into outQ likewise (skipped when outQ is null or at
 * baseband, where Q is zero).
 */
export function processRecord(
  chain: PipelineChain, record: Float64Array, scratch: ProcessScratch,
  outI: Float64Array, outQ: Float64Array | null, offset: number,
): void {
  const { processLo, processHi, factor, bins } = chain;
  const withQ = outQ !== null && chain.reference !== null;
  demodulate(record, chain.reference, processLo, processHi, scratch.inPhase, scratch.quadrature);
  // bin b reads sample windowLo + (b+1)·D − 1: decimate from the first bin's sample
  const first = chain.windowLo + factor - 1;
  const parts: Float64Array[] = withQ ? [scratch.inPhase, scratch.quadrature] : [scratch.inPhase];
  const outs: Float64Array[] = withQ ? [outI, outQ!] : [outI];
  const coefficients = chain.filter?.coefficients;
  for (let c = 0; c < parts.length; c++) {
    const y = parts[c]!;
    if (coefficients?.kind === 'taps') {
      // an FIR (or the block average) decimated: only the bins' outputs, Σ_k taps[k]·y[t_b − k]
      convolveAtBins(coefficients.taps, y, processLo, first, factor, bins, outs[c]!, offset);
      continue;
    }
    if (chain.filter) {
      scratch.state.fill(0);
      const span = y.subarray(processLo, processHi);
      chain.filter.apply(span, span, scratch.state);
    }
    decimate(y.subarray(first, processHi), factor, outs[c]!.subarray(offset, offset + bins));
  }
  if (outQ !== null && !withQ) outQ.fill(0, offset, offset + bins);
}

/**
 * out[offset + b] = Σ_k taps[k]·y[t_b − k] for t_b = first + b·factor, with y taken as zero
 * before `lo` (the filter at rest there): the FIR's outputs at the bin samples only.
 */
function convolveAtBins(
  taps: Float64Array, y: Float64Array, lo: number, first: number, factor: number, bins: number, out: Float64Array, offset: number,
): void {
  const n = taps.length;
  for (let b = 0; b < bins; b++) {
    const t = first + b * factor;
    const kMax = Math.min(n - 1, t - lo);
    let s0 = 0, s1 = 0;
    let k = 0;
    for (; k + 1 <= kMax; k += 2) {
      s0 += taps[k]! * y[t - k]!;
      s1 += taps[k + 1]! * y[t - k - 1]!;
    }
    if (k <= kMax) s0 += taps[k]! * y[t - k]!;
    out[offset + b] = s0 + s1;
  }
}

/** Σ_b weights[b]·bins[offset + b]: the integrated value of one record's bins. */
export function integrateBins(bins: Float64Array, offset: number, weights: Float64Array): number {
  let s0 = 0, s1 = 0;
  const n = weights.length;
  let b = 0;
  for (; b + 1 < n; b += 2) {
    s0 += weights[b]! * bins[offset + b]!;
    s1 += weights[b + 1]! * bins[offset + b + 1]!;
  }
  if (b < n) s0 += weights[b]! * bins[offset + b]!;
  return s0 + s1;
}
