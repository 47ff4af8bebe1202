/** `singleshot run FILE --out DIR`: simulate, compare with the budget, write the tables. */
import { Command, InvalidArgumentError } from 'commander';
import type { EngineRequest } from '../../engine/choose.ts';
import { MAX_SHARDS, parseShardText } from '../../io/manifest.ts';
import { DEFAULTS } from '../../library/defaults.ts';
import { defaultWorkers } from '../../run/pool.ts';

/** Runs longer than this (estimated, seconds) get a note with the estimate on stderr. */
const ESTIMATE_NOTE_SECONDS = 60;

/** Parses the --keep-traces kind. */
export function traceKind(v: string): 'raw' | 'baseband' {
  if (v !== 'raw' && v !== 'baseband') throw new InvalidArgumentError(`--keep-traces takes "raw" or "baseband", found "${v}"`);
  return v;
}

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

/** Parses the --engine choice. */
export function engineOption(v: string): EngineRequest {
  if (v !== 'exact' && v !== 'traces' && v !== 'auto') throw new InvalidArgumentError(`--engine takes exact, traces or auto, found "${v}"`);
  return v;
}

/** Parses "K/N" (1 ≤ K ≤ N ≤ MAX_SHARDS) into a 0-based shard. */
export function shardOption(v: string): { index: number; count: number } {
  const s = parseShardText(v);
  if (!s) throw new InvalidArgumentError(`--shard takes K/N with 1 ≤ K ≤ N ≤ ${MAX_SHARDS}, found "${v.slice(0, 40)}"`);
  return { index: s.k - 1, count: s.n };
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
    .option('--verbose', 'print every point of a sweep in full (default: one line per point)')
    .option('--keep-traces <kind>', 'also write traces.arrow: every scored record, "raw" or demodulated "baseband" I/Q', traceKind)
    .option('--force', 'replace the files of a non-empty --out folder, and run even if the estimate exceeds free memory or disk')
    .option('--quiet', 'no progress or warnings on stderr')
    .option('--refine [key]', 'after a sweep, add golden-section points along one swept value (key path; default: the only or first range) to refine the error minimum')
    .option('--refine-points <n>', `points --refine adds (default ${DEFAULTS.refinePoints})`, positiveInteger('--refine-points'))
    .option('--no-report', 'do not write report.html')
    .option('--parquet', 'also write every table as Parquet (X.parquet beside X.arrow), for DuckDB, polars and other Parquet readers')
    .option('--engine <kind>', 'exact (draw each integrated value from its exact distribution), traces (synthesise every sample), or auto: exact when valid', engineOption, DEFAULTS.engine)
    .option('--workers <n>', `simulation threads (default: all ${defaultWorkers()} physical cores for a run estimated over 2 s whose batches take over 5 ms — trace engine, or exact with 1/f — else 1)`, positiveInteger('--workers'))
    .action(async (file: string, opts: { engine: EngineRequest; workers?: number; out: string; shots?: number; seed?: number; shard?: { index: number; count: number }; shotsTable: boolean; json?: boolean; verbose?: boolean; force?: boolean; quiet?: boolean; keepTraces?: 'raw' | 'baseband'; refine?: string | true; refinePoints?: number; report: boolean; parquet?: boolean }) => {
      const [{ runScenario }, { makeProgress }, { withInterruptSignals }, { describeEstimate }, { resultToJson }, { formatResult }, { formatOperatingPoints }, { operatingPointJson, runOperatingPoints }] = await Promise.all([
        import('../../library/run.ts'), import('../progress.ts'), import('../signals.ts'), import('../../app/resource-guard.ts'),
        import('../../app/result-json.ts'), import('../format.ts'), import('../format-operating.ts'), import('../../app/operating-json.ts'),
      ]);
      const progress = makeProgress({ quiet: opts.quiet });
      const { result, files, refinement, report, sweep } = await withInterruptSignals((signal) => runScenario({
        refine: opts.refine, refinePoints: opts.refinePoints,
        report: opts.report, onProgress: (done, total, phase) => progress.update(done, total, phase),
        scenario: file, outDir: opts.out, force: opts.force, shots: opts.shots, seed: opts.seed,
        shard: opts.shard, shotsTable: opts.shotsTable, signal, keepTraces: opts.keepTraces,
        engine: opts.engine, workers: opts.workers, parquet: opts.parquet,
        onWarning: (w) => { if (!opts.quiet) process.stderr.write(`warning: ${w}\n`); },
        onEstimate: (e) => {
          if (!opts.quiet && e.seconds > ESTIMATE_NOTE_SECONDS) process.stderr.write(`note: this run needs ${describeEstimate(e)} at most (a cautious estimate: runs often take a fraction of its time)\n`);
        },
      })).finally(() => progress.stop());
      if (opts.json) {
        process.stdout.write(JSON.stringify(resultToJson(result, { out: opts.out, files, report: report ?? null, operatingPoint: operatingPointJson(result, sweep, refinement) }, sweep)) + '\n');
      } else {
        const op = formatOperatingPoints(runOperatingPoints(result, refinement), sweep, refinement);
        process.stdout.write(formatResult(result, { sweep, verbose: opts.verbose }) + (op ? `\n${op}` : '') + `\ntables written to ${opts.out}: ${files.join(', ')}\n` + (report ? `report: ${report}\n` : ''));
      }
    });
}
