/**
 * The noise-source contract. A kind of noise beyond the chain's white noise (1/f, telegraph, …)
 * is one file that says, in one object:
 * - how it is configured: the keys of one entry under `signal.noise.<kind>` as data (the
 *   scenario section builds its schema from them), and how an entry resolves into a spec;
 * - how it looks at the sensor: a spec written in detuning units, in signal units;
 * - whether the exact engine may use it (Gaussian, with a linear path to each value), and why not;
 * - for one point: its sources' variance of any linear functional of the record (exact where
 *   Gaussian), their spectra, the two-level shape of a fluctuator for the budget, its cost per
 *   sample, and its runtime over the shots' timeline.
 * The registry (registry.ts) lists the kinds; every other part of the program asks them, and none
 * dispatches on a kind's name.
 *
 * Where a source enters (record sample k, gain g, carrier table c_k): sensor-side noise n moves
 * the operating point and is modulated like the signal, g·c_k·n(t_k); amplifier-side noise is
 * added after the modulation, g·n(t_k) (signal/noise-plan.ts). On baseband I and Q the record has
 * two channels, and a source reaches it as independent realisations (signal/injection.ts): one
 * for sensor-side noise, entering both channels; one per channel for amplifier-side noise. The
 * variance and covariance below are of one realisation through a one-channel functional x; the
 * callers sum them over the realisations.
 */
import type { NoiseInjection, NoiseSourceSpec, TimingSpec } from '../../scenario/types.ts';
import type { RandomStream } from '../../random/stream.ts';
import type { StreamPurpose } from '../../random/streams.ts';
import type { Grid } from '../grid.ts';
import type { Realisations } from '../injection.ts';

/** Bounds of a number (the scenario's range, with its wording in messages). */
export interface ConfigRange {
  min?: number;
  max?: number;
  minExclusive?: boolean;
  maxExclusive?: boolean;
}

/** One key of a noise entry, as data; the scenario section turns it into a schema field. */
export type ConfigField = { optional?: boolean; description: string } & (
  /** A name of the source in the noise budget. */
  | { type: 'name' }
  /** One of a few words. */
  | { type: 'choice'; words: readonly [string, ...string[]] }
  /** A plain number. */
  | { type: 'number'; range?: ConfigRange }
  /** A quantity of one dimension ("30 kHz"), read to SI. */
  | { type: 'quantity'; dimension: string; range?: ConfigRange }
  /**
   * A quantity of one of several dimensions (e.g. a current, a voltage or an energy); the
   * resolver learns which (`KindedValue.index`).
   */
  | { type: 'kinded'; dimension: string; range?: ConfigRange }
);

/** A value of a `kinded` field: its SI value and which of the dimensions it was written in. */
export interface KindedValue {
  value: number;
  /** Index of the dimension's alternative (for signal-or-energy: 0 current, 1 voltage, 2 energy). */
  index: number;
  /** Written as a plain number. */
  plain: boolean;
}

/** A key path in the scenario document. */
export type ConfigPath = readonly (string | number)[];

/** What resolving one entry may ask of the scenario resolver. */
export interface ConfigContext {
  /** Stops with `file: path: expected …, found …`. */
  fail(path: ConfigPath, expected: string, found?: string): never;
  warn(path: ConfigPath, text: string): void;
  /**
   * A signal-or-energy value: true when written in energy (detuning) units, which need a sensor
   * section; otherwise records its signal unit for the one-unit check.
   */
  signalOrDetuning(value: KindedValue, path: ConfigPath): boolean;
  /** The source's name: the given one, else `base`, `base2`, …; unique in the noise budget. */
  uniqueName(given: string | undefined, base: string, index: number, path: ConfigPath): string;
  /** A quantity as the messages write it ("2.5 MHz"). */
  format(value: number, unit: string): string;
  timing: TimingSpec;
  /** Scored shots per point (the longest timeline a source must cover). */
  shots: number;
}

/** How the configuration of a kind reads. */
export interface NoiseConfig {
  fields: Readonly<Record<string, ConfigField>>;
  /** What one entry is, for the message when neither an entry nor a list is found. */
  expected: string;
  description: string;
  /** Most entries per point, and what they are called in the message beyond it ("fluctuators"). */
  maxEntries: number;
  plural: string;
}

/** The sensor's linear response at its operating point (physics/sensor-scenario.ts). */
export interface SensorResponse {
  /** dI/dε, A/J. */
  slope: number;
  /** The exact current change for a detuning step δ, I(ε0 + δ) − I(ε0), A. */
  step(detuning: number): number;
}

/** Everything a kind's compile needs to know of one point. */
export interface NoisePointContext {
  grid: Grid;
  timing: TimingSpec;
  /** Scored and calibration shots per point (the timelines' reach). */
  shots: number;
  calibrationShots: number;
  gain: number;
  /** Channels of the record (1, or 2 for baseband I and Q), each of grid.samples samples, channel-major. */
  channels: number;
  /** Weight of sensor-side noise at each record entry: gain·c_k (noise-plan.ts). */
  sensorWeight: Float64Array;
  /** How each injection point's sources reach the record (signal/injection.ts). */
  realisations: Realisations;
  /** The samples the engine synthesises on each channel, [synthLo, synthHi). */
  synthLo: number;
  synthHi: number;
  /** Time constant of the analog response (s), or null without one. */
  responseTimeConstant: number | null;
  /** Each pipeline's I and Q kernels (for a linear path to the values). */
  kernels: readonly KernelPair[];
}

/** A pipeline's kernels on the record grid (channel-major like the record), nonzero on [lo, hi) of each channel. */
export interface KernelPair {
  inPhase: Float64Array;
  quadrature: Float64Array | null;
  lo: number;
  hi: number;
}

/** One source's line in the noise budget. */
export interface NoiseSourceInfo {
  name: string;
  /** The kind's label in the budget (e.g. 'flicker'). */
  kind: string;
  injection: NoiseInjection;
  /** The density shown (its meaning is the kind's: e.g. √A at 1 Hz for 1/f, the amplitude for a fluctuator). */
  density: number;
  /** Its unit, with {unit} for the signal unit (e.g. '{unit}/√Hz at 1 Hz', '{unit}'). */
  densityUnit: string;
  /** How the density was obtained. */
  origin: string;
}

/** A two-level source seen through a linear functional: P(upper), the value's step between the levels, and its switching rate λ (1/s). */
export interface TwoLevel {
  probability: number;
  step: number;
  switchingRate: number;
}

/** The per-shot work of a kind on one purpose's timeline (it holds the timeline's caches). */
export interface NoiseKindRuntime {
  /** Draws shot `shot`'s noise (index within its purpose). */
  shot(shot: number): void;
  /** Adds the current shot's noise to record[lo … hi) of each channel. */
  addToRecord(record: Float64Array, lo: number, hi: number): void;
  /**
   * The current shot's part of pipeline p's I (or Q) value, without the record (kinds with a
   * linear path only): the same linear map as adding it to the record and integrating.
   */
  value?(pipeline: number, quadrature: boolean): number;
}

/** The per-shot side of a kind (CompiledNoiseKind.perShot). */
export interface PerShotNoise {
  /** Covariance of Σ_k xa[k]·n_s(t_k) and Σ_k xb[k]·n_s(t_k) over [lo, hi) for source s, x seen from its injection point. */
  covariance(s: number, xa: Float64Array, xb: Float64Array, lo: number, hi: number): number;
  /**
   * Adds one shot's noise of every source to record[lo … hi) of each channel, drawing each
   * realisation from `streams[lane]` (the shot's own streams: its block's stream and, for the
   * second channel's realisations, the block's second lane).
   */
  addShot(record: Float64Array, lo: number, hi: number, streams: readonly RandomStream[]): void;
}

/** A kind's sources of one point, compiled. */
export interface CompiledNoiseKind {
  sources: readonly NoiseSourceInfo[];
  /** Whether values can take its part directly (NoiseKindRuntime.value) instead of through the record. */
  linear: boolean;
  /** Variance of Σ_k x[k]·n_s(t_k) over [lo, hi) for source s, x the kernel seen from its injection point. */
  variance(s: number, x: Float64Array, lo: number, hi: number, sampleRate: number): number;
  /** The two-level shape of source s through x, for a fluctuator (else absent). */
  twoLevel?(s: number, x: Float64Array, lo: number, hi: number): TwoLevel;
  /** One-sided power spectral density of source s at f, in signal unit²/Hz at its injection point (before the gain). */
  spectrum(s: number, f: number): number;
  /**
   * Kinds drawn afresh for every shot (independent between shots) and Gaussian: the exact engine
   * folds their covariance into the joint Gaussian of every pipeline's outputs, and the trace
   * engine lets them add a shot's noise after its white noise, from the shot's own stream.
   */
  perShot?: PerShotNoise;
  /** The kind with other pipeline kernels (calibrated weights): what depends on them is made again. */
  withKernels(kernels: readonly KernelPair[]): CompiledNoiseKind;
  /**
   * The runtime on one purpose's timeline; `stream(index, lane)` is the point's slow-noise stream
   * `index` (lane 0), or its second lane (lane 1: the realisation of the second channel).
   */
  runtime(purpose: StreamPurpose, stream: (index: number, lane: number) => RandomStream): NoiseKindRuntime;
}

/** A kind of noise source (see the file comment). */
export interface NoiseSourceKind<S extends NoiseSourceSpec = NoiseSourceSpec> {
  /** Its key under `signal.noise` and its `kind` in the resolved scenario. */
  kind: string;
  config: NoiseConfig;
  /**
   * Resolves one validated entry (`entry` holds the fields' values, SI) at `path`, the `index`-th
   * of this kind, into its spec.
   */
  resolve(entry: Record<string, unknown>, path: ConfigPath, index: number, context: ConfigContext): S;
  /** The spec in signal units when it was written in detuning units (S.inDetuning). */
  fromDetuning(spec: S, sensor: SensorResponse): S;
  /** Why the exact engine cannot use this kind (shown to the user), or null when it can. */
  exactBlocker: string | null;
  /** Estimated seconds of work per record sample and shot for these specs (the run estimate). */
  secondsPerSample(specs: readonly S[]): number;
  /** Compiles a point's specs of this kind, all together (they may share one timeline). */
  compile(specs: readonly S[], point: NoisePointContext): CompiledNoiseKind;
}
