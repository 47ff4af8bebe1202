/**
 * The benchmark workload of the trace engine (the same as bench/numpy_trace.py):
 * 2 states 50/50, levels 0 and 1, T1 = 200 µs, record 20 µs at 100 MS/s, sine carrier 1 MHz,
 * white noise σ = 5 per sample, demodulation and boxcar over the record, midpoint threshold.
 */
import type { Scenario } from '../src/scenario/types.ts';

export function benchWorkload(): Scenario {
  const fs = 100e6;
  return {
    name: 'bench', description: 'benchmark workload', seed: 1, shots: 20480, calibrationShots: 2048, batchSize: 4096,
    timing: { sampleRate: fs, recordLength: 20e-6, windowStart: 0, windowLength: 20e-6, shotPeriod: 20e-6 },
    states: [
      { name: 'ground', level: { re: 0, im: 0 }, outcome: 0 },
      { name: 'excited', level: { re: 1, im: 0 }, outcome: 1 },
    ],
    outcomes: ['0', '1'],
    prepare: [0.5, 0.5],
    preparationError: [null, null],
    mappingError: [null, null],
    transitions: [{ from: 1, to: 0, rate: 1 / 200e-6, kind: 'relaxation' }],
    signal: { carrier: { shape: 'sine', frequency: 1e6, phase: 0 }, gain: 1, white: { density: 5 / Math.sqrt(fs / 2) }, unit: '' },
    pipelines: [{ name: 'main', referencePhase: 0, threshold: { method: 'midpoint', value: 0 } }],
  };
}
