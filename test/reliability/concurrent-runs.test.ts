/**
 * Two runs into one folder at once, from two processes: this test's process and a child
 * (test/support/command-on-cue.ts), started at moments drawn with a fixed seed so that they
 * overlap in different ways. Every time exactly one of them runs and the other is refused with
 * one line (the folder is in use by the other's process, or — when the first was already done —
 * it is not empty), and the folder holds the winner's complete run byte for byte (the same
 * scenario and seed write the same bytes, so it must equal a reference run), with no lock,
 * staging folder or temporary file left.
 *
 * The run first locks the folder (io/folder-lock.ts) and writes through a staging folder, so the
 * refused one never touches the other's files (it used to delete them).
 */
import { spawn, type ChildProcessWithoutNullStreams } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { afterAll, beforeAll, expect, it } from 'vitest';
import fc from 'fast-check';
import { runMain } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const TINY = join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml');
/** Trials (the acceptance asks for at least 20). */
const TRIALS = 24;
/** A run of about a few hundred milliseconds: long enough for the other to start meanwhile. */
const ARGS = (dir: string) => ['run', TINY, '--out', dir, '--quiet', '--no-report', '--engine', 'traces', '--shots', '49152', '--workers', '1'];

const base = mkdtempSync(join(tmpdir(), 'singleshot-concurrent-'));
let child: ChildProcessWithoutNullStreams;
const answers = new Map<string, (a: { code: number; stderr: string }) => void>();

beforeAll(async () => {
  child = spawn(process.execPath, [join(ROOT, 'bin', 'run-ts.js'), join(ROOT, 'test', 'support', 'command-on-cue.ts')], { stdio: ['pipe', 'pipe', 'pipe'] });
  const ready = new Promise<void>((resolve) => {
    createInterface({ input: child.stdout }).on('line', (line) => {
      const m = JSON.parse(line) as { ready?: boolean; id?: string; code: number; stderr: string };
      if (m.ready) resolve();
      else answers.get(m.id!)?.(m);
    });
  });
  await ready;
}, 60_000);

afterAll(() => {
  child?.kill('SIGTERM');
  rmSync(base, { recursive: true, force: true });
});

/** Runs ARGS in the child after `delay` ms. */
function inChild(id: string, dir: string, delay: number): Promise<{ code: number; stderr: string }> {
  return new Promise((resolve) => {
    answers.set(id, resolve);
    child.stdin.write(`${JSON.stringify({ id, delay, args: ARGS(dir) })}\n`);
  });
}

/** sha256 of every entry of a folder (names included), hidden ones too. */
function contents(dir: string): Record<string, string> {
  return Object.fromEntries(readdirSync(dir).sort().map((f) => [f, createHash('sha256').update(readFileSync(join(dir, f))).digest('hex')]));
}

it(`${TRIALS} pairs of runs into one folder: one runs, the other is refused, the folder holds the first intact`, async () => {
  const reference = join(base, 'reference');
  const ref = await runMain(ARGS(reference));
  expect(ref.code, ref.err).toBe(0);
  const expected = contents(reference);
  const delays = fc.sample(fc.tuple(fc.integer({ min: 0, max: 120 }), fc.integer({ min: 0, max: 120 })), { seed: 20261216, numRuns: TRIALS });
  const refusals = { inUse: 0, notEmpty: 0 };
  for (const [k, [childDelay, ownDelay]] of delays.entries()) {
    const dir = join(base, `trial-${k}`);
    const other = inChild(`t${k}`, dir, childDelay);
    await new Promise((r) => setTimeout(r, ownDelay));
    const mine = await runMain(ARGS(dir));
    const theirs = await other;
    const outcomes = [{ who: 'this process', code: mine.code, stderr: mine.err }, { who: 'child', ...theirs }];
    const where = `trial ${k} (child after ${childDelay} ms, this process after ${ownDelay} ms): ${JSON.stringify(outcomes)}`;
    expect(outcomes.map((o) => o.code).sort(), where).toEqual([0, 2]);
    const refused = outcomes.find((o) => o.code === 2)!;
    const lines = refused.stderr.split('\n').filter((l) => l !== '');
    expect(lines, where).toHaveLength(1);
    expect(lines[0], where).toMatch(/^singleshot: .*(in use by process \d+ \(singleshot run\); wait for it to finish|is not empty)/);
    if (/in use/.test(lines[0]!)) refusals.inUse++;
    else refusals.notEmpty++;
    expect(contents(dir), where).toEqual(expected);
  }
  // the moments were drawn so that most pairs overlap: the lock, not the emptiness check, refused them
  expect(refusals.inUse, JSON.stringify(refusals)).toBeGreaterThanOrEqual(TRIALS / 2);
}, 120_000);
