/**
 * `singleshot check FILE`: validate a scenario file and say what it describes.
 */
import { Command } from 'commander';
import { loadScenarioFile } from '../../scenario/load.ts';
import { describeScenario } from '../../scenario/summary.ts';

/**
 * Makes the `check` command: prints "FILE: ok (…)" on stdout and each warning on stderr.
 * A problem in the file is thrown as an InputError for the caller to report.
 */
export function makeCheckCommand(): Command {
  return new Command('check')
    .description('check a scenario file and summarise it (problems are reported with their key path)')
    .argument('<file>', 'scenario file (YAML or JSON)')
    .action(async (file: string) => {
      const { scenario, warnings } = await loadScenarioFile(file);
      process.stdout.write(`${file}: ok (${describeScenario(scenario)})\n`);
      for (const w of warnings) process.stderr.write(`warning: ${w}\n`);
    });
}
