/** Command-line values with units ("50 MHz", "50MHz", "2.5e6"), read as the scenario reads them; shared by analyze and fit. */
import { InvalidArgumentError, type Command } from 'commander';
import { matchDimension, parseQuantity, UnitSyntaxError, type DimensionName } from '../scenario/units.ts';
import type { RecordsOptions } from '../library/records-options.ts';

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

export function unitOption(text: string): 'A' | 'V' | 'none' {
  if (text !== 'A' && text !== 'V' && text !== 'none') throw new InvalidArgumentError(`--unit takes A, V or none, found "${text}"`);
  return text;
}

/** The options `analyze` and `fit` share about the records (the library's, but for the records argument). */
export type RecordOptions = Omit<RecordsOptions, 'records'>;

/** Adds the records argument and RecordOptions to `command` (`carrierDefault` says what happens when none is given). */
export function withRecordOptions(command: Command, carrierDefault: string): Command {
  return command
    .argument('<records>', 'the records, one per row: FILE, or FILE:NAME for a dataset (file.h5:/readout/records), an array (file.npz:records) or a column (file.parquet:trace)')
    .option('--labels <labels>', 'the prepared outcome of each record: a file (labels.npy, file.h5:/readout/labels) or a NAME in the records\' own file (a column, dataset or array)')
    .option('--sample-rate <f>', 'the records\' sample rate, e.g. "50 MHz" (default: the file\'s own attribute)', frequency)
    .option('--carrier <f>', `the records' carrier, e.g. "1 MHz", or "none" (default: the file's own attribute, else ${carrierDefault})`, carrierOption)
    .option('--window <start,length>', 'the records\' window, e.g. "1us,8us" (default: the file\'s own, else the whole record)', windowOption)
    .option('--scale <x>', 'signal units per stored unit, e.g. volts per ADC count (default 1, times the file\'s own scale attribute)', scaleOption)
    .option('--unit <unit>', 'the unit of the records after the scale: A, V or none (default: the file\'s own, else none)', unitOption);
}
