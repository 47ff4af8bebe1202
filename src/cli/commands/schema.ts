/**
 * `singleshot schema`: print the JSON Schema of scenario files, for editors.
 */
import { Command } from 'commander';
import { scenarioJsonSchema } from '../../scenario/json-schema.ts';

/** Makes the `schema` command: prints the JSON Schema (draft 2020-12) on stdout. */
export function makeSchemaCommand(): Command {
  return new Command('schema')
    .description('print the JSON Schema of scenario files (for editor completion and checks)')
    .action(() => {
      process.stdout.write(`${JSON.stringify(scenarioJsonSchema(), null, 2)}\n`);
    });
}
