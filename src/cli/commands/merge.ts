/** `singleshot merge DIR... --out DIR`: put the folders of a sharded run back together. */
import { Command } from 'commander';

export function makeMergeCommand(): Command {
  return new Command('merge')
    .description('merge the folders of `run --shard K/N` into the tables the unsharded run would have written')
    .argument('<dirs...>', 'shard folders (every K of the same N, in any order)')
    .requiredOption('--out <dir>', 'folder for the merged tables (must be empty unless --force)')
    .option('--force', 'replace the files of a non-empty --out folder')
    .option('--json', 'print the merged result as one JSON object on stdout')
    .option('--verbose', 'print every point of a sweep in full (default: one line per point)')
    .option('--no-report', 'do not write report.html')
    .action(async (dirs: string[], opts: { out: string; force?: boolean; json?: boolean; verbose?: boolean; report: boolean }) => {
      const [{ mergeRunFolders }, { withInterruptSignals }, { resultToJson }, { formatResult }] = await Promise.all([
        import('../../library/merge.ts'), import('../signals.ts'), import('../../app/result-json.ts'), import('../format.ts'),
      ]);
      const { result, files, shards, sweep } = await withInterruptSignals((signal) => mergeRunFolders({ folders: dirs, outDir: opts.out, force: opts.force, report: opts.report, signal }));
      if (opts.json) process.stdout.write(JSON.stringify(resultToJson(result, { out: opts.out, files, mergedFrom: shards }, sweep)) + '\n');
      else process.stdout.write(formatResult(result, { sweep, verbose: opts.verbose }) + `\nmerged ${shards.length} shard${shards.length === 1 ? '' : 's'} into ${opts.out}: ${files.join(', ')}\n`);
    });
}
