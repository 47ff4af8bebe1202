/** `writeRunReport`: rebuild report.html of a finished run from its tables — the `report` command as a function. */
import { z } from 'zod';
import { reportFolder } from '../app/report.ts';
import { DEFAULTS } from './defaults.ts';
import { abortSignal, flag, pathText, readOptions } from './options.ts';

/** The options of `writeRunReport` (the `report` command's, by the same defaults). */
export interface WriteRunReportOptions {
  /** The finished run or analysis folder (with run.json, summary.arrow). Required. */
  folder: string;
  /** Where to write the page. Default: `folder`/report.html. */
  out?: string;
  /** Replace a file that is there already (never one of the run's own tables). Default false. */
  force?: boolean;
  /** Aborting it stops the report between plots (a RunInterrupted error). */
  signal?: AbortSignal;
}

/** Where `writeRunReport` wrote the page. */
export interface WriteRunReportResult {
  /** The page's path. */
  path: string;
}

const schema: z.ZodType<WriteRunReportOptions> = z.strictObject({
  folder: pathText('a folder path (string)'),
  out: pathText('a file path (string)').optional(),
  force: flag().optional(),
  signal: abortSignal().optional(),
});

/** Rebuilds report.html of a finished run from its tables alone: the `report` command. Problems are `InputError`s. */
export async function writeRunReport(options: WriteRunReportOptions): Promise<WriteRunReportResult> {
  const o = readOptions('writeRunReport', schema, options);
  const { path } = await reportFolder({ dir: o.folder, out: o.out, force: o.force ?? DEFAULTS.force, signal: o.signal });
  return { path };
}
