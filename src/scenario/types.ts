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

/**
 * How the level reaches the record: 'none' one real baseband channel; 'sine' or 'square' one
 * channel modulated by a carrier; 'baseband-iq' two baseband channels, I = Re(level) and
 * Q = Im(level), as recorded after an analog IQ demodulator.
 */
export type CarrierShape = 'none' | 'sine' | 'square' | 'baseband-iq';

export interface CarrierSpec {
  shape: CarrierShape;
  /** Hz; 0 for 'none' and 'baseband-iq'. */
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
  /** White noise built from the parts of the chain (adds to `white`); absent or null for none. */
  components?: NoiseComponentsSpec | null;
  /** Noise sources beyond white noise, each of a registered kind (signal/noise/), in registry order (absent: none). */
  sources?: NoiseSourceSpec[];
  /** First-order analog response on the level path (absent or null: instantaneous). */
  response?: ResponseSpec | null;
  /** Clipping range and resolution after the gain (absent or null: ideal). */
  digitizer?: DigitizerSpec | null;
}

/**
 * Where a noise source enters: at the sensor (it moves the operating point, so the carrier
 * modulates it like the signal) or at the amplifier (added after the modulation).
 */
export type NoiseInjection = 'sensor' | 'amplifier';

/**
 * One noise source beyond white noise. Its kind (a file of signal/noise/, listed in its registry)
 * says what its other fields are.
 */
export interface NoiseSourceSpec {
  kind: string;
  /** Its name in the noise budget. */
  name: string;
  injection: NoiseInjection;
  /** Given as detuning (charge) noise, in energy units: the sensor turns it into signal units. */
  inDetuning: boolean;
}

/** White-noise parts of a current readout (each adds 4kT/R, 2eIF, (e_n/R)², i_n² to S). */
export interface NoiseComponentsSpec {
  /** Sense resistor, Ω (Johnson noise, and the resistance that refers e_n to current). */
  resistance: number | null;
  /** Temperature of the resistor, K. */
  temperature: number;
  /** Current carrying shot noise, A, or 'sensor' (the sensor's current at the operating point). */
  current: number | 'sensor' | null;
  /** Fano factor of the shot noise. */
  fano: number;
  /** Amplifier input voltage noise e_n, V/√Hz. */
  amplifierVoltage: number | null;
  /** Amplifier input current noise i_n, A/√Hz. */
  amplifierCurrent: number | null;
}

/** First-order response on the level path. */
export interface ResponseSpec {
  /** τ = 1/(2π·bandwidth), s. */
  timeConstant: number;
  /** 'settled': y(0) is the initial level; 'zero': y(0) = 0 (ring-up). */
  from: 'settled' | 'zero';
}

/** Digitizer after the gain. */
export interface DigitizerSpec {
  /** Input range in signal units (after the gain). */
  low: number;
  high: number;
  /** ADC bits, or null for clipping only. */
  bits: number | null;
}

/** A bias-dependent, readout-induced relaxation law (phenomenological, no source). */
export type ReadoutRelaxationLaw =
  | { kind: 'power'; rate0: number; bias0: number; exponent: number }
  | { kind: 'exponential'; rate0: number; scale: number };

/** Readout-induced relaxation between two states, rising with the sensor bias. */
export interface ReadoutRelaxationSpec {
  from: number;
  to: number;
  law: ReadoutRelaxationLaw;
  /** 'add': adds to the transition's rate; 'replace': replaces it. */
  combine: 'add' | 'replace';
}

/** A single-level sensor dot (Beenakker 1991) that sets the state levels. */
export interface SensorSpec {
  /** Tunnel rates to the left and right leads, 1/s. */
  tunnelLeft: number;
  tunnelRight: number;
  /** Electron temperature, K. */
  temperature: number;
  /** Source–drain bias, V. */
  bias: number;
  /** Operating detuning ε0, J, or 'steepest' (maximum |dI/dε| on the positive flank). */
  operatingPoint: number | 'steepest';
  /** Detuning shift of each state (J), in state order. */
  shifts: number[];
  readoutRelaxation: ReadoutRelaxationSpec[];
  /** Set once the derived values (levels, rates, converted noise) are in the scenario. */
  derived?: boolean;
}

export type ThresholdMethod = 'midpoint' | 'optimal' | 'fixed';

export interface ThresholdSpec {
  method: ThresholdMethod;
  /** Only for 'fixed': the threshold on the projected value, in signal units. */
  value: number;
}

/** Integration weights over the decimated bins of a pipeline's window. */
export type WeightsKind = 'boxcar' | 'matched' | 'optimal';

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
  /** The name of a registered classifier (classify/registry.ts); default 'threshold'. */
  classifier?: string;
  /** Default none. */
  ambiguousBand?: AmbiguousBand | null;
}

/** One swept scenario value: its key path, table column, SI unit and values. */
export interface SweepAxis {
  /** Key path as written in messages, e.g. `transitions[0].lifetime`. */
  key: string;
  path: (string | number)[];
  /** Column name in the tables (letters, digits, '_'). */
  column: string;
  /** SI unit of the values ('' for plain numbers). */
  unit: string;
  /** Values in SI units, in sweep order. */
  values: number[];
  /** The values as written in the file (empty for a range). */
  written: (number | string)[];
  /** 'list' for written values, else the range's spacing. */
  spacing: 'list' | 'linear' | 'log';
  /** Whether the key holds an integer (seed, shots, …): never refined continuously. */
  integer: boolean;
}

/** The sweep section: values to vary and how to combine them. */
export interface SweepSpec {
  combine: 'grid' | 'zip';
  axes: SweepAxis[];
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
  /** Optional sensor front end (absent or null: levels as given). */
  sensor?: SensorSpec | null;
  /** The sweep section of the file (absent when nothing is swept; absent in each point's scenario). */
  sweep?: SweepSpec;
}
