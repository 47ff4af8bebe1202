/** `singleshot run FILE --out DIR`: simulate, compare with the budget, write the tables. */
import { Command, InvalidArgumentError } from 'commander';
import { runToDirectory } from '../../io/run-to-directory.ts';
import { resultToJson } from '../../io/json.ts';
import { formatResult } from '../format.ts';

/** Parses a positive integer option. */
export function positiveInteger(name: string) {
  return (v: string): number => {
    const n = Number(v);
    if (!Number.isInteger(n) || n < 1) throw new InvalidArgumentError(`${name} must be a whole number ≥ 1, found "${v}"`);
    return n;
  };
}

/** Parses a non-negative integer option. */
export function seedNumber(v: string): number {
  const n = Number(v);
  if (!Number.isSafeInteger(n) || n < 0) throw new InvalidArgumentError(`the seed must be a whole number ≥ 0, found "${v}"`);
  return n;
}

/** Parses "K/N" (1 ≤ K ≤ N) into a 0-based shard. */
export function shardOption(v: string): { index: number; count: number } {
  const m = /^(\d+)\/(\d+)$/.exec(v);
  const k = m ? Number(m[1]) : NaN, n = m ? Number(m[2]) : NaN;
  if (!m || n < 1 || k < 1 || k > n) throw new InvalidArgumentError(`--shard takes K/N with 1 ≤ K ≤ N, found "${v}"`);
  return { index: k - 1, count: n };
}

export function makeRunCommand(): Command {
  return new Command('run')
    .description('simulate a scenario and compare the assignment error with the analytic budget')
    .argument('<scenario>', 'scenario file (YAML or JSON)')
    .requiredOption('--out <dir>', 'folder for the tables (must be empty unless --force)')
    .option('--shots <n>', 'scored shots per point (overrides the scenario)', positiveInteger('--shots'))
    .option('--seed <n>', 'run seed (overrides the scenario)', seedNumber)
    .option('--shard <K/N>', 'run only part K of N of the shots (merge the parts with `singleshot merge`)', shardOption)
    .option('--no-shots-table', 'do not write shots.arrow')
    .option('--json', 'print the result as one JSON object on stdout')
    .option('--force', 'replace the files of a non-empty --out folder')
    .option('--quiet', 'no progress or warnings on stderr')
    .action(async (file: string, opts: { out: string; shots?: number; seed?: number; shard?: { index: number; count: number }; shotsTable: boolean; json?: boolean; force?: boolean; quiet?: boolean }) => {
      const { result, files } = await runToDirectory({
        scenarioPath: file, outDir: opts.out, force: opts.force, shots: opts.shots, seed: opts.seed,
        shard: opts.shard, shotsTable: opts.shotsTable,
        onWarning: (w) => { if (!opts.quiet) process.stderr.write(`warning: ${w}\n`); },
      });
      if (opts.json) process.stdout.write(JSON.stringify(resultToJson(result, { out: opts.out, files })) + '\n');
      else process.stdout.write(formatResult(result) + `\ntables written to ${opts.out}: ${files.join(', ')}\n`);
    });
}
