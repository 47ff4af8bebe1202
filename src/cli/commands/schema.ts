/**
 * `singleshot schema`: print the JSON Schema of scenario files, for editors.
 */
import { Command } from 'commander';

/** Makes the `schema` command: prints the JSON Schema (draft 2020-12) on stdout. */
export function makeSchemaCommand(): Command {
  return new Command('schema')
    .description('print the JSON Schema of scenario files (for editor completion and checks)')
    .action(async () => {
      const { scenarioJsonSchema } = await import('../../scenario/json-schema.ts');
      process.stdout.write(`${JSON.stringify(scenarioJsonSchema(), null, 2)}\n`);
    });
}
