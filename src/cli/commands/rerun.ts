/** `singleshot rerun DIR [--out DIR2]`: reproduce a finished run from its own tables and compare the bytes. */
import { Command } from 'commander';
import { ExitStatus } from '../exit.ts';
import { positiveInteger } from './run.ts';

/**
 * Makes the `rerun` command: reruns DIR from the scenario, seed, shard and engine in its
 * metadata, prints one line per table and a verdict; exit 0 when every table is byte-identical,
 * 1 when any differs, 2 for a folder that cannot be rerun.
 */
export function makeRerunCommand(): Command {
  return new Command('rerun')
    .description('rerun a finished run from the scenario stored in its tables and check that every table comes out byte-identical (exit 0), or not (exit 1)')
    .argument('<dir>', 'finished run folder (run.json complete: true)')
    .option('--out <dir>', 'keep the rerun in this folder (default: a temporary folder, removed)')
    .option('--force', 'replace the files of a non-empty --out folder')
    .option('--workers <n>', 'simulation threads for the rerun (results must not depend on it)', positiveInteger('--workers'))
    .option('--quiet', 'no warnings on stderr')
    .action(async (dir: string, opts: { out?: string; force?: boolean; workers?: number; quiet?: boolean }) => {
      const [{ rerunFolder }, { withInterruptSignals }, { formatRerun }] = await Promise.all([
        import('../../library/rerun.ts'), import('../signals.ts'), import('../../app/rerun.ts'),
      ]);
      const r = await withInterruptSignals((signal) => rerunFolder({
        folder: dir, outDir: opts.out, force: opts.force, workers: opts.workers, signal,
        onWarning: (w) => { if (!opts.quiet) process.stderr.write(`warning: ${w}\n`); },
      }));
      process.stdout.write(`${formatRerun(dir, r)}\n`);
      if (!r.identical) throw new ExitStatus(1);
    });
}
