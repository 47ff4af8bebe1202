/**
 * Folders made by hand to look right: their files changed and run.json's checksums recomputed
 * to match (`resign`), so that the checksum alone does not catch them and the readers' own checks
 * must. Each is refused with one line naming the file and the key: a probability outside [0, 1]
 * (the −7.9e115 error rate a cut table once fed the report), a duplicated row, a row missing, a
 * table of another seed, shots copied from another shard or from another seed, shards that kept
 * traces of another kind, tallies of the wrong shape. Also: `rerun` of a `--refine` run
 * reproduces it (the refinement is recorded), and JSON scenarios with a repeated key are refused
 * like YAML ones.
 */
import { createHash } from 'node:crypto';
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Float64, RecordBatch, Schema, Table, tableFromIPC, tableToIPC, vectorFromArray, type Vector } from 'apache-arrow';
import { runMain } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const TINY = join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml');
const SWEEP = join(ROOT, 'test', 'fixtures', 'scenarios', 'shard-sweep.yaml');
const base = mkdtempSync(join(tmpdir(), 'singleshot-crafted-'));
const at = (name: string) => join(base, name);
afterAll(() => rmSync(base, { recursive: true, force: true }));

/** Recomputes run.json's checksums for the files it lists (what a careful forger would do). */
function resign(dir: string): void {
  const path = join(dir, 'run.json');
  const m = JSON.parse(readFileSync(path, 'utf8')) as { files: string[]; sha256: Record<string, string> };
  for (const f of m.files) m.sha256[f] = createHash('sha256').update(readFileSync(join(dir, f))).digest('hex');
  writeFileSync(path, JSON.stringify(m, null, 2));
}

/** Rewrites one column of a table file (same schema and metadata). */
function rewriteColumn(path: string, column: string, change: (values: (number | null)[]) => (number | null)[]): void {
  const t = tableFromIPC(readFileSync(path));
  const values = change(Array.from(t.getChild(column)!, (v: unknown) => (v === null ? null : Number(v))));
  const columns: Record<string, Vector> = {};
  for (const f of t.schema.fields) columns[f.name] = f.name === column ? vectorFromArray(values, new Float64()) : t.getChild(f.name)!;
  writeFileSync(path, tableToIPC(withMetadata(new Table(columns), t.schema.metadata), 'file'));
}

/** The same table with the given schema metadata. */
function withMetadata(t: Table, metadata: Map<string, string>): Table {
  const schema = new Schema(t.schema.fields, metadata);
  return new Table(schema, t.batches.map((b) => new RecordBatch(schema, b.data)));
}

async function expectRefused(args: string[], message: RegExp): Promise<void> {
  const r = await runMain(args);
  expect(r.code, r.err).toBe(2);
  const lines = r.err.split('\n').filter((l) => l !== '');
  expect(lines, r.err).toHaveLength(1);
  expect(lines[0]).toMatch(/^singleshot: /);
  expect(lines[0]).toMatch(message);
}

beforeAll(async () => {
  const quiet = ['--quiet', '--no-report'];
  for (const [name, args] of Object.entries({
    run: ['run', TINY, '--out', at('run'), ...quiet],
    seed5: ['run', TINY, '--out', at('seed5'), '--seed', '5', ...quiet],
    s1: ['run', SWEEP, '--out', at('s1'), '--shard', '1/2', '--engine', 'traces', ...quiet],
    s2: ['run', SWEEP, '--out', at('s2'), '--shard', '2/2', '--engine', 'traces', ...quiet],
    s2seed: ['run', SWEEP, '--out', at('s2seed'), '--shard', '2/2', '--seed', '77', '--engine', 'traces', ...quiet],
    t1: ['run', TINY, '--out', at('t1'), '--shard', '1/2', '--keep-traces', 'raw', ...quiet],
    t2: ['run', TINY, '--out', at('t2'), '--shard', '2/2', '--keep-traces', 'baseband', ...quiet],
  })) {
    const r = await runMain(args);
    expect(r.code, `${name}: ${r.err}`).toBe(0);
  }
}, 120_000);

describe('report refuses crafted tables', () => {
  it.each([
    ['an error rate of −7.9e115', 'summary.arrow', 'mean_error', (v: (number | null)[]) => v.map(() => -7.9e115), /summary\.arrow: mean_error\[0\]: expected a value in \[0, 1\], found -7\.9e\+115/],
    ['an analytic error above 1', 'summary.arrow', 'analytic_mean_error', (v: (number | null)[]) => v.map(() => 1.5), /analytic_mean_error\[0\]: expected a value in \[0, 1\]/],
    ['a rate outside its interval', 'summary.arrow', 'mean_error_high', (v: (number | null)[]) => v.map(() => 0), /mean_error\[0\]: expected a rate inside its interval/],
    ['a budget probability of NaN', 'budget.arrow', 'simulated', (v: (number | null)[]) => v.map((x, i) => (i === 3 ? NaN : x)), /budget\.arrow: simulated\[3\]: expected a finite number, found NaN/],
    ['more errors than shots', 'budget.arrow', 'errors', (v: (number | null)[]) => v.map((x, i) => (i === 0 ? 1e9 : x)), /errors\[0\]: expected at most the shots/],
  ])('%s', async (_what, file, column, change, message) => {
    const dir = at(`report-${column}`);
    cpSync(at('run'), dir, { recursive: true });
    rewriteColumn(join(dir, file), column, change);
    resign(dir);
    await expectRefused(['report', dir, '--out', join(dir, 'page.html')], message);
  });

  it('a table of another run (seed) in the folder', async () => {
    const dir = at('mixed');
    cpSync(at('run'), dir, { recursive: true });
    cpSync(join(at('seed5'), 'budget.arrow'), join(dir, 'budget.arrow'));
    resign(dir);
    await expectRefused(['report', dir, '--out', join(dir, 'page.html')], /budget\.arrow: metadata singleshot\.seed: expected "11" that .*run\.json records, found "5"/);
  });

  it('a table with a row removed', async () => {
    const dir = at('short');
    cpSync(at('run'), dir, { recursive: true });
    const t = tableFromIPC(readFileSync(join(dir, 'summary.arrow')));
    writeFileSync(join(dir, 'summary.arrow'), tableToIPC(t.slice(0, 0), 'file'));
    resign(dir);
    await expectRefused(['report', dir, '--out', join(dir, 'page.html')], /summary\.arrow: point: expected every one of the scenario's 1 point\(s\), found 0/);
  });
});

describe('merge refuses crafted shards', () => {
  it('accepts the two shards (the control case)', async () => {
    const r = await runMain(['merge', at('s1'), at('s2'), '--out', at('merged'), '--no-report']);
    expect(r.code, r.err).toBe(0);
  });

  it('shots of another seed under a shard\'s name', async () => {
    const dir = at('s2-other-shots');
    cpSync(at('s2'), dir, { recursive: true });
    cpSync(join(at('s2seed'), 'shots.arrow'), join(dir, 'shots.arrow'));
    resign(dir);
    await expectRefused(['merge', at('s1'), dir, '--out', at('m1'), '--no-report'], /s2-other-shots\/shots\.arrow: metadata singleshot\.seed: expected "\d+" that .*run\.json records, found "77"/);
  });

  it('shots of another shard (a duplicate of shard 1\'s)', async () => {
    const dir = at('s2-dup-shots');
    cpSync(at('s2'), dir, { recursive: true });
    cpSync(join(at('s1'), 'shots.arrow'), join(dir, 'shots.arrow'));
    resign(dir);
    await expectRefused(['merge', at('s1'), dir, '--out', at('m2'), '--no-report'], /s2-dup-shots\/shots\.arrow: metadata singleshot\.shard: expected "2\/2" that .*run\.json records, found "1\/2"/);
  });

  it('shots whose numbers repeat (metadata made to agree)', async () => {
    const dir = at('s2-renumbered');
    cpSync(at('s2'), dir, { recursive: true });
    const t = tableFromIPC(readFileSync(join(dir, 'shots.arrow')));
    const shots = Array.from(t.getChild('shot')!, Number);
    const columns: Record<string, Vector> = {};
    for (const f of t.schema.fields) columns[f.name] = f.name === 'shot' ? vectorFromArray(Uint32Array.from(shots, (s, i) => (i === 5 ? shots[4]! : s))) : t.getChild(f.name)!;
    writeFileSync(join(dir, 'shots.arrow'), tableToIPC(withMetadata(new Table(columns), t.schema.metadata), 'file'));
    resign(dir);
    await expectRefused(['merge', at('s1'), dir, '--out', at('m3'), '--no-report'], /s2-renumbered\/shots\.arrow: shot: expected shot \d+ of point 0 next/);
  });

  it('shots whose state names differ from the first shard\'s (a dictionary changed, metadata made to agree)', async () => {
    const dir = at('s2-dictionary');
    cpSync(at('s2'), dir, { recursive: true });
    const path = join(dir, 'shots.arrow');
    const bytes = readFileSync(path);
    // the first "high" is the state's name in a dictionary batch (the footer's scenario comes last)
    bytes.write('hxgh', bytes.indexOf('high'), 'latin1');
    writeFileSync(path, bytes);
    resign(dir);
    await expectRefused(['merge', at('s1'), dir, '--out', at('m6'), '--no-report'], /s2-dictionary\/shots\.arrow: [a-z_]+: expected the words the first shard's column has \("low", "high"\), found "low", "hxgh"/);
  });

  it('shards that kept traces of different kinds', async () => {
    await expectRefused(['merge', at('t1'), at('t2'), '--out', at('m4'), '--no-report'], /t2\/traces\.arrow: expected traces kept like .*t1's \(raw/);
  });

  it('tallies of another shape', async () => {
    const dir = at('s2-tallies');
    cpSync(at('s2'), dir, { recursive: true });
    const path = join(dir, 'tallies.json');
    const t = JSON.parse(readFileSync(path, 'utf8'));
    t.points[0].stacks[0][0].tally.clean[0].n = -3;
    writeFileSync(path, JSON.stringify(t));
    resign(dir);
    await expectRefused(['merge', at('s1'), dir, '--out', at('m5'), '--no-report'], /tallies\.json: points\[0\]\.stacks\[0\]\[0\]\.tally\.clean\[0\]\.n: expected a whole number ≥ 0, found -3/);
  });
});

describe('rerun and the refinement', () => {
  it('reproduces a --refine run byte for byte (the refinement is in run.json and every table)', async () => {
    const dir = at('refined');
    const made = await runMain(['run', join(ROOT, 'scenarios', 'demo-sweep.yaml'), '--out', dir, '--quiet', '--no-report', '--shots', '1024', '--refine', '--refine-points', '2', '--engine', 'exact']);
    expect(made.code, made.err).toBe(0);
    expect(JSON.parse(readFileSync(join(dir, 'run.json'), 'utf8')).refine).toEqual({ key: true, points: 2 });
    const r = await runMain(['rerun', dir]);
    expect(r.code, `${r.out}${r.err}`).toBe(0);
    expect(r.out).toMatch(/reproduced — every table is byte-identical/);
  }, 60_000);
});

describe('JSON like YAML', () => {
  it('a scenario with a repeated key is refused, naming it', async () => {
    const path = at('twice.json');
    writeFileSync(path, '{"name": "a", "timing": {"sampleRate": "1 MHz", "sampleRate": "2 MHz"}}');
    await expectRefused(['check', path], /twice\.json: timing\.sampleRate: expected each key once in a mapping, found "sampleRate" twice/);
  });
});
