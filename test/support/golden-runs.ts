/**
 * The runs whose every output file is pinned by a hash (test/fixtures/golden-hashes.json): the
 * three demo scenarios and the test fixture scenarios, with both engines where the exact engine
 * applies and on 1 and 2 worker threads, plus the other commands that write tables (kept traces,
 * analyze with a pipeline file, merge of shards, the report). The hashes were taken on main
 * before the source tree was reorganised (commit 0a6d843), so a move that changes one bit of one
 * table fails `test/golden/tables.test.ts`.
 *
 * Regenerate only when a change is meant to change numbers:
 *   node bin/run-ts.js test/support/make-golden-hashes.ts
 * and say in the commit which hashes changed and why.
 *
 * Everything runs through the command line in-process (`main`), whose arguments are stable
 * across reorganisations of the library.
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** One pinned command: its arguments (with OUT and WORK placeholders) and the files it checks. */
export interface GoldenRun {
  /** Key in the hash file. */
  id: string;
  /** Commands run in order; `OUT` is this run's folder, `WORK` a scratch folder shared by the steps. */
  steps: string[][];
  /** Files written to pipeline files in WORK before the steps. */
  files?: Record<string, string>;
}

const FIXTURES = 'test/fixtures/scenarios';
const DEMOS = ['scenarios/demo.yaml', 'scenarios/demo-components.yaml', 'scenarios/demo-sweep.yaml'];

/** Scenario, shot override (null: the file's own), and whether the exact engine applies. */
const SCENARIOS: [string, number | null, boolean][] = [
  [DEMOS[0]!, 20000, true],
  [DEMOS[1]!, 9000, false],
  [DEMOS[2]!, 4500, true],
  [`${FIXTURES}/small.yaml`, null, true],
  [`${FIXTURES}/pipelines.yaml`, null, false],
  [`${FIXTURES}/fused-mix.yaml`, null, true],
  [`${FIXTURES}/fused-two-state.yaml`, null, true],
  [`${FIXTURES}/shard-sweep.yaml`, null, true],
  [`${FIXTURES}/iq.yaml`, null, true],
];

const base = (file: string) => file.split('/').pop()!.replace(/\.yaml$/, '');

/** Every pinned run. */
export function goldenRuns(): GoldenRun[] {
  const runs: GoldenRun[] = [];
  for (const [file, shots, exact] of SCENARIOS) {
    for (const engine of exact ? ['traces', 'exact'] : ['traces']) {
      for (const workers of [1, 2]) {
        const args = ['run', file, '--out', 'OUT', '--quiet', '--no-report', '--engine', engine, '--workers', String(workers)];
        if (shots !== null) args.push('--shots', String(shots));
        runs.push({ id: `${base(file)}/${engine}/workers-${workers}`, steps: [args] });
      }
    }
  }
  // the fused exact path writes no shots table
  runs.push({ id: 'demo/exact/no-shots-table', steps: [['run', DEMOS[0]!, '--out', 'OUT', '--quiet', '--no-report', '--engine', 'exact', '--shots', '65536', '--no-shots-table']] });
  runs.push({ id: 'fused-mix/exact/no-shots-table', steps: [['run', `${FIXTURES}/fused-mix.yaml`, '--out', 'OUT', '--quiet', '--no-report', '--engine', 'exact', '--no-shots-table']] });
  // kept traces (the trace engine), raw and baseband
  runs.push({ id: 'small/keep-traces-raw', steps: [['run', `${FIXTURES}/small.yaml`, '--out', 'OUT', '--quiet', '--no-report', '--keep-traces', 'raw', '--shots', '2048']] });
  runs.push({ id: 'pipelines/keep-traces-baseband', steps: [['run', `${FIXTURES}/pipelines.yaml`, '--out', 'OUT', '--quiet', '--no-report', '--keep-traces', 'baseband', '--shots', '1024']] });
  // baseband I and Q: both raw channels kept
  runs.push({ id: 'iq/keep-traces-raw', steps: [['run', `${FIXTURES}/iq.yaml`, '--out', 'OUT', '--quiet', '--no-report', '--keep-traces', 'raw', '--shots', '2048']] });
  // analyze: recorded traces through a pipeline file, calibration stored and fresh
  runs.push({
    id: 'pipelines/analyze',
    files: {
      'matched.yaml': 'name: matched\nfilter: { butterworth: { order: 4, cutoff: 3 MHz } }\ndecimate: 5\nweights: matched\nthreshold: optimal\ncalibration: stored\n',
      'boxcar.yaml': 'name: boxcar\nthreshold: optimal\ncalibration: { labels: intended_outcome }\n',
    },
    steps: [
      ['run', `${FIXTURES}/pipelines.yaml`, '--out', 'WORK/raw', '--quiet', '--no-report', '--keep-traces', 'raw'],
      ['analyze', 'WORK/raw/traces.arrow', '--pipeline', 'WORK/matched.yaml', '--out', 'OUT/matched', '--labels', 'intended_outcome'],
      ['analyze', 'WORK/raw/traces.arrow', '--pipeline', 'WORK/boxcar.yaml', '--out', 'OUT/boxcar', '--labels', 'intended_outcome'],
    ],
  });
  // shards merged
  for (const engine of ['traces', 'exact']) {
    const shard = (k: number) => ['run', `${FIXTURES}/shard-sweep.yaml`, '--out', `WORK/shard-${k}`, '--quiet', '--no-report', '--engine', engine, '--shard', `${k}/3`];
    runs.push({
      id: `shard-sweep/${engine}/merged`,
      steps: [shard(1), shard(2), shard(3), ['merge', 'WORK/shard-1', 'WORK/shard-2', 'WORK/shard-3', '--out', 'OUT', '--no-report']],
    });
  }
  // the report: its page is built from the tables and the re-simulated examples
  runs.push({ id: 'demo-sweep/report', steps: [['run', DEMOS[2]!, '--out', 'OUT', '--quiet', '--shots', '2048', '--engine', 'exact']] });
  return runs;
}

/**
 * sha256 of every file under `dir` (relative paths, sorted), with `scratch` (the temporary folder,
 * which merge records in run.json) written as WORK.
 */
export function hashTree(dir: string, scratch: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (d: string, prefix: string) => {
    for (const e of readdirSync(d, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      const rel = prefix ? `${prefix}/${e.name}` : e.name;
      if (e.isDirectory()) walk(join(d, e.name), rel);
      else {
        const bytes = readFileSync(join(d, e.name));
        const text = bytes.toString('latin1');
        const normalised = text.includes(scratch) ? Buffer.from(text.split(scratch).join('WORK'), 'latin1') : bytes;
        out[rel] = createHash('sha256').update(normalised).digest('hex');
      }
    }
  };
  walk(dir, '');
  return out;
}

/**
 * Runs one pinned run through `cli` (the command line's `main`, with its output captured) and
 * returns the hashes of what it wrote. Throws when a step exits non-zero.
 */
export async function runGolden(
  run: GoldenRun, cli: (args: string[]) => Promise<{ code: number; stderr: string }>,
): Promise<Record<string, string>> {
  const work = mkdtempSync(join(tmpdir(), 'singleshot-golden-'));
  const out = join(work, 'out');
  try {
    for (const [name, text] of Object.entries(run.files ?? {})) writeFileSync(join(work, name), text);
    for (const step of run.steps) {
      const args = step.map((a) => a.replace(/^OUT/, out).replace(/^WORK/, work));
      const r = await cli(args);
      if (r.code !== 0) throw new Error(`${run.id}: singleshot ${step.join(' ')} exited ${r.code}: ${r.stderr}`);
    }
    return hashTree(out, work);
  } finally {
    rmSync(work, { recursive: true, force: true });
  }
}
