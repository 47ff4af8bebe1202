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
 * Baseband I and Q (two channels, carrier.ts): each channel gets its own, independent
 * realisation of the white noise and of every amplifier-side source, with the same spectrum
 * (two amplifiers, or one IQ demodulator's two outputs). Sensor-side noise is one realisation
 * entering along the separation direction u = e^(iα) of the outcomes (separation.ts):
 * I += g·cos α·n, Q += g·sin α·n. Why along u: sensor-side noise moves the operating point, and a
 * small move of the operating point moves the output the way the device's own small change does,
 * along the line between the two states' responses (a dispersive readout: a small shift of the
 * resonance moves the IQ point along the chord between the two state responses). That is
 * g·(Re u·c_k − Im u·s_k), the carrier's rule with the level unit u instead of 1.
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
import { separationAngle } from './separation.ts';
import { injectionRealisations, type Realisations } from './injection.ts';

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
  /** Channels of the record (carrier.ts): every per-sample table below holds channels × samples entries. */
  channels: number;
  /** Per record sample, the weight of sensor-side noise: gain·c_k (with a carrier), gain·(cos α | sin α) on I and Q. */
  sensorWeight: Float64Array;
  /** How each injection point's sources reach the record: their independent realisations (injection.ts). */
  realisations: Realisations;
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

  const { channels } = tables;
  const sensorWeight = sensorWeights(scenario, tables, gain);
  const realisations = injectionRealisations(channels, n, gain, sensorWeight);

  const rs = signal.response ?? null;
  let response: ResponseTables | null = null;
  if (rs) {
    const levelRe = Float64Array.from(scenario.states, (s) => s.level.re);
    const levelIm = Float64Array.from(scenario.states, (s) => s.level.im);
    let largest = 0;
    for (let s = 0; s < levelRe.length; s++) largest = Math.max(largest, Math.hypot(levelRe[s]!, levelIm[s]!));
    const inPhase = new Float64Array(channels * n), quadrature = new Float64Array(channels * n);
    for (let k = 0; k < channels * n; k++) {
      inPhase[k] = gain * tables.inPhase[k]!;
      quadrature[k] = gain * tables.quadrature[k]!;
    }
    response = {
      timeConstant: rs.timeConstant, fromZero: rs.from === 'zero', channels, inPhase, quadrature,
      levelRe, levelIm, negligible: Math.max(1e-300, 1e-16 * largest),
    };
  }

  const d = signal.digitizer ?? null;
  const digitizer: DigitizerTables | null = d ? { low: d.low, high: d.high, codes: d.bits === null ? 0 : 2 ** d.bits } : null;

  const kinds = sourcesByKind(signal.sources).map(({ kind, specs }) => ({
    kind,
    compiled: kind.compile(specs, {
      grid, timing: scenario.timing, shots: scenario.shots, calibrationShots: scenario.calibrationShots, gain, channels, sensorWeight, realisations,
      synthLo, synthHi, responseTimeConstant: response?.timeConstant ?? null, kernels,
    }),
  }));
  return { gain, white, whiteSigma: Math.sqrt(whiteVariance), kinds, response, digitizer, channels, sensorWeight, realisations };
}

/** Per record sample, the weight of sensor-side noise (see the file comment). */
function sensorWeights(scenario: Scenario, tables: CarrierTables, gain: number): Float64Array {
  const w = new Float64Array(tables.inPhase.length);
  if (tables.channels === 1) {
    for (let k = 0; k < w.length; k++) w[k] = gain * tables.inPhase[k]!;
    return w;
  }
  const alpha = separationAngle(scenario);
  const re = Math.cos(alpha), im = Math.sin(alpha);
  for (let k = 0; k < w.length; k++) w[k] = gain * (re * tables.inPhase[k]! - im * tables.quadrature[k]!);
  return w;
}

/** The plan with other pipeline kernels (calibrated weights): each kind remakes what depends on them. */
export function withPipelineKernels(plan: NoisePlan, kernels: readonly KernelPair[]): NoisePlan {
  if (plan.kinds.length === 0) return plan;
  return { ...plan, kinds: plan.kinds.map((k) => ({ kind: k.kind, compiled: k.compiled.withKernels(kernels) })) };
}
