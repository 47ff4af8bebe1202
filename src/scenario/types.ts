/**
 * The resolved scenario: everything in SI units, every default filled in, every name
 * turned into an index. This is what the engine reads; the file format lives in `schema.ts`.
 */
import type { FilterSpec } from '../dsp/filter-spec.ts';

/** A complex amplitude (real for a baseband sensor, complex for IQ readout). */
export interface Complex {
  re: number;
  im: number;
}

/** One hidden state of the readout. */
export interface StateSpec {
  name: string;
  /** Signal level at the sensor output, in the scenario's signal unit (SI). */
  level: Complex;
  /** Index into `Scenario.outcomes`: what a perfect readout reports for this state. */
  outcome: number;
}

export type TransitionKind = 'relaxation' | 'excitation' | 'leakage';

/** A continuous-time Markov chain rate between two hidden states, active during the record. */
export interface TransitionSpec {
  from: number;
  to: number;
  /** Rate in 1/s (1/T1 for relaxation). */
  rate: number;
  kind: TransitionKind;
}

/** A probability that a state is replaced by another (preparation or mapping error). */
export interface FlipSpec {
  probability: number;
  /** Index of the state the shot ends up in. */
  into: number;
  /** How the probability was obtained, for reports: e.g. "Boltzmann: 150 µeV at 0.1 K, g = 1". */
  origin: string;
}

export type CarrierShape = 'none' | 'sine' | 'square';

export interface CarrierSpec {
  shape: CarrierShape;
  /** Hz; 0 for 'none'. */
  frequency: number;
  /** rad. */
  phase: number;
}

export interface TimingSpec {
  /** Samples per second. */
  sampleRate: number;
  /** s; the record covers [0, recordLength). */
  recordLength: number;
  /** s, from the record start. */
  windowStart: number;
  /** s. */
  windowLength: number;
  /** s between the starts of successive shots (continuous timeline for slow noise). */
  shotPeriod: number;
}

export interface WhiteNoiseSpec {
  /** One-sided amplitude density in signal unit per √Hz (per-sample σ = density·√(fs/2)). */
  density: number;
}

export interface SignalSpec {
  carrier: CarrierSpec;
  /** Dimensionless gain applied to signal and noise before digitisation. */
  gain: number;
  /** Additive white Gaussian noise, or null for none. */
  white: WhiteNoiseSpec | null;
  /** The unit of levels and noise: 'A', 'V' or '' (arbitrary). */
  unit: string;
}

export type ThresholdMethod = 'midpoint' | 'optimal' | 'fixed';

export interface ThresholdSpec {
  method: ThresholdMethod;
  /** Only for 'fixed': the threshold on the projected value, in signal units. */
  value: number;
}

/** Integration weights over the decimated bins of a pipeline's window. */
export type WeightsKind = 'boxcar' | 'matched' | 'optimal';

/** How a pipeline turns its record into an outcome. */
export type ClassifierKind = 'threshold' | 'likelihood';

/**
 * Post-selection band around the decision threshold: shots inside it are discarded. 'fraction':
 * total width as a fraction of the calibrated separation of the decision statistic; 'width':
 * total width in signal units (threshold classifier only).
 */
export type AmbiguousBand = { kind: 'fraction'; value: number } | { kind: 'width'; value: number };

/** One named processing chain, run on every shot. Optional fields default to today's chain. */
export interface PipelineSpec {
  name: string;
  /** rad, or 'auto' (aligned with the state separation). */
  referencePhase: number | 'auto';
  threshold: ThresholdSpec;
  /** This pipeline's integration window (s from the record start); default the timing window. */
  window?: { start: number; length: number };
  /** Low-pass after demodulation; default none, or a block average when decimating. */
  filter?: FilterSpec;
  /** Decimation factor (keep every factor-th filtered sample); default 1. */
  decimate?: number;
  /** Default 'boxcar'. */
  weights?: WeightsKind;
  /** Default 'threshold'. */
  classifier?: ClassifierKind;
  /** Default none. */
  ambiguousBand?: AmbiguousBand | null;
  /** Filled by the run after calibration, never by a file: matched/optimal weights per bin. */
  calibratedWeights?: number[];
}

export interface Scenario {
  name: string;
  description: string;
  /** Run seed (a non-negative integer below 2^53). */
  seed: number;
  /** Scored shots per sweep point. */
  shots: number;
  /** Calibration shots per sweep point (never scored). */
  calibrationShots: number;
  /** Shots per batch (the unit of seeding and work). */
  batchSize: number;
  timing: TimingSpec;
  states: StateSpec[];
  /** Distinct outcome labels, in order of first appearance among the states. */
  outcomes: string[];
  /** Prepared mixture: probability of preparing each state (sums to 1). */
  prepare: number[];
  /** Per prepared state: preparation error, or null. */
  preparationError: (FlipSpec | null)[];
  /** Per state after preparation: mapping error, or null. */
  mappingError: (FlipSpec | null)[];
  transitions: TransitionSpec[];
  signal: SignalSpec;
  pipelines: PipelineSpec[];
  /** Set by the run command, never by a file: copy each scored shot's record for traces.arrow. */
  keepTraces?: 'raw' | 'baseband';
}
