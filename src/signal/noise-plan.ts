/**
 * The noise plan of one sweep point, compiled once: white sources (given and from components),
 * 1/f sources on their multi-rate timelines (signal/flicker-timeline.ts) with the tables that
 * interpolate them onto the record grid, telegraph fluctuators (signal/telegraph-timeline.ts),
 * the analog response and the digitizer. `makeNoiseRuntime` (noise-runtime.ts) turns it into the
 * per-shot hooks that batch.ts calls.
 *
 * Where each source enters (record sample k of a shot, gain g, carrier tables c_k, s_k):
 *   record[k] = g·Re((y(t_k) + n_sensor(t_k))·e^(iθ_k)) + g·n_amplifier(t_k) + white
 *            = wave + g·c_k·n_sensor(t_k) + g·n_amplifier(t_k) + white,
 * y the (responded) level path; sensor-side noise is real in level units (it moves the
 * operating point, so the carrier modulates it exactly like the signal); amplifier-side noise
 * and the white noise are added after the modulation. Then the digitizer clips and quantises.
 * Sensor-side 1/f passes the analog response too: it is generated with the power gain |H(f)|²
 * of the response folded into its spectrum (a stationary Gaussian process through a linear
 * filter is the stationary Gaussian process with spectrum S·|H|², so this is exact in
 * distribution). Telegraph steps are not smoothed by the response (documented; fluctuators
 * switch far more slowly than any bandwidth of interest).
 *
 * Timelines. Shot i of a purpose starts at i·shotPeriod on that purpose's own timeline (scored,
 * calibration and auxiliary shots do not share noise; the 1/f timeline wraps around after the
 * `capacity` shots it is planned for, which only shots beyond the scenario's own reach).
 * The 1/f base grid has step shotPeriod/m0 (m0 integer, rate ≥ 8·f_high), so every shot sees the
 * same interpolation weights and its base samples are i·m0 + j. Sample k of a record is linearly
 * interpolated between base samples ⌊p_k⌋ and ⌊p_k⌋ + 1, p_k = k·m0/(shotPeriod·fs).
 *
 * Stream indices within the point's 'slow-noise' purpose (24 bits):
 *   flicker:   bit 23 = 0 | purpose (2) | source (3) | band (4) | block pair (14)
 *   telegraph: bit 23 = 1 | purpose (2) | seeding block (21)
 */
import { SEED_BLOCK, type StreamPurpose } from '../random/streams.ts';
import type { CarrierTables } from './carrier.ts';
import type { Grid } from './grid.ts';
import { BASE_OVERSAMPLING, PAIRS_PER_BAND, planFlickerTimeline, type FlickerBand } from './flicker-timeline.ts';
import type { Fluctuator } from './telegraph-timeline.ts';
import { responsePowerGain, type ResponseTables } from './response.ts';
import { quantisationStep, type DigitizerTables } from './digitizer.ts';
import { amplifierVoltageToCurrent, johnsonCurrentDensity, shotCurrentDensity } from '../physics/noise-components.ts';
import type { NoiseInjection, Scenario } from '../scenario/types.ts';

/** Most 1/f sources per point (source field of 3 bits). */
export const MAX_FLICKER_SOURCES = 8;
/** Seeding blocks a telegraph timeline can reach (field of 21 bits). */
export const TELEGRAPH_BLOCKS = 2 ** 21;

const PURPOSE_CODE: Record<StreamPurpose, number> = { score: 0, calibrate: 1, aux: 2, 'slow-noise': 3 };

/** Stream index of block pair `pair` of band `band` of 1/f source `source` (see the file comment). */
export function flickerStreamIndex(purpose: StreamPurpose, source: number, band: number, pair: number): number {
  return ((PURPOSE_CODE[purpose] * MAX_FLICKER_SOURCES + source) * 16 + band) * PAIRS_PER_BAND + pair;
}

/** Stream index of seeding block `block` of the telegraph timeline (see the file comment). */
export function telegraphStreamIndex(purpose: StreamPurpose, block: number): number {
  if (block >= TELEGRAPH_BLOCKS) throw new RangeError(`telegraph: seeding block ${block} beyond the ${TELEGRAPH_BLOCKS} the timeline can reach`);
  return 2 ** 23 + PURPOSE_CODE[purpose] * TELEGRAPH_BLOCKS + block;
}

/** One white source: its input-referred density and per-sample variance at the record. */
export interface WhiteSource {
  name: string;
  /** One-sided density, signal unit/√Hz (before the gain). */
  density: number;
  /** How it was obtained, e.g. "Johnson 4kT/R: 1 MΩ at 4 K". */
  origin: string;
  /** Variance it adds to every record sample (gain included). */
  perSampleVariance: number;
}

/** A 1/f source ready to run. */
export interface FlickerSourcePlan {
  name: string;
  injection: NoiseInjection;
  /** A (signal unit²/Hz at 1 Hz), α, band. */
  amplitude: number;
  exponent: number;
  low: number;
  high: number;
  /** Source number in the stream index. */
  source: number;
  bands: FlickerBand[];
}

/** The 1/f part of the plan: sources, base grid and interpolation tables. */
export interface FlickerPlan {
  sources: FlickerSourcePlan[];
  /** Base samples per shot period, m0; the base rate is m0/shotPeriod. */
  step: number;
  baseRate: number;
  /** Base sample (from the shot start) of the first window entry, and the window length. */
  offset: number;
  width: number;
  /** Per record sample k: the window entry below it, and its interpolation fraction. */
  index: Int32Array;
  fraction: Float64Array;
  /** Per injection: weights of the entries below and above each sample (gain, and the carrier for sensor-side). */
  below: Record<NoiseInjection, Float64Array | null>;
  above: Record<NoiseInjection, Float64Array | null>;
  /**
   * Shots the timelines reach (the scored and calibration shots, and a block more); the shot index
   * is taken modulo this, so shots beyond the scenario's (examples, report views) wrap around.
   */
  capacity: number;
  /**
   * Per injection, per pipeline: its I and Q kernels carried onto the base-sample window
   * (G_j = Σ_k K[k]·weight of entry j at sample k), so that the 1/f part of a value is Σ_j G_j·w_j
   * (null where no source enters, or Q at baseband).
   */
  carried: Record<NoiseInjection, { inPhase: Float64Array; quadrature: Float64Array | null }[] | null>;
}

/** A pipeline's kernels as compile-noise needs them. */
export interface KernelPair {
  inPhase: Float64Array;
  quadrature: Float64Array | null;
  lo: number;
  hi: number;
}

/**
 * Carries a record-grid functional x (on [lo, hi)) onto the 1/f base-sample window through the
 * interpolation: G[j] += x[k]·(1 − u_k) at j = index[k], G[j + 1] += x[k]·u_k. Σ_k x[k]·n(t_k)
 * of the interpolated noise n then equals Σ_j G[j]·w[j] of its window values w.
 */
export function carryKernel(f: Pick<FlickerPlan, 'index' | 'fraction' | 'width'>, x: Float64Array, lo: number, hi: number): Float64Array {
  const g = new Float64Array(f.width + 1);
  for (let k = lo; k < hi; k++) {
    const j = f.index[k]!;
    g[j] += x[k]! * (1 - f.fraction[k]!);
    g[j + 1] += x[k]! * f.fraction[k]!;
  }
  return g;
}

/** The telegraph part of the plan. */
export interface TelegraphPlan {
  names: string[];
  fluctuators: Fluctuator[];
  injections: NoiseInjection[];
}

/** Everything about the noise and the analog chain of one point. */
export interface NoisePlan {
  gain: number;
  white: WhiteSource[];
  /** Per-sample σ of all white sources together, at the record (gain included). */
  whiteSigma: number;
  flicker: FlickerPlan | null;
  telegraph: TelegraphPlan | null;
  response: ResponseTables | null;
  digitizer: DigitizerTables | null;
  /** Per record sample, the weight of sensor-side noise: gain·c_k. */
  sensorWeight: Float64Array;
  /** Whether any noise correlated in time across samples and shots is present (1/f, telegraph). */
  slow: boolean;
}

/** The white sources of a (sensor-applied) scenario: given white noise and the components. */
export function whiteSources(scenario: Scenario, sampleRate: number): WhiteSource[] {
  const gain = scenario.signal.gain;
  const perSample = (d: number) => gain * gain * d * d * (sampleRate / 2);
  const out: WhiteSource[] = [];
  const add = (name: string, density: number, origin: string) => out.push({ name, density, origin, perSampleVariance: perSample(density) });
  if (scenario.signal.white) add('white', scenario.signal.white.density, 'given density');
  const c = scenario.signal.components;
  if (c) {
    if (c.resistance !== null) {
      add('johnson', johnsonCurrentDensity(c.resistance, c.temperature), `Johnson 4kT/R: ${c.resistance} Ω at ${c.temperature} K`);
    }
    if (c.current !== null && c.current !== 'sensor') {
      add('shot', shotCurrentDensity(c.current, c.fano), `shot 2eIF: I = ${c.current} A, F = ${c.fano}`);
    }
    if (c.amplifierVoltage !== null && c.resistance !== null) {
      add('amplifierVoltage', amplifierVoltageToCurrent(c.amplifierVoltage, c.resistance), `e_n/R: ${c.amplifierVoltage} V/√Hz over ${c.resistance} Ω`);
    }
    if (c.amplifierCurrent !== null) add('amplifierCurrent', c.amplifierCurrent, 'amplifier input current noise i_n');
  }
  return out;
}

/**
 * Compiles the noise plan of a point whose sensor has been applied (physics/sensor-scenario.ts):
 * `tables` are the carrier tables, [synthLo, synthHi) the samples that are synthesised.
 */
export function compileNoise(
  scenario: Scenario, grid: Grid, tables: CarrierTables, synthLo: number, synthHi: number, kernels: readonly KernelPair[] = [],
): NoisePlan {
  const { signal } = scenario;
  const gain = signal.gain;
  const fs = grid.sampleRate;
  const n = grid.samples;
  const white = whiteSources(scenario, fs);
  let whiteVariance = 0;
  for (const w of white) whiteVariance += w.perSampleVariance;

  const sensorWeight = new Float64Array(n);
  for (let k = 0; k < n; k++) sensorWeight[k] = gain * tables.inPhase[k]!;

  const rs = signal.response ?? null;
  let response: ResponseTables | null = null;
  if (rs) {
    const levelRe = Float64Array.from(scenario.states, (s) => s.level.re);
    const levelIm = Float64Array.from(scenario.states, (s) => s.level.im);
    let largest = 0;
    for (let s = 0; s < levelRe.length; s++) largest = Math.max(largest, Math.hypot(levelRe[s]!, levelIm[s]!));
    const quadrature = new Float64Array(n);
    for (let k = 0; k < n; k++) quadrature[k] = gain * tables.quadrature[k]!;
    response = {
      timeConstant: rs.timeConstant, fromZero: rs.from === 'zero', inPhase: sensorWeight, quadrature,
      levelRe, levelIm, negligible: Math.max(1e-300, 1e-16 * largest),
    };
  }

  const d = signal.digitizer ?? null;
  const digitizer: DigitizerTables | null = d ? { low: d.low, high: d.high, codes: d.bits === null ? 0 : 2 ** d.bits } : null;

  const flicker = compileFlicker(scenario, grid, sensorWeight, gain, synthLo, synthHi, response?.timeConstant ?? null, kernels);

  const tel = signal.telegraph ?? [];
  const telegraph: TelegraphPlan | null = tel.length === 0 ? null : {
    names: tel.map((t) => t.name),
    fluctuators: tel.map((t) => ({ amplitude: t.amplitude, rateUp: t.rateUp, rateDown: t.rateDown })),
    injections: tel.map((t) => t.injection),
  };
  return {
    gain, white, whiteSigma: Math.sqrt(whiteVariance), flicker, telegraph, response, digitizer, sensorWeight,
    slow: flicker !== null || telegraph !== null,
  };
}

function compileFlicker(
  scenario: Scenario, grid: Grid, sensorWeight: Float64Array, gain: number, synthLo: number, synthHi: number,
  timeConstant: number | null, kernels: readonly KernelPair[],
): FlickerPlan | null {
  const specs = scenario.signal.flicker ?? [];
  if (specs.length === 0 || synthHi <= synthLo) return null;
  if (specs.length > MAX_FLICKER_SOURCES) throw new RangeError(`at most ${MAX_FLICKER_SOURCES} 1/f sources per point`);
  const period = scenario.timing.shotPeriod;
  const fs = grid.sampleRate;
  const highest = Math.max(...specs.map((s) => s.high));
  const step = Math.max(1, Math.ceil(BASE_OVERSAMPLING * highest * period * (1 - 1e-12)));
  const baseRate = step / period;
  const position = (k: number) => (k * step) / (period * fs);
  const offset = Math.floor(position(synthLo));
  const width = Math.floor(position(synthHi - 1)) + 2 - offset;
  // sized for the scored and calibration shots; auxiliary shots (examples, report views) wrap around
  const capacity = Math.max(scenario.shots, scenario.calibrationShots) + SEED_BLOCK;
  const span = (capacity + 1) * step + offset + width;
  const sources: FlickerSourcePlan[] = specs.map((s, source) => {
    const weight = s.injection === 'sensor' && timeConstant !== null ? (f: number) => responsePowerGain(timeConstant, f) : undefined;
    const bands = planFlickerTimeline({
      amplitude: s.amplitude, exponent: s.exponent, fLo: s.low, fHi: s.high, baseRate, span, ...(weight ? { weight } : {}),
    });
    return { name: s.name, injection: s.injection, amplitude: s.amplitude, exponent: s.exponent, low: s.low, high: s.high, source, bands };
  });
  const n = grid.samples;
  const index = new Int32Array(n);
  const fraction = new Float64Array(n);
  for (let k = synthLo; k < synthHi; k++) {
    const p = position(k);
    const j = Math.floor(p);
    index[k] = j - offset;
    fraction[k] = p - j;
  }
  const weights = (injection: NoiseInjection, side: 'below' | 'above'): Float64Array | null => {
    if (!sources.some((s) => s.injection === injection)) return null;
    const w = new Float64Array(n);
    for (let k = synthLo; k < synthHi; k++) {
      const g = injection === 'sensor' ? sensorWeight[k]! : gain;
      w[k] = g * (side === 'below' ? 1 - fraction[k]! : fraction[k]!);
    }
    return w;
  };
  return {
    sources, step, baseRate, offset, width, index, fraction, capacity,
    below: { sensor: weights('sensor', 'below'), amplifier: weights('amplifier', 'below') },
    above: { sensor: weights('sensor', 'above'), amplifier: weights('amplifier', 'above') },
    carried: carryPipelineKernels({ sources, index, fraction, width }, { sensorWeight, gain }, kernels),
  };
}

/**
 * Each pipeline's I and Q kernels carried onto the 1/f window, per injection point (FlickerPlan
 * `carried`): x[k] = K[k]·(gain·c_k for sensor-side sources, gain for amplifier-side), then
 * carryKernel. Null for an injection no source uses.
 */
export function carryPipelineKernels(
  f: Pick<FlickerPlan, 'sources' | 'index' | 'fraction' | 'width'>, weights: Pick<NoisePlan, 'sensorWeight' | 'gain'>,
  kernels: readonly KernelPair[],
): FlickerPlan['carried'] {
  const carried = (injection: NoiseInjection) => {
    if (!f.sources.some((s) => s.injection === injection)) return null;
    const weighted = (kernel: Float64Array, lo: number, hi: number) => {
      const x = new Float64Array(kernel.length);
      for (let k = lo; k < hi; k++) x[k] = kernel[k]! * (injection === 'sensor' ? weights.sensorWeight[k]! : weights.gain);
      return carryKernel(f, x, lo, hi);
    };
    return kernels.map((k) => ({
      inPhase: weighted(k.inPhase, k.lo, k.hi),
      quadrature: k.quadrature ? weighted(k.quadrature, k.lo, k.hi) : null,
    }));
  };
  return { sensor: carried('sensor'), amplifier: carried('amplifier') };
}
