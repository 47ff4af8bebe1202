/** `fitTwin`: fit a scenario (a twin) to recorded traces — the `fit` command as a function. */
import { z } from 'zod';
import { fitToScenario, type FitResult } from '../app/recorded/fit.ts';
import { DEFAULTS } from './defaults.ts';
import { flag, pathText, readOptions, wholeNumber } from './options.ts';
import { recordsShape, recordsUnit, type RecordsOptions } from './records-options.ts';

/** The options of `fitTwin` (the `fit` command's, by the same defaults). */
export interface FitTwinOptions extends RecordsOptions {
  /** The scenario file to write (the fit report goes beside it, as .html). Required. */
  out: string;
  /** Bootstrap resamples for the uncertainties (a count ≥ 1). Default 30. */
  resamples?: number;
  /** Seed of the bootstrap (a whole number ≥ 0). Default 1. */
  seed?: number;
  /** Write the fit report. Default true. */
  report?: boolean;
  /** Replace an existing `out` file. Default false. */
  force?: boolean;
}

/** What `fitTwin` found and wrote: the fitted numbers, the scenario's path and text, notes and warnings. */
export type FitTwinResult = FitResult;

const schema: z.ZodType<FitTwinOptions> = z.strictObject({
  ...recordsShape,
  out: pathText('a scenario file path (string)'),
  resamples: wholeNumber(1).optional(),
  seed: wholeNumber(0).max(Number.MAX_SAFE_INTEGER, { error: 'a whole number ≥ 0 (a safe integer)' }).optional(),
  report: flag().optional(),
  force: flag().optional(),
});

/**
 * Fits a twin scenario to recorded traces — levels, carrier, noise spectrum, transition rates,
 * preparation errors — and writes it (and its report) to `out`: the `fit` command. Problems are
 * `InputError`s.
 */
export async function fitTwin(options: FitTwinOptions): Promise<FitTwinResult> {
  const o = readOptions('fitTwin', schema, options);
  return fitToScenario({
    records: o.records, out: o.out, labels: o.labels, sampleRate: o.sampleRate, carrier: o.carrier, window: o.window, scale: o.scale,
    unit: recordsUnit(o.unit), resamples: o.resamples ?? DEFAULTS.resamples, seed: o.seed ?? DEFAULTS.bootstrapSeed,
    report: o.report ?? DEFAULTS.report, force: o.force ?? DEFAULTS.force,
  });
}
