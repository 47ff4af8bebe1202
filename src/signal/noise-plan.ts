/**
 * The noise plan of one sweep point, compiled once: the white sources (given and from
 * components), the compiled kinds of noise beyond white (signal/noise/: 1/f, telegraph, … each
 * behind the noise-source contract), the analog response and the digitizer. `makeNoiseRuntime`
 * (noise-runtime.ts) turns it into the per-shot hooks the engines call.
 *
 * Where each source enters (record sample k of a shot, gain g, carrier tables c_k, s_k):
 *   record[k] = g·Re((y(t_k) + n_sensor(t_k))·e^(iθ_k)) + g·n_amplifier(t_k) + white
 *            = wave + g·c_k·n_sensor(t_k) + g·n_amplifier(t_k) + white,
 * y the (responded) level path; sensor-side noise is real in level units (it moves the
 * operating point, so the carrier modulates it exactly like the signal); amplifier-side noise
 * and the white noise are added after the modulation. Then the digitizer clips and quantises.
 *
 * Timelines. Shot i of a purpose starts at i·shotPeriod on that purpose's own timeline (scored,
 * calibration and auxiliary shots do not share noise); each kind keeps its own (its streams:
 * noise/stream-layout.ts).
 */
import type { CarrierTables } from './carrier.ts';
import type { Grid } from './grid.ts';
import type { ResponseTables } from './response.ts';
import type { DigitizerTables } from './digitizer.ts';
import { amplifierVoltageToCurrent, johnsonCurrentDensity, shotCurrentDensity } from '../physics/noise-components.ts';
import type { Scenario } from '../scenario/types.ts';
import type { CompiledNoiseKind, KernelPair, NoiseSourceKind } from './noise/contract.ts';
import { sourcesByKind } from './noise/registry.ts';

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

/** A kind of noise present at a point, compiled for it. */
export interface PlannedKind {
  kind: NoiseSourceKind;
  compiled: CompiledNoiseKind;
}

/** Everything about the noise and the analog chain of one point. */
export interface NoisePlan {
  gain: number;
  white: WhiteSource[];
  /** Per-sample σ of all white sources together, at the record (gain included). */
  whiteSigma: number;
  /** The kinds of noise beyond white present at the point, in registry order. */
  kinds: PlannedKind[];
  response: ResponseTables | null;
  digitizer: DigitizerTables | null;
  /** Per record sample, the weight of sensor-side noise: gain·c_k. */
  sensorWeight: Float64Array;
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

  const kinds = sourcesByKind(signal.sources).map(({ kind, specs }) => ({
    kind,
    compiled: kind.compile(specs, {
      grid, timing: scenario.timing, shots: scenario.shots, calibrationShots: scenario.calibrationShots, gain, sensorWeight,
      synthLo, synthHi, responseTimeConstant: response?.timeConstant ?? null, kernels,
    }),
  }));
  return { gain, white, whiteSigma: Math.sqrt(whiteVariance), kinds, response, digitizer, sensorWeight };
}

/** The plan with other pipeline kernels (calibrated weights): each kind remakes what depends on them. */
export function withPipelineKernels(plan: NoisePlan, kernels: readonly KernelPair[]): NoisePlan {
  if (plan.kinds.length === 0) return plan;
  return { ...plan, kinds: plan.kinds.map((k) => ({ kind: k.kind, compiled: k.compiled.withKernels(kernels) })) };
}
