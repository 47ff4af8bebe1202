/**
 * Determinism: the same scenario and seed give byte-identical tables on every rerun, whatever
 * the order of keys in the file, the locale or the time zone; the same shots whatever the batch
 * size; and `singleshot rerun DIR` reproduces a folder from its own metadata and says when it
 * cannot. (Worker counts and shard splits are tested by the scale tests.)
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { tableFromIPC, type Table } from 'apache-arrow';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { compareBytes, rerunDirectory } from '../../src/app/rerun.ts';
import { canonicalJson } from '../../src/scenario/canonical.ts';
import { runMain } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const TINY = join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml');
const FREE = { memoryBytes: 2 ** 40, diskBytes: 2 ** 40 };
const base = mkdtempSync(join(tmpdir(), 'singleshot-determinism-'));
afterAll(() => rmSync(base, { recursive: true, force: true }));
let n = 0;
const fresh = () => join(base, `out-${n++}`);

const TABLES = ['shots.arrow', 'summary.arrow', 'budget.arrow'];

async function run(scenarioPath: string, extra: Partial<Parameters<typeof runToDirectory>[0]> = {}): Promise<string> {
  const outDir = fresh();
  await runToDirectory({ scenarioPath, outDir, report: false, free: FREE, engine: 'traces', ...extra });
  return outDir;
}

const bytesOf = (dir: string) => Object.fromEntries(TABLES.map((t) => [t, readFileSync(join(dir, t))]));

/** A table's columns as plain arrays, metadata left out. */
function contents(t: Table): Record<string, unknown[]> {
  return Object.fromEntries(t.schema.fields.map((f) => [f.name, Array.from(t.getChild(f.name)!.toArray() as ArrayLike<unknown>)]));
}


describe('same scenario and seed ⇒ same bytes', () => {
  it('two runs write byte-identical tables', async () => {
    const a = await run(TINY);
    const b = await run(TINY);
    for (const t of TABLES) expect(compareBytes(t, bytesOf(a)[t]!, bytesOf(b)[t]!).identical, t).toBe(true);
  });

  it('the order of keys in the file does not matter (canonical JSON in the metadata, same bytes)', async () => {
    const text = readFileSync(TINY, 'utf8');
    // the same document with every top-level section in reverse order
    const sections = text.split(/\n(?=[a-z])/).filter((s) => !s.startsWith('#'));
    const reordered = join(base, 'reordered.yaml');
    writeFileSync(reordered, [...sections].reverse().join('\n') + '\n');
    const a = await run(TINY);
    const b = await run(reordered);
    for (const t of TABLES) expect(bytesOf(a)[t]!.equals(bytesOf(b)[t]!), t).toBe(true);
    expect(canonicalJson({ b: 1, a: { d: [2, { f: 1, e: 0 }], c: 3 } })).toBe('{"a":{"c":3,"d":[2,{"e":0,"f":1}]},"b":1}');
  });

  it('the batch size changes neither the shots nor the summary (only the Arrow batch layout)', async () => {
    const small = join(base, 'batch-1024.yaml');
    const large = join(base, 'batch-4096.yaml');
    const text = readFileSync(TINY, 'utf8').replace(/^shots: .*$/m, 'shots: 8192');
    writeFileSync(small, text.replace(/^batchSize: .*$/m, 'batchSize: 1024'));
    writeFileSync(large, text.replace(/^batchSize: .*$/m, 'batchSize: 4096'));
    const a = await run(small);
    const b = await run(large);
    for (const t of TABLES) {
      const ta = tableFromIPC(readFileSync(join(a, t)));
      const tb = tableFromIPC(readFileSync(join(b, t)));
      expect(ta.numRows, t).toBe(tb.numRows);
      expect(contents(ta), t).toEqual(contents(tb));
    }
  });

  it('a different locale and time zone in another process give the same bytes', async () => {
    const a = await run(TINY);
    const b = fresh();
    const r = spawnSync(process.execPath, [join(ROOT, 'bin', 'singleshot.js'), 'run', TINY, '--out', b, '--engine', 'traces', '--no-report', '--quiet', '--workers', '1'], {
      encoding: 'utf8', timeout: 60_000, env: { ...process.env, LC_ALL: 'de_DE.UTF-8', LANG: 'tr_TR.UTF-8', TZ: 'Pacific/Chatham' },
    });
    expect(r.status, r.stderr).toBe(0);
    for (const t of TABLES) expect(bytesOf(a)[t]!.equals(bytesOf(b)[t]!), t).toBe(true);
  }, 60_000);

  it('no clock, locale or Math.random in the code that makes results', () => {
    const offenders: string[] = [];
    const walk = (dir: string) => {
      for (const e of readdirSync(dir, { withFileTypes: true })) {
        const p = join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (p.endsWith('.ts') && !p.endsWith(join('cli', 'progress.ts'))) {
          readFileSync(p, 'utf8').split('\n').forEach((line, i) => {
            if (/^\s*(\*|\/\/)/.test(line)) return;
            if (/new Date\b|Date\.now|toLocale|Intl\.|performance\.now|Math\.random|localeCompare/.test(line)) offenders.push(`${p}:${i + 1}: ${line.trim()}`);
          });
        }
      }
    };
    walk(join(ROOT, 'src'));
    expect(offenders).toEqual([]);
  });
});

describe('singleshot rerun', () => {
  it('reproduces a folder from its own metadata (also a shard, with shots overridden)', async () => {
    const dir = await run(TINY, { shots: 5000, shard: { index: 1, count: 3 } });
    const r = await rerunDirectory({ dir });
    expect(r.comparisons.map((c) => [c.file, c.identical]).sort()).toEqual(
      readdirSync(dir).filter((f) => f !== 'run.json').sort().map((f) => [f, true]),
    );
    expect(r.identical).toBe(true);
    expect(r.provenance).toMatchObject({ seed: '11', shard: '2/3', engine: 'traces' });
  });

  it('CLI: exit 0 and a verdict on a match; exit 2 for a damaged file; exit 1 naming the file and byte on a mismatch', async () => {
    const dir = await run(TINY);
    const ok = await runMain(['rerun', dir]);
    expect(ok.code, ok.err).toBe(0);
    expect(ok.out).toMatch(/shots\.arrow: identical/);
    expect(ok.out).toMatch(/reproduced — every table is byte-identical \(seed 11, shard 1\/1, engine traces\)/);
    // damage one integrated value of shots.arrow (its lowest mantissa bit: still a readable Arrow file)
    const path = join(dir, 'shots.arrow');
    const bytes = readFileSync(path);
    const value = tableFromIPC(bytes).getChild('value')!.get(100) as number;
    const at = bytes.indexOf(Buffer.from(new Float64Array([value]).buffer));
    expect(at).toBeGreaterThan(0);
    bytes[at] = bytes[at]! ^ 0x01;
    writeFileSync(path, bytes);
    const damaged = await runMain(['rerun', dir]);
    expect(damaged.code).toBe(2);
    expect(damaged.err).toMatch(/shots\.arrow: expected the bytes .*run\.json records .*one of the two was changed or damaged/);
    // the same change with its checksum recorded (a folder whose files are as run.json says, but
    // not what the scenario and seed make): the rerun finds the difference
    const manifestPath = join(dir, 'run.json');
    const m = JSON.parse(readFileSync(manifestPath, 'utf8'));
    m.sha256['shots.arrow'] = createHash('sha256').update(bytes).digest('hex');
    writeFileSync(manifestPath, JSON.stringify(m, null, 2));
    const bad = await runMain(['rerun', dir]);
    expect(bad.code, bad.err).toBe(1);
    expect(bad.out).toContain(`shots.arrow: DIFFERENT (${bytes.length} vs ${bytes.length} bytes, first difference at byte ${at})`);
    expect(bad.out).toMatch(/NOT reproduced — 1 of \d+ files differ/);
  });

  it('an unfinished folder or one without tables: exit 2 with one line', async () => {
    const dir = await run(TINY);
    const manifest = join(dir, 'run.json');
    writeFileSync(manifest, readFileSync(manifest, 'utf8').replace('"complete": true', '"complete": false'));
    const r = await runMain(['rerun', dir]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^singleshot: .*run\.json: complete: expected a finished run/);
    const empty = fresh();
    const r2 = await runMain(['rerun', empty]);
    expect(r2.code).toBe(2);
  });
});
