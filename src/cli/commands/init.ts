/**
 * `singleshot init [FILE]`: write a commented starter scenario.
 */
import { Command } from 'commander';
import { writeFileAtomic } from '../../io/atomic-file.ts';
import { starterScenario } from '../../scenario/starter.ts';

/** Makes the `init` command: the starter scenario to FILE (never overwriting unless --force) or stdout. */
export function makeInitCommand(): Command {
  return new Command('init')
    .description('write a commented starter scenario to FILE, or to standard output')
    .argument('[file]', 'where to write the scenario (default: standard output)')
    .option('--force', 'replace FILE if it already exists', false)
    .action(async (file: string | undefined, options: { force: boolean }) => {
      if (file === undefined) {
        process.stdout.write(starterScenario());
        return;
      }
      // through a temporary file in the same folder; never replacing a file unless --force
      writeFileAtomic(file, starterScenario(), { replace: options.force });
      process.stderr.write(`${file}: written; check it with: singleshot check ${file}\n`);
    });
}
