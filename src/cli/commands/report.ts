/** `singleshot report DIR`: rebuild report.html of a finished run from its tables alone. */
import { Command } from 'commander';

/** Makes the `report` command: writes DIR/report.html (or --out FILE) and prints its path. */
export function makeReportCommand(): Command {
  return new Command('report')
    .description('rebuild report.html of a finished run from its tables (refuses an unfinished run)')
    .argument('<dir>', 'run folder (with run.json, summary.arrow, budget.arrow)')
    .option('--out <file>', 'where to write the page (default DIR/report.html)')
    .option('--force', 'replace the page if a file is there already (never one of the run\'s tables)')
    .action(async (dir: string, opts: { out?: string; force?: boolean }) => {
      const [{ writeRunReport }, { withInterruptSignals }] = await Promise.all([import('../../library/report.ts'), import('../signals.ts')]);
      const { path } = await withInterruptSignals((signal) => writeRunReport({ folder: dir, out: opts.out, force: opts.force, signal }));
      process.stdout.write(`${path}\n`);
    });
}
