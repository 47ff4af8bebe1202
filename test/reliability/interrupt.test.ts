/**
 * Safe writes under interruption: a run stopped mid-way (an aborted AbortSignal in-process, or
 * SIGINT/SIGTERM sent to a real CLI process) leaves the folder with run.json `complete: false`,
 * no temporary files and only Arrow files that read completely — or, when it had not started
 * writing, the previous contents. `--out` never replaces anything without `--force`, and
 * `report` refuses an unfinished folder.
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


describe('a run stopped mid-way (in-process)', () => {
  it('throws RunInterrupted and leaves complete: false, no temporary files, no partial Arrow file', async () => {
    const dir = freshDir();
    const controller = new AbortController();
    const run = runToDirectory({
      scenarioPath: TINY, outDir: dir, shots: 64 * 1024, report: false, free: FREE, signal: controller.signal,
      onProgress: (done) => { if (done >= 2048) controller.abort('SIGINT'); },
    });
    await expect(run).rejects.toBeInstanceOf(RunInterrupted);
    await expect(run).rejects.toThrow(/interrupted by SIGINT; .* holds an unfinished run \(run\.json complete: false\)/);
    expect(readManifest(dir, false).complete).toBe(false);
    expect(readdirSync(dir).sort()).toEqual(['run.json']);
    expect(folderProblems(dir)).toEqual([]);
    expect(() => readManifest(dir)).toThrow(/complete: false \(the run was interrupted\)/);
  });

  it('an abort before the first table leaves a previous run untouched', async () => {
    const dir = freshDir();
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const before = Object.fromEntries(readdirSync(dir).map((f) => [f, readFileSync(join(dir, f))]));
    const controller = new AbortController();
    controller.abort('SIGTERM');
    await expect(runToDirectory({ scenarioPath: TINY, outDir: dir, force: true, report: false, free: FREE, signal: controller.signal }))
      .rejects.toThrow(/interrupted by SIGTERM; .* was not touched/);
    const after = Object.fromEntries(readdirSync(dir).map((f) => [f, readFileSync(join(dir, f))]));
    expect(after).toEqual(before);
  });

  it('a forced rerun stopped mid-way keeps the old tables whole and marks the folder unfinished; report and merge refuse it', async () => {
    const dir = freshDir();
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const controller = new AbortController();
    await expect(runToDirectory({
      scenarioPath: TINY, outDir: dir, force: true, shots: 64 * 1024, report: false, free: FREE, signal: controller.signal,
      onProgress: () => controller.abort('SIGINT'),
    })).rejects.toBeInstanceOf(RunInterrupted);
    expect(readManifest(dir, false).complete).toBe(false);
    expect(folderProblems(dir)).toEqual([]);
    const r = await runMain(['report', dir]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/complete: false/);
    const m = await runMain(['merge', dir, dir, '--out', join(dir, 'merged')]);
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

/** Starts the CLI on the slow scenario, waits until shots.arrow is being written, sends `signal`. */
function killMidRun(dir: string, signal: 'SIGINT' | 'SIGTERM'): Promise<{ code: number | null; signal: string | null; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [join(ROOT, 'bin', 'singleshot.js'), 'run', SLOW, '--out', dir, '--force', '--quiet'], { stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (d) => { stderr += String(d); });
    const started = Date.now();
    const poll = setInterval(() => {
      const writing = existsSync(dir) && readdirSync(dir).some((f) => f.startsWith(TEMP_MARKER));
      if (writing || Date.now() - started > 60_000) {
        clearInterval(poll);
        // let it write a few batches first
        setTimeout(() => child.kill(signal), writing ? 300 : 0);
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
  ] as const)('%s: exit %i, run.json complete: false, no temporary or truncated files, the old run\'s tables whole', async (signal, code) => {
    const dir = freshDir();
    // a previous, finished run in the folder: its tables must stay readable
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: FREE });
    const oldSummary = readFileSync(join(dir, 'summary.arrow'));
    const r = await killMidRun(dir, signal);
    expect(r.code, r.stderr).toBe(code);
    expect(r.stderr).toMatch(new RegExp(`interrupted by ${signal}; .* holds an unfinished run`));
    expect(JSON.parse(readFileSync(join(dir, 'run.json'), 'utf8')).complete).toBe(false);
    expect(folderProblems(dir)).toEqual([]);
    expect(readFileSync(join(dir, 'summary.arrow')).equals(oldSummary)).toBe(true);
  }, 90_000);
});

