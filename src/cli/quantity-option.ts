/** Command-line values with units ("50 MHz", "50MHz", "2.5e6"), read as the scenario reads them; shared by analyze and fit. */
import { InvalidArgumentError } from 'commander';
import { matchDimension, parseQuantity, UnitSyntaxError, type DimensionName } from '../scenario/units.ts';

/** A quantity option in SI ("50 MHz", "50MHz" or a plain number in SI units): above 0 (at least 0 with `zero`). */
export function quantityOption(option: string, dimension: DimensionName, example: string, zero = false) {
  return (text: string): number => {
    let q;
    try {
      // "50MHz" reads as "50 MHz": a number, then the unit
      q = parseQuantity(text.replace(/^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*/, '$1 ').trim());
    } catch (e) {
      if (!(e instanceof UnitSyntaxError)) throw e;
      throw new InvalidArgumentError(`${option} takes a quantity like "${example}", found "${text}" (${e.message})`);
    }
    if (matchDimension(q, dimension) < 0) throw new InvalidArgumentError(`${option} takes a quantity like "${example}", found "${text}"`);
    if (!(zero ? q.value >= 0 : q.value > 0)) throw new InvalidArgumentError(`${option} takes a quantity ${zero ? 'of 0 or more' : 'above 0'} like "${example}", found "${text}"`);
    return q.value;
  };
}

export const frequency = quantityOption('--sample-rate', 'frequency', '50 MHz');
const carrierFrequency = quantityOption('--carrier', 'frequency', '1 MHz');
const start = quantityOption('--window', 'time', '1 us', true);
const time = quantityOption('--window', 'time', '1 us');

/** "none" or a frequency. */
export function carrierOption(text: string): number | 'none' {
  return text.trim() === 'none' ? 'none' : carrierFrequency(text);
}

/** "START,LENGTH", each a time. */
export function windowOption(text: string): { start: number; length: number } {
  const parts = text.split(',');
  if (parts.length !== 2) throw new InvalidArgumentError(`--window takes START,LENGTH (e.g. "1us,8us"), found "${text}"`);
  return { start: start(parts[0]!.trim()), length: time(parts[1]!.trim()) };
}

export function scaleOption(text: string): number {
  const x = Number(text);
  if (!Number.isFinite(x) || x === 0) throw new InvalidArgumentError(`--scale takes a finite, non-zero number of signal units per stored unit, found "${text}"`);
  return x;
}

export function unitOption(text: string): string {
  if (text !== 'A' && text !== 'V' && text !== 'none') throw new InvalidArgumentError(`--unit takes A, V or none, found "${text}"`);
  return text;
}
