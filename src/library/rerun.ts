/** `rerunFolder`: reproduce a finished run from its own tables and compare the bytes — the `rerun` command as a function. */
import { z } from 'zod';
import { rerunDirectory, type RerunResult } from '../app/rerun.ts';
import { DEFAULTS } from './defaults.ts';
import { abortSignal, callback, flag, pathText, readOptions, wholeNumber } from './options.ts';

/** The options of `rerunFolder` (the `rerun` command's, by the same defaults). */
export interface RerunFolderOptions {
  /** The finished run folder (run.json complete). Required. */
  folder: string;
  /** Keep the rerun in this folder (must be empty unless `force`). Default: a temporary folder, removed. */
  outDir?: string;
  /** Replace the files of a non-empty `outDir`. Default false. */
  force?: boolean;
  /** Simulation threads for the rerun (a count ≥ 1; the bytes do not depend on it). Default: as `runScenario` chooses. */
  workers?: number;
  /** Called with each warning, one line each. */
  onWarning?: (message: string) => void;
  /** Aborting it stops the rerun at the next batch (a RunInterrupted error). */
  signal?: AbortSignal;
}

/** What `rerunFolder` found: one comparison per table, and whether every table came out byte-identical. */
export type RerunFolderResult = RerunResult;

const schema: z.ZodType<RerunFolderOptions> = z.strictObject({
  folder: pathText('a folder path (string)'),
  outDir: pathText('a folder path (string)').optional(),
  force: flag().optional(),
  workers: wholeNumber(1).optional(),
  onWarning: callback<(message: string) => void>('(message) => void').optional(),
  signal: abortSignal().optional(),
});

/**
 * Reruns a finished run from the scenario, seed, shard and engine stored in its tables and
 * compares every table's bytes (`identical` in the result): the `rerun` command. Problems are
 * `InputError`s.
 */
export async function rerunFolder(options: RerunFolderOptions): Promise<RerunFolderResult> {
  const o = readOptions('rerunFolder', schema, options);
  return rerunDirectory({ dir: o.folder, outDir: o.outDir, force: o.force ?? DEFAULTS.force, workers: o.workers, onWarning: o.onWarning, signal: o.signal });
}
