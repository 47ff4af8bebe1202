/**
 * The compiled kernels of a pipeline (compile-pipeline.ts) against the honest per-record path
 * (process.ts): demodulate, filter with state, decimate, weight. Both are the same linear map,
 * so the integrated values agree to rounding: |Δ| ≤ 1e−12 · Σ_m |K_m·x_m| (the scale of the
 * sum; common practice, no source). Also: the engine's kept bins equal process.ts on the same
 * shots, and the plain chain is exactly the old boxcar kernel. On baseband I and Q (two channels,
 * channel-major) the same holds for the identity demodulation and the rotation by the reference
 * phase (demodulate.ts).
 */
import { describe, expect, it } from 'vitest';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { chainKernels } from '../../src/dsp/pipeline-chain.ts';
import { needsCalibrationBins } from '../../src/classify/registry.ts';
import { integrateBins, makeProcessScratch, processRecord } from '../../src/dsp/process-record.ts';
import { makeScratch, simulateBatch } from '../../src/engine/trace/batch.ts';
import { boxcarKernels } from '../../src/dsp/integrate.ts';
import { makeReference } from '../../src/dsp/demodulate.ts';
import type { FilterSpec } from '../../src/dsp/filter-spec.ts';
import type { PipelineSpec } from '../../src/scenario/types.ts';
import { xorshiftRecord } from './helpers.ts';
import { twoStateScenario } from '../support/scenarios.ts';

const filters: { label: string; filter?: FilterSpec; decimate: number }[] = [
  { label: 'none, D = 1', filter: { kind: 'none' }, decimate: 1 },
  { label: 'none, D = 4 (picking)', filter: { kind: 'none' }, decimate: 4 },
  { label: 'block average, D = 5', decimate: 5 },
  { label: 'single-pole 2 MHz, D = 10', filter: { kind: 'single-pole', cutoff: 2e6 }, decimate: 10 },
  { label: 'Butterworth 4 at 3 MHz, D = 8', filter: { kind: 'butterworth', order: 4, cutoff: 3e6 }, decimate: 8 },
  { label: 'Butterworth 7 at 1 MHz, D = 1', filter: { kind: 'butterworth', order: 7, cutoff: 1e6 }, decimate: 1 },
  { label: 'FIR 31 Hann at 4 MHz, D = 6', filter: { kind: 'fir', taps: 31, cutoff: 4e6, window: 'hann' }, decimate: 6 },
  { label: 'FIR 64 Blackman at 2 MHz, D = 3', filter: { kind: 'fir', taps: 64, cutoff: 2e6, window: 'blackman' }, decimate: 3 },
];

const cases = filters.flatMap((f) => (['none', 'sine', 'baseband-iq'] as const).map((carrier) => ({ ...f, carrier, name: `${f.label}, carrier ${carrier}` })));

function pointFor(carrier: 'none' | 'sine' | 'baseband-iq', pipeline: Partial<PipelineSpec>, trainedWeights = false) {
  // 100 MS/s, 4 µs record, window 1–3.7 µs: the FIR/IIR read before the window start
  const sc = twoStateScenario({ carrier, recordLength: 4e-6, windowStart: 1e-6, windowLength: 2.7e-6, carrierFrequency: 7e6 });
  const spec: PipelineSpec = { name: 'p', referencePhase: 0.3, threshold: { method: 'midpoint', value: 0 }, ...pipeline };
  sc.pipelines = [spec];
  let point = compilePoint(sc);
  if (trainedWeights) {
    const bins = point.pipelines[0]!.chain.bins;
    const w = xorshiftRecord(99, bins);
    point = compilePoint(sc, { weights: [w] });
  }
  return point;
}

describe('kernels equal the per-record chain (|Δ| ≤ 1e−12 of the sum scale)', () => {
  it.each(cases)('$name', ({ filter, decimate, carrier }) => {
    for (const trained of [false, true]) {
      const point = pointFor(carrier, { ...(filter ? { filter } : {}), decimate, weights: trained ? 'matched' : 'boxcar' }, trained);
      const { chain, kernels } = point.pipelines[0]!;
      const n = point.grid.samples, entries = point.channels * n;
      const scratch = makeProcessScratch(chain, n);
      const binsI = new Float64Array(chain.bins);
      const binsQ = new Float64Array(chain.bins);
      for (const seed of [1, 2, 3]) {
        // a record that is garbage outside [processLo, processHi) of each channel: the chain must not read it
        const record = xorshiftRecord(seed, entries);
        processRecord(chain, record, scratch, binsI, binsQ, 0);
        const parts: [Float64Array, Float64Array | null, Float64Array][] = [[kernels.inPhase, null, binsI]];
        if (kernels.quadrature) parts.push([kernels.quadrature, null, binsQ]);
        for (const [k, , bins] of parts) {
          let dot = 0, scale = 0;
          for (let m = 0; m < entries; m++) {
            dot += k[m]! * record[m]!;
            scale += Math.abs(k[m]! * record[m]!);
          }
          const direct = integrateBins(bins, 0, chain.binWeights);
          const tol = 1e-12 * scale;
          expect(Math.abs(direct - dot), `trained ${trained}, seed ${seed}: per-record ${direct}, kernel ${dot}, tol ${tol}`).toBeLessThanOrEqual(tol);
        }
        // the kernel's support is [processLo, processHi) of each channel
        for (let at = 0; at < entries; at += n) {
          for (let m = at; m < at + chain.processLo; m++) expect(kernels.inPhase[m]).toBe(0);
          for (let m = at + chain.processHi; m < at + n; m++) expect(kernels.inPhase[m]).toBe(0);
        }
      }
    }
  });

  it('the plain chain is the boxcar kernel, bit for bit', () => {
    const point = pointFor('sine', {});
    const { chain, kernels } = point.pipelines[0]!;
    const expected = boxcarKernels(point.grid.samples, point.grid.windowLo, point.grid.windowHi,
      makeReference(point.grid.samples, point.grid.sampleRate, 7e6, 0.3));
    expect(Array.from(kernels.inPhase)).toEqual(Array.from(expected.inPhase));
    expect(Array.from(kernels.quadrature!)).toEqual(Array.from(expected.quadrature!));
    expect(chainKernels(chain, point.grid.samples).lo).toBe(point.grid.windowLo);
  });

  it('an IIR filter reads from the record start, an FIR taps−1 samples before the window', () => {
    const iir = pointFor('none', { filter: { kind: 'single-pole', cutoff: 2e6 } }).pipelines[0]!.chain;
    expect(iir.processLo).toBe(0);
    const fir = pointFor('none', { filter: { kind: 'fir', taps: 31, cutoff: 4e6, window: 'hann' } }).pipelines[0]!.chain;
    expect(fir.processLo).toBe(100 - 30);
  });
});

describe('the engine keeps the bins that process.ts computes', () => {
  it('calibration batches of a matched-weights pipeline carry every shot\'s bins', () => {
    const sc = twoStateScenario({ carrier: 'sine', recordLength: 4e-6, t1: 5e-6, shots: 1024, carrierFrequency: 5e6 });
    sc.pipelines = [
      { name: 'plain', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 } },
      { name: 'matched', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 }, weights: 'matched', decimate: 20, filter: { kind: 'butterworth', order: 2, cutoff: 4e6 } },
    ];
    const point = compilePoint(sc);
    expect(needsCalibrationBins(sc.pipelines[1]!)).toBe(true);
    const batch = simulateBatch(point, 0, 'calibrate', 0, 1024, makeScratch(point));
    expect(batch.records?.[0]).toBeNull();
    const kept = batch.records![1]!;
    const chain = point.pipelines[1]!.chain;
    expect(kept.bins).toBe(chain.bins);
    expect(kept.inPhase.length).toBe(1024 * chain.bins);
    // the boxcar over the bins equals the pipeline's integrated I of the same shot
    for (const i of [0, 17, 1023]) {
      const v = integrateBins(kept.inPhase, i * chain.bins, chain.binWeights);
      const k = batch.values[1]!.inPhase[i]!;
      expect(Math.abs(v - k), `shot ${i}: bins ${v}, kernel ${k}`).toBeLessThan(1e-12 * (Math.abs(k) + 1));
    }
    // scored batches of a threshold pipeline keep nothing
    expect(simulateBatch(point, 0, 'score', 0, 1024).records).toBeUndefined();
  });
});
