/**
 * `singleshot check FILE`: validate a scenario file and say what it describes.
 */
import { Command } from 'commander';

/**
 * Makes the `check` command: prints "FILE: ok (…)" on stdout and each warning on stderr.
 * A problem in the file, or at any point of its sweep, is thrown as an InputError for the caller to report.
 */
export function makeCheckCommand(): Command {
  return new Command('check')
    .description('check a scenario file and summarise it (problems are reported with their key path)')
    .argument('<file>', 'scenario file (YAML or JSON)')
    .action(async (file: string) => {
      const { checkScenario } = await import('../../library/check.ts');
      const { loaded, summary } = await checkScenario({ scenario: file });
      process.stdout.write(`${file}: ok (${summary})\n`);
      for (const w of loaded.warnings) process.stderr.write(`warning: ${w}\n`);
    });
}
