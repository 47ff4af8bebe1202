/**
 * The sensor front end applied to a scenario: the state levels, the readout-induced relaxation
 * rates and the noise given in detuning units all follow from the sensor dot (sensor.ts,
 * Beenakker, Phys. Rev. B 44, 1646 (1991)).
 *
 * - Levels: state s sits at detuning ε0 + shift_s; its level is the sensor current I(ε0 + shift_s)
 *   (real, in A), so the signal is the current change a charge event causes.
 * - Operating point ε0: given, or `steepest` (maximum |dI/dε| on the positive flank).
 * - Shot-noise current ('sensor' in the components): the mean |I| of the states under the
 *   prepared mixture (the carrier's modulation of the current is not folded in: at baseband
 *   this is exact, with a carrier it is an upper bound).
 * - Detuning (charge) noise: each kind turns itself into current from the slope dI/dε at ε0 and
 *   the exact step I(ε0 + δ) − I(ε0) (signal/noise/: a 1/f amplitude A_ε (J²/Hz at 1 Hz) becomes
 *   (dI/dε)²·A_ε in A²/Hz, a fluctuator of detuning amplitude δ the exact current step). The
 *   per-state difference of the slope (second order in the shift) is neglected.
 * - Readout-induced relaxation (phenomenological, no source; physics/sensor.ts biasRelaxationRate):
 *   its rate at the sensor's bias is added to the listed transition's rate (`add`, the default),
 *   or replaces it (`replace`); a transition that does not exist yet is created.
 */
import type { Scenario, SensorSpec, TransitionSpec } from '../scenario/types.ts';
import { biasRelaxationRate, sensorCurrent, sensorSlope, steepestDetuning, type SensorParams } from './sensor.ts';
import { noiseKind } from '../signal/noise/registry.ts';

/** The sensor's operating point and what follows from it. */
export interface SensorOperatingPoint {
  params: SensorParams;
  /** Operating detuning ε0, J. */
  detuning: number;
  /** Current of each state, A. */
  levels: number[];
  /** dI/dε at ε0, A/J. */
  slope: number;
  /** Current at ε0, A. */
  current: number;
  /** Mean |I| of the states under the prepared mixture, A (the shot-noise current). */
  meanCurrent: number;
}

/** Sensor parameters of the physics model from a scenario's sensor section. */
export function sensorParams(spec: SensorSpec): SensorParams {
  return { gammaL: spec.tunnelLeft, gammaR: spec.tunnelRight, temperature: spec.temperature, bias: spec.bias };
}

/** Operating point, state currents and slope of a sensor; `prepare` weights the mean current. */
export function sensorOperatingPoint(spec: SensorSpec, prepare: readonly number[]): SensorOperatingPoint {
  const params = sensorParams(spec);
  const detuning = spec.operatingPoint === 'steepest' ? steepestDetuning(params) : spec.operatingPoint;
  const levels = spec.shifts.map((shift) => sensorCurrent(params, detuning + shift));
  let meanCurrent = 0;
  let weight = 0;
  levels.forEach((level, s) => {
    const w = prepare[s] ?? 0;
    meanCurrent += w * Math.abs(level);
    weight += w;
  });
  return {
    params, detuning, levels, slope: sensorSlope(params, detuning), current: sensorCurrent(params, detuning),
    meanCurrent: weight > 0 ? meanCurrent / weight : Math.abs(sensorCurrent(params, detuning)),
  };
}

/** The transitions with the readout-induced rates of `spec` at its bias added or substituted. */
export function withReadoutRelaxation(transitions: readonly TransitionSpec[], spec: SensorSpec): TransitionSpec[] {
  const out = transitions.map((t) => ({ ...t }));
  for (const r of spec.readoutRelaxation) {
    const rate = biasRelaxationRate(r.law, spec.bias);
    const existing = out.find((t) => t.from === r.from && t.to === r.to);
    if (existing) existing.rate = r.combine === 'replace' ? rate : existing.rate + rate;
    else out.push({ from: r.from, to: r.to, rate, kind: r.to < r.from ? 'relaxation' : 'excitation' });
  }
  return out;
}

/**
 * The scenario with every sensor-derived value in place (levels, rates, converted noise,
 * shot-noise current); returns the scenario itself when it has no sensor or is already derived.
 */
export function applySensor(scenario: Scenario): Scenario {
  const spec = scenario.sensor;
  if (!spec || spec.derived) return scenario;
  const op = sensorOperatingPoint(spec, scenario.prepare);
  const signal = scenario.signal;
  const response = { slope: op.slope, step: (detuning: number) => sensorCurrent(op.params, op.detuning + detuning) - op.current };
  const components = signal.components && signal.components.current === 'sensor'
    ? { ...signal.components, current: op.meanCurrent }
    : signal.components;
  return {
    ...scenario,
    states: scenario.states.map((s, i) => ({ ...s, level: { re: op.levels[i]!, im: 0 } })),
    transitions: withReadoutRelaxation(scenario.transitions, spec),
    signal: {
      ...signal,
      ...(components !== undefined ? { components } : {}),
      ...(signal.sources ? { sources: signal.sources.map((s) => (s.inDetuning ? noiseKind(s).fromDetuning(s, response) : s)) } : {}),
    },
    sensor: { ...spec, derived: true },
  };
}
