/**
 * The command line: parses arguments and calls the library. User errors (bad options, bad
 * input, file-system failures) print one line `singleshot: …` and exit with code 2; anything
 * else is a bug and keeps its stack trace.
 */
import { Command, CommanderError } from 'commander';
import { InputError, ScenarioProblem } from '../errors.ts';
import { RunInterrupted } from '../run/interrupt.ts';
import { TOOL_VERSION } from '../io/metadata.ts';
import { makeRunCommand } from './commands/run.ts';
import { makeAnalyzeCommand } from './commands/analyze.ts';
import { makeCheckCommand } from './commands/check.ts';
import { makeInitCommand } from './commands/init.ts';
import { makeSchemaCommand } from './commands/schema.ts';
import { makeReportCommand } from './commands/report.ts';
import { makeMergeCommand } from './commands/merge.ts';
import { makeRerunCommand } from './commands/rerun.ts';
import { makeFitCommand } from './commands/fit.ts';
import { ExitStatus } from './exit.ts';
import { fileSystemError, isSystemError } from '../io/fs-errors.ts';

/** A commander message ("error: unknown option '--x'\n(Did you mean --y?)") in the tool's one-line form. */
export function oneLineOptionError(message: string): string {
  const text = message.replace(/^error: /, '').split('\n').map((l) => l.trim()).filter((l) => l !== '').join(' ');
  return `singleshot: ${text}\n`;
}

/** Where commander writes: help and version to stdout, errors in the one-line form to stderr. */
const OUTPUT = {
  writeErr: (s: string) => { process.stderr.write(s); },
  outputError: (s: string, write: (t: string) => void) => write(oneLineOptionError(s)),
};

export function makeProgram(): Command {
  const program = new Command('singleshot')
    .description('Monte Carlo simulator of single-shot qubit readout, compared with the analytic error budget')
    .version(TOOL_VERSION)
    .exitOverride()
    .configureOutput(OUTPUT);
  for (const c of [makeRunCommand(), makeCheckCommand(), makeInitCommand(), makeSchemaCommand(), makeReportCommand(), makeAnalyzeCommand(), makeMergeCommand(), makeRerunCommand(), makeFitCommand()]) {
    program.addCommand(c.exitOverride().configureOutput(OUTPUT));
  }
  return program;
}

/** Runs the CLI on argv (node-style) and returns the exit code. */
export async function main(argv: readonly string[]): Promise<number> {
  try {
    await makeProgram().parseAsync([...argv], { from: 'node' });
    return 0;
  } catch (e) {
    if (e instanceof CommanderError) return e.exitCode === 0 ? 0 : 2;
    if (e instanceof ExitStatus) return e.code;
    if (e instanceof RunInterrupted) {
      process.stderr.write(`singleshot: ${e.message}\n`);
      return e.exitCode;
    }
    if (e instanceof InputError) {
      // several problems of one file (InputErrors): one line each
      for (const line of e.message.split('\n')) process.stderr.write(`singleshot: ${line}\n`);
      return 2;
    }
    // a problem of the scenario a use case did not name a file for (a safety net): still one line
    if (e instanceof ScenarioProblem) {
      process.stderr.write(`singleshot: scenario: ${e.message}\n`);
      return 2;
    }
    // a file-system failure nobody mapped (a full disk mid-write, say): still one line
    if (isSystemError(e)) {
      process.stderr.write(`singleshot: ${(fileSystemError(e) as Error).message}\n`);
      return 2;
    }
    throw e;
  }
}
