/**
 * Safe writes under interruption: a run stopped mid-way (an aborted AbortSignal in-process, or
 * SIGINT/SIGTERM sent to a real CLI process) leaves the folder as it was — empty, or the previous
 * run byte for byte — with no staging folder, no temporary file and no lock. `--out` never
 * replaces anything without `--force`, and `report` and `merge` refuse a folder whose run.json
 * says it did not finish. (test/reliability/interrupt-commands.test.ts interrupts every writing
 * command at many moments.)
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { tableFromIPC } from 'apache-arrow';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { RunInterrupted } from '../../src/run/interrupt.ts';
import { TEMP_MARKER } from '../../src/io/atomic-file.ts';
import { STAGING_PREFIX } from '../../src/io/output-dir.ts';
import { LOCK_FILE } from '../../src/io/folder-lock.ts';
import { readManifest } from '../../src/io/manifest.ts';
import { runMain } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const TINY = join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml');
const SLOW = join(ROOT, 'test', 'fixtures', 'reliability', 'slow.yaml');
const FREE = { memoryBytes: 2 ** 40, diskBytes: 2 ** 40 };
const base = mkdtempSync(join(tmpdir(), 'singleshot-interrupt-'));
afterAll(() => rmSync(base, { recursive: true, force: true }));
let n = 0;
const freshDir = () => join(base, `out-${n++}`);

/** Problems with a folder left by an interrupted run ([] when it is as it must be). */
function folderProblems(dir: string): string[] {
  const problems: string[] = [];
  for (const name of readdirSync(dir)) {
    if (name.startsWith(TEMP_MARKER)) problems.push(`temporary file left: ${name}`);
    if (name.startsWith(STAGING_PREFIX)) problems.push(`staging folder left: ${name}`);
    if (name === LOCK_FILE) problems.push('lock left');
    if (name.endsWith('.arrow')) {
      try {
        const t = tableFromIPC(readFileSync(join(dir, name)));
        for (const b of t.batches) void b.numRows;
        if (t.schema.fields.length === 0) problems.push(`${name} has no columns`);
      } catch (e) {
        problems.push(`${name} is not a complete Arrow file: ${(e as Error).message}`);
      }
    }
  }
  return problems;
}


/** Every file of a folder, by name. */
function snapshot(dir: string): Record<string, Buffer> {
  return Object.fromEntries(readdirSync(dir).map((f) => [f, readFileSync(join(dir, f))]));
}

describe('a run stopped mid-way (in-process)', () => {
  it('throws RunInterrupted and leaves the new folder empty: no run.json, no staging folder, no temporary file, no lock', async () => {
    const dir = freshDir();
    const controller = new AbortController();
    const run = runToDirectory({
      scenarioPath: TINY, outDir: dir, shots: 64 * 1024, report: false, free: FREE, signal: controller.signal, engine: 'traces',
      onProgress: (done, _total, phase) => { if (phase === 'simulating' && done >= 2048) controller.abort('SIGINT'); },
    });
    await expect(run).rejects.toBeInstanceOf(RunInterrupted);
    await expect(run).rejects.toThrow(/interrupted by SIGINT; .* was left as it was/);
    expect(readdirSync(dir)).toEqual([]);
    expect(() => readManifest(dir)).toThrow(/does not hold a singleshot run/);
  });

  it('an abort before the first table leaves a previous run untouched', async () => {
    const dir = freshDir();
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const before = snapshot(dir);
    const controller = new AbortController();
    controller.abort('SIGTERM');
    await expect(runToDirectory({ scenarioPath: TINY, outDir: dir, force: true, report: false, free: FREE, signal: controller.signal }))
      .rejects.toThrow(/interrupted by SIGTERM; .* was not touched/);
    expect(snapshot(dir)).toEqual(before);
  });

  it('a forced rerun stopped mid-way leaves the previous run byte for byte, which report still reads', async () => {
    const dir = freshDir();
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const before = snapshot(dir);
    const controller = new AbortController();
    await expect(runToDirectory({
      scenarioPath: TINY, outDir: dir, force: true, shots: 64 * 1024, report: false, free: FREE, signal: controller.signal, engine: 'traces',
      onProgress: (_done, _total, phase) => { if (phase === 'simulating') controller.abort('SIGINT'); },
    })).rejects.toBeInstanceOf(RunInterrupted);
    expect(snapshot(dir)).toEqual(before);
    expect(folderProblems(dir)).toEqual([]);
    const r = await runMain(['report', dir, '--out', join(base, `page-${n}.html`)]);
    expect(r.code, r.err).toBe(0);
  });

  it('report and merge refuse a folder whose run.json says the run did not finish', async () => {
    const dir = freshDir();
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const manifest = JSON.parse(readFileSync(join(dir, 'run.json'), 'utf8')) as Record<string, unknown>;
    writeFileSync(join(dir, 'run.json'), JSON.stringify({ ...manifest, complete: false }));
    const r = await runMain(['report', dir]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/complete: false/);
    const m = await runMain(['merge', dir, '--out', join(base, `merged-${n++}`)]);
    expect(m.code).toBe(2);
    expect(m.err).toMatch(/complete: false/);
  });
});

describe('--out never replaces files without --force', () => {
  it('a non-empty folder is refused with exit 2 and left as it was', async () => {
    const dir = freshDir();
    mkdirSync(dir);
    writeFileSync(join(dir, 'notes.txt'), 'keep me');
    const r = await runMain(['run', TINY, '--out', dir, '--quiet']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/is not empty .*add --force/);
    expect(readdirSync(dir)).toEqual(['notes.txt']);
    expect(readFileSync(join(dir, 'notes.txt'), 'utf8')).toBe('keep me');
  });

  it('a previous run is not replaced without --force', async () => {
    const dir = freshDir();
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const before = readFileSync(join(dir, 'shots.arrow'));
    const r = await runMain(['run', TINY, '--out', dir, '--seed', '99', '--quiet']);
    expect(r.code).toBe(2);
    expect(readFileSync(join(dir, 'shots.arrow')).equals(before)).toBe(true);
  });
});

/**
 * Starts the CLI on `scenario`, waits until shots.arrow is being written, sends `signal` — and,
 * with `again`, the same signal once more that many milliseconds later.
 */
function killMidRun(dir: string, signal: 'SIGINT' | 'SIGTERM', again?: number, scenario = SLOW): Promise<{ code: number | null; signal: string | null; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [join(ROOT, 'bin', 'singleshot.js'), 'run', scenario, '--out', dir, '--force', '--quiet', '--engine', 'traces'], { stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (d) => { stderr += String(d); });
    const started = Date.now();
    const poll = setInterval(() => {
      const staging = existsSync(dir) ? readdirSync(dir).find((f) => f.startsWith(STAGING_PREFIX)) : undefined;
      const writing = staging !== undefined && readdirSync(join(dir, staging)).some((f) => f.startsWith(TEMP_MARKER));
      if (writing || Date.now() - started > 60_000) {
        clearInterval(poll);
        // let it write a few batches first
        setTimeout(() => {
          child.kill(signal);
          if (again !== undefined) setTimeout(() => child.kill(signal), again);
        }, writing ? 300 : 0);
      }
    }, 50);
    child.on('error', reject);
    child.on('exit', (code, sig) => { clearInterval(poll); resolve({ code, signal: sig, stderr }); });
  });
}

describe('a real CLI process killed mid-run', () => {
  it.each([
    ['SIGINT', 130],
    ['SIGTERM', 143],
  ] as const)('%s: exit %i, the previous run left byte for byte, no staging folder, temporary file or lock', async (signal, code) => {
    const dir = freshDir();
    // a previous, finished run in the folder: it must stay as it was
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const before = snapshot(dir);
    const r = await killMidRun(dir, signal);
    expect(r.code, r.stderr).toBe(code);
    expect(r.stderr).toMatch(new RegExp(`interrupted by ${signal}; .* was left as it was`));
    expect(folderProblems(dir)).toEqual([]);
    expect(snapshot(dir)).toEqual(before);
  }, 90_000);

  it('a second SIGINT while the first waits for a long batch: exits 130 at once, still removing the staging folder, temporary files and lock', async () => {
    const dir = freshDir();
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const before = snapshot(dir);
    // batches of seconds: the first signal waits for the batch to end, the second does not
    const longBatches = join(base, 'long-batches.yaml');
    writeFileSync(longBatches, readFileSync(SLOW, 'utf8').replace('batchSize: 4096', 'batchSize: 262144').replace('calibrationShots: 2048', 'calibrationShots: 262144'));
    const r = await killMidRun(dir, 'SIGINT', 300, longBatches);
    expect(r.code, r.stderr).toBe(130);
    expect(r.stderr).toMatch(/SIGINT again, stopping at once/);
    expect(folderProblems(dir)).toEqual([]);
    expect(snapshot(dir)).toEqual(before);
  }, 90_000);
});

