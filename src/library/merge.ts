/** `mergeRunFolders`: put the folders of a sharded run back together — the `merge` command as a function. */
import { z } from 'zod';
import { mergeRuns, type MergeResult } from '../app/merge.ts';
import { DEFAULTS } from './defaults.ts';
import { abortSignal, flag, pathText, readOptions } from './options.ts';

/** The options of `mergeRunFolders` (the `merge` command's, by the same defaults). */
export interface MergeRunFoldersOptions {
  /** The shard folders of one run (every part of the same count, in any order). Required, at least one. */
  folders: string[];
  /** Folder for the merged tables; must be empty unless `force`. Required. */
  outDir: string;
  /** Replace the files of a non-empty `outDir`. Default false. */
  force?: boolean;
  /** Write report.html (when the shards have one). Default true. */
  report?: boolean;
  /** Aborting it stops the merge between record batches (a RunInterrupted error); `outDir` is left as it was. */
  signal?: AbortSignal;
}

/** What `mergeRunFolders` made: the merged result, the files written, the shard folders in order. */
export type MergeRunFoldersResult = MergeResult;

const schema: z.ZodType<MergeRunFoldersOptions> = z.strictObject({
  folders: z.array(pathText('a folder path (string)'), { error: 'a list of folder paths' }).min(1, { error: 'a list of at least one folder path' }),
  outDir: pathText('a folder path (string)'),
  force: flag().optional(),
  report: flag().optional(),
  signal: abortSignal().optional(),
});

/**
 * Merges the folders of a sharded run (`runScenario` with `shard`) into the tables the unsharded
 * run would have written, in `outDir`: the `merge` command. Problems are `InputError`s.
 */
export async function mergeRunFolders(options: MergeRunFoldersOptions): Promise<MergeRunFoldersResult> {
  const o = readOptions('mergeRunFolders', schema, options);
  return mergeRuns({ dirs: o.folders, outDir: o.outDir, force: o.force ?? DEFAULTS.force, report: o.report ?? DEFAULTS.report, signal: o.signal });
}
