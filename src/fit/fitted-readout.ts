/**
 * What `fit` learns from recorded traces, in the terms of a scenario (SI units; the twin's state
 * order, outcome 0 first), each number with its uncertainty, plus what the fit page shows.
 */
import type { Estimate } from './estimate.ts';
import type { NoiseFit, ComponentTest } from './noise-model.ts';
import type { PreparationError } from './preparation.ts';
import type { WindowView } from './window-model.ts';

/** One state of the twin. */
export interface FittedState {
  /** 'lower' or 'upper' (along the separation). */
  name: string;
  outcome: string;
  /** Level (signal units): real part and imaginary part. */
  re: Estimate;
  im: Estimate;
  /** Prepared share. */
  share: Estimate;
}

/** The carrier: none, or its shape, frequency and phase, and where the frequency came from. */
export type FittedCarrier =
  | { shape: 'none' }
  | { shape: 'sine' | 'square'; frequency: Estimate; phase: Estimate; origin: 'found' | 'given' | 'assumed'; lineRatio: number };

/** A rate of the chain between the two states. */
export interface FittedTransition {
  from: number;
  to: number;
  kind: 'relaxation' | 'excitation';
  /** 1/s. */
  rate: Estimate;
  /** 1/rate, s. */
  lifetime: Estimate;
  deviance: number;
  kept: boolean;
}

/** The noise in the twin's terms. */
export interface FittedNoise {
  /** Where the slow noise enters the twin. */
  injection: 'amplifier' | 'sensor';
  /** The spectrum was measured on the records themselves, or along the separation of I/Q pairs. */
  domain: 'record' | 'pair';
  /** One-sided amplitude density of the white noise (signal unit/√Hz). */
  white: Estimate;
  flicker: { density: Estimate; at: number; exponent: Estimate; low: number; high: number; test: ComponentTest };
  correlated: { density: Estimate; correlationTime: Estimate; test: ComponentTest };
  /** The fit itself (measured domain), for the page. */
  fit: NoiseFit;
}

/** A preparation error with the label it belongs to. */
export interface FittedPreparation extends PreparationError {
  labelName: string;
}

/** Everything the fit found. */
export interface FittedReadout {
  source: string;
  rows: number;
  /** Records used (the first ones). */
  used: number;
  samples: number;
  complex: boolean;
  sampleRate: number;
  window: { start: number; length: number };
  states: [FittedState, FittedState];
  carrier: FittedCarrier;
  transitions: FittedTransition[];
  /** Per label (with labels), else null. */
  preparation: FittedPreparation[] | null;
  noise: FittedNoise;
  view: WindowView;
  details: {
    binSamples: number;
    bins: number;
    levelDeviance: number;
    iterations: number;
    groups: number;
    resamples: number;
    seed: number;
    cleanBins: number;
  };
}
