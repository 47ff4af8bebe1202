/**
 * The options `analyzeRecords` and `fitTwin` share about recorded traces (the CLI's
 * `withRecordOptions`): where the records and labels are, and what the file may not say.
 */
import { z } from 'zod';
import { choice, pathText, positiveQuantity } from './options.ts';

/** Where the records are and what their file may not say; every setting left out comes from the file. */
export interface RecordsOptions {
  /** The records, one per row: FILE, or FILE:NAME for a dataset, array or column (Arrow, Parquet, .npy/.npz, HDF5). Required. */
  records: string;
  /** The prepared outcome of each record: a file (FILE or FILE:NAME) or a NAME in the records' own file. Default: none. */
  labels?: string;
  /** The records' sample rate, in Hz. Default: the file's own attribute. */
  sampleRate?: number;
  /** The records' carrier frequency, in Hz, or `'none'`. Default: the file's own attribute (else analyze: none; fit: found in real records). */
  carrier?: number | 'none';
  /** The records' window, in seconds from the record's start. Default: the file's own, else the whole record. */
  window?: { start: number; length: number };
  /** Signal units per stored unit (e.g. volts per ADC count; finite, not 0). Default 1, times the file's own scale. */
  scale?: number;
  /** The unit of the records after the scale: `A`, `V` or `none`. Default: the file's own, else none. */
  unit?: 'A' | 'V' | 'none';
}

/** The zod shape of RecordsOptions. */
export const recordsShape = {
  records: pathText('a records path FILE or FILE:NAME (string)'),
  labels: pathText('a labels path or name (string)').optional(),
  sampleRate: positiveQuantity('Hz').optional(),
  carrier: z.union([positiveQuantity('Hz'), z.literal('none')], { error: 'a number of Hz > 0 or "none"' }).optional(),
  window: z.strictObject({ start: positiveQuantity('s', true), length: positiveQuantity('s') }, { error: 'a window { start, length } in seconds' }).optional(),
  scale: z.number({ error: 'a finite number, not 0' }).refine((x) => Number.isFinite(x) && x !== 0, { error: 'a finite number, not 0' }).optional(),
  unit: choice(['A', 'V', 'none']).optional(),
};

/** The unit as the use cases take it ('' for plain numbers), or undefined. */
export function recordsUnit(unit: 'A' | 'V' | 'none' | undefined): string | undefined {
  return unit === undefined ? undefined : unit === 'none' ? '' : unit;
}
