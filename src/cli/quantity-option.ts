/** Command-line values with units ("50 MHz", "2.5e6"), read as the scenario reads them. */
import { InvalidArgumentError } from 'commander';
import { matchDimension, parseQuantity, type DimensionName } from '../scenario/units.ts';

/** A parser of a positive quantity of `kind` for option `name` (a plain number is SI). */
export function positiveQuantity(name: string, kind: DimensionName, example: string) {
  return (v: string): number => {
    let value: number;
    try {
      const q = parseQuantity(v);
      if (matchDimension(q, kind) < 0) throw new Error('dimension');
      value = q.value;
    } catch {
      throw new InvalidArgumentError(`${name} must be a ${kind} such as "${example}", found "${v}"`);
    }
    if (!(value > 0 && Number.isFinite(value))) throw new InvalidArgumentError(`${name} must be above 0, found "${v}"`);
    return value;
  };
}

/** A parser of a finite, non-zero plain number for option `name`. */
export function nonZeroNumber(name: string) {
  return (v: string): number => {
    const x = Number(v);
    if (v.trim() === '' || !Number.isFinite(x) || x === 0) throw new InvalidArgumentError(`${name} must be a finite number other than 0, found "${v}"`);
    return x;
  };
}
