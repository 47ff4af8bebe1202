/**
 * The magnitudes a scenario value may have, by physical dimension: every quantity a scenario
 * holds reaches arithmetic (2πf·t, rates times times, squares of levels, exponentials of
 * energies over kT), so each one is bounded where the arithmetic stays finite and meaningful —
 * wide enough for any readout (femtoseconds to months, microhertz to petahertz), narrow enough
 * that no product or square of them overflows or underflows. A value outside is refused at
 * validation (fields.ts), with these bounds in the message; 0 stays allowed where the key allows
 * it. Plain numbers (gain, weights, exponents) have their own bounds where they are declared.
 */
import type { Dimension } from './units.ts';

/** Bounds of a magnitude |x| (x ≠ 0), in SI units. */
export interface Magnitude {
  min: number;
  max: number;
  /** The SI unit written in messages. */
  unit: string;
}

/** The magnitude bounds of each physical dimension a scenario key may have. */
export const DIMENSION_RANGES = {
  time: { min: 1e-15, max: 1e7, unit: 's' },
  frequency: { min: 1e-9, max: 1e15, unit: 'Hz' },
  energy: { min: 1e-40, max: 1e-10, unit: 'J' },
  temperature: { min: 1e-6, max: 1e4, unit: 'K' },
  angle: { min: 1e-15, max: 1e4, unit: 'rad' },
  resistance: { min: 1e-6, max: 1e15, unit: 'Ohm' },
  sweepRate: { min: 1e-40, max: 1, unit: 'J/s' },
  /** A signal (current, voltage, or a plain number in the signal unit) and noise densities. */
  signal: { min: 1e-100, max: 1e100, unit: '' },
  /** A bias or sensor current: the sensor's Fermi functions need e·V/kT finite. */
  bias: { min: 1e-30, max: 1e3, unit: '' },
  energyDensity: { min: 1e-60, max: 1e-10, unit: 'J/√Hz' },
} as const satisfies Record<string, Magnitude>;

const key = (d: Dimension) => d.join(',');

/** Dimension vectors (time, current, energy, temperature, angle) → bounds. */
const BY_DIMENSION = new Map<string, Magnitude>([
  [key([1, 0, 0, 0, 0]), DIMENSION_RANGES.time],
  [key([-1, 0, 0, 0, 0]), DIMENSION_RANGES.frequency],
  [key([0, 0, 1, 0, 0]), DIMENSION_RANGES.energy],
  [key([0, 0, 0, 1, 0]), DIMENSION_RANGES.temperature],
  [key([0, 0, 0, 0, 1]), DIMENSION_RANGES.angle],
  [key([-1, -2, 1, 0, 0]), DIMENSION_RANGES.resistance],
  [key([-1, 0, 1, 0, 0]), DIMENSION_RANGES.sweepRate],
  [key([0, 1, 0, 0, 0]), DIMENSION_RANGES.signal],
  [key([-1, -1, 1, 0, 0]), DIMENSION_RANGES.signal],
  [key([0.5, 1, 0, 0, 0]), DIMENSION_RANGES.signal],
  [key([-0.5, -1, 1, 0, 0]), DIMENSION_RANGES.signal],
  [key([0.5, 0, 1, 0, 0]), DIMENSION_RANGES.energyDensity],
]);

/** Named dimensions whose values are bias-like (the sensor's voltages and currents), not signals. */
const BIAS_KINDS: ReadonlySet<string> = new Set(['current', 'voltage']);

/** The magnitude bounds of a value of dimension `dim` asked for as `kind` (null: unbounded). */
export function magnitudeOf(kind: string, dim: Dimension): Magnitude | null {
  if (BIAS_KINDS.has(kind)) return DIMENSION_RANGES.bias;
  return BY_DIMENSION.get(key(dim)) ?? null;
}

/** Whether x is 0 or has a magnitude within `m`. */
export function withinMagnitude(x: number, m: Magnitude): boolean {
  const a = Math.abs(x);
  return a === 0 || (a >= m.min && a <= m.max);
}

/** A bound as messages write it: 1e-15, 1e7, 1000. */
function bound(x: number): string {
  return x >= 1e-3 && x < 1e4 ? String(x) : x.toExponential().replace('e+', 'e');
}

/** "of magnitude between 1e-15 and 1e7 s (or 0 where allowed)". */
export function magnitudeText(m: Magnitude): string {
  return `of magnitude between ${bound(m.min)} and ${bound(m.max)}${m.unit ? ` ${m.unit}` : ''} (or 0 where allowed)`;
}

/** Largest magnitude of a plain number of a scenario (gain, weights, exponents, …), where the key declares none tighter. */
export const PLAIN_MAX = 1e100;
