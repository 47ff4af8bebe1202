/** Hand-built resolved scenarios for engine tests (no file parsing involved). */
import type { Scenario } from '../../src/scenario/types.ts';

export interface TwoStateOptions {
  sampleRate?: number;
  recordLength?: number;
  windowStart?: number;
  windowLength?: number;
  carrier?: 'none' | 'sine' | 'square' | 'baseband-iq';
  carrierFrequency?: number;
  levels?: [number, number];
  /** Per-sample white σ (converted to a density). */
  sigmaPerSample?: number;
  t1?: number;
  shots?: number;
  seed?: number;
  batchSize?: number;
  preparationError?: number;
}

/** A two-state readout: ground (outcome 0) and excited (outcome 1), 50/50. */
export function twoStateScenario(o: TwoStateOptions = {}): Scenario {
  const fs = o.sampleRate ?? 100e6;
  const recordLength = o.recordLength ?? 20e-6;
  const sigma = o.sigmaPerSample ?? 5;
  const [l0, l1] = o.levels ?? [0, 1];
  const carrier = o.carrier ?? 'sine';
  return {
    name: 'test', description: '', seed: o.seed ?? 7, shots: o.shots ?? 10000, calibrationShots: 2000,
    batchSize: o.batchSize ?? 1024,
    timing: {
      sampleRate: fs, recordLength, windowStart: o.windowStart ?? 0,
      windowLength: o.windowLength ?? recordLength - (o.windowStart ?? 0), shotPeriod: recordLength,
    },
    states: [
      { name: 'ground', level: { re: l0, im: 0 }, outcome: 0 },
      { name: 'excited', level: { re: l1, im: 0 }, outcome: 1 },
    ],
    outcomes: ['0', '1'],
    prepare: [0.5, 0.5],
    preparationError: o.preparationError ? [{ probability: o.preparationError, into: 1, origin: 'test' }, null] : [null, null],
    mappingError: [null, null],
    transitions: o.t1 ? [{ from: 1, to: 0, rate: 1 / o.t1, kind: 'relaxation' }] : [],
    signal: {
      carrier: { shape: carrier, frequency: carrier === 'none' || carrier === 'baseband-iq' ? 0 : (o.carrierFrequency ?? 1e6), phase: 0 },
      gain: 1, white: { density: sigma / Math.sqrt(fs / 2) }, unit: '',
    },
    pipelines: [{ name: 'main', referencePhase: 'auto', threshold: { method: 'midpoint', value: 0 } }],
  };
}
