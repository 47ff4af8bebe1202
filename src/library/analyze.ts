/** `analyzeRecords`: run a processing pipeline on recorded traces — the `analyze` command as a function. */
import { z } from 'zod';
import { analyzeToDirectory, type AnalyzeResult } from '../app/recorded/analyze.ts';
import { DEFAULTS } from './defaults.ts';
import { abortSignal, flag, pathText, readOptions } from './options.ts';
import { recordsShape, recordsUnit, type RecordsOptions } from './records-options.ts';

/** The options of `analyzeRecords` (the `analyze` command's, by the same defaults). */
export interface AnalyzeRecordsOptions extends RecordsOptions {
  /** Folder for the tables; must be empty unless `force`. Required. */
  outDir: string;
  /**
   * Pipeline file (YAML or JSON): the processing keys, sample rate, carrier, calibration.
   * Default: boxcar over the record, reference phase auto, midpoint threshold.
   */
  pipeline?: string;
  /** Also write every table as Parquet (X.parquet beside X.arrow). Default false. */
  parquet?: boolean;
  /** Replace the files of a non-empty `outDir`. Default false. */
  force?: boolean;
  /** Aborting it stops the analysis between batches of records (a RunInterrupted error). */
  signal?: AbortSignal;
}

/** What `analyzeRecords` found: the calibration, the summary against the labels (null without), notes, files. */
export type AnalyzeRecordsResult = AnalyzeResult;

const schema: z.ZodType<AnalyzeRecordsOptions> = z.strictObject({
  ...recordsShape,
  outDir: pathText('a folder path (string)'),
  pipeline: pathText('a pipeline file path (string)').optional(),
  parquet: flag().optional(),
  force: flag().optional(),
  signal: abortSignal().optional(),
});

/**
 * Runs a processing pipeline on recorded traces and writes the run's tables (scored against the
 * labels when given) to `outDir`: the `analyze` command. Problems are `InputError`s.
 */
export async function analyzeRecords(options: AnalyzeRecordsOptions): Promise<AnalyzeRecordsResult> {
  const o = readOptions('analyzeRecords', schema, options);
  return analyzeToDirectory({
    records: o.records, pipelinePath: o.pipeline, outDir: o.outDir, labels: o.labels, force: o.force ?? DEFAULTS.force,
    sampleRate: o.sampleRate, carrierFrequency: o.carrier === 'none' ? 0 : o.carrier, window: o.window, scale: o.scale,
    unit: recordsUnit(o.unit), parquet: o.parquet ?? DEFAULTS.parquet, signal: o.signal,
  });
}
