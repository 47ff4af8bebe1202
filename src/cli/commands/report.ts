/** `singleshot report DIR`: rebuild report.html of a finished run from its tables alone. */
import { Command } from 'commander';
import { writeReport } from '../../app/report.ts';

/** Makes the `report` command: writes DIR/report.html (or --out FILE) and prints its path. */
export function makeReportCommand(): Command {
  return new Command('report')
    .description('rebuild report.html of a finished run from its tables (refuses an unfinished run)')
    .argument('<dir>', 'run folder (with run.json, summary.arrow, budget.arrow)')
    .option('--out <file>', 'where to write the page (default DIR/report.html)')
    .action(async (dir: string, opts: { out?: string }) => {
      const { path } = await writeReport(dir, opts.out);
      process.stdout.write(`${path}\n`);
    });
}
