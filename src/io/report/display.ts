/**
 * Display units for the report: an SI value is shown as value × factor in a prefixed unit
 * ("pA", "µs"), energies in eV and angles in degrees. Also short number formats.
 */
import { ELEMENTARY_CHARGE } from '../../physics/constants.ts';

/** How to show values of one SI unit: shown = SI · factor, in `label`. */
export interface DisplayUnit {
  factor: number;
  label: string;
}

const PREFIXES: [number, string][] = [
  [1e12, 'T'], [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'µ'], [1e-9, 'n'], [1e-12, 'p'], [1e-15, 'f'],
];

/** How a unit symbol reads on the page. */
function readable(unit: string): string {
  return unit.replace('rtHz', '√Hz').replace(/^Ohm$/, 'Ω');
}

/** The display unit for values of `unit` whose largest magnitude is `size`. */
export function displayUnit(unit: string, size: number): DisplayUnit {
  if (unit === '') return { factor: 1, label: '' };
  if (unit === 'rad') return { factor: 180 / Math.PI, label: '°' };
  const [base, scale] = unit === 'J' ? ['eV', 1 / ELEMENTARY_CHARGE] : [unit, 1];
  const s = Math.abs(size) * scale;
  if (!Number.isFinite(s) || s === 0) return { factor: scale, label: readable(base) };
  for (const [p, prefix] of PREFIXES) {
    if (s / p >= 1 && s / p < 1000) return { factor: scale / p, label: prefix + readable(base) };
  }
  const [p, prefix] = s >= 1000 ? PREFIXES[0]! : PREFIXES[PREFIXES.length - 1]!;
  return { factor: scale / p, label: prefix + readable(base) };
}

/** "label (unit)" or just the label. */
export function withUnit(label: string, d: DisplayUnit): string {
  return d.label ? `${label} (${d.label})` : label;
}

/** A number in 4 significant digits without trailing zeros. */
export function short(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return '—';
  return String(Number(x.toPrecision(digits)));
}

/** A value with its display unit: "8 µs". */
export function showValue(x: number, unit: string): string {
  const d = displayUnit(unit, x);
  return d.label ? `${short(x * d.factor)} ${d.label}` : short(x);
}

/** A probability: "2.36e-3", "0". */
export function probability(p: number): string {
  if (!Number.isFinite(p)) return '—';
  if (p === 0) return '0';
  return p.toExponential(2);
}
