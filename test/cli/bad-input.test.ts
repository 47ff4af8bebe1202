/**
 * Every malformed scenario in test/fixtures/bad-scenarios gives, through the real command line,
 * exit code 2 and one line on stderr naming the file and the key path from the fixture's
 * `# expect:` comment — no stack trace. Both `check` and `run` are driven.
 */
import { existsSync, mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { runCli } from '../support/cli.ts';

const DIR = 'test/fixtures/bad-scenarios';
const files = readdirSync(DIR).filter((f) => f.endsWith('.yaml')).sort();

function expectedPath(file: string): string {
  const first = readFileSync(join(DIR, file), 'utf8').split('\n')[0] ?? '';
  const m = /^# expect: (.*)$/.exec(first);
  return m ? m[1]!.trim() : '(whole file)';
}


afterEach(() => vi.restoreAllMocks());

describe('malformed scenarios through the CLI', () => {
  it('there are at least 10 distinct fixtures', () => expect(files.length).toBeGreaterThanOrEqual(10));

  it.each(files)('%s → exit 2, one line with the key path', async (file) => {
    const path = join(DIR, file);
    const expected = expectedPath(file);
    for (const args of [['check', path], ['run', path, '--out', mkdtempSync(join(tmpdir(), 'singleshot-bad-')), '--force']]) {
      const { code, stderr } = await runCli(args);
      expect(code, `${args[0]} ${file}: exit code`).toBe(2);
      const lines = stderr.trimEnd().split('\n');
      expect(lines.length, `${args[0]} ${file}: stderr was\n${stderr}`).toBe(1);
      expect(lines[0]).toContain(path);
      if (expected !== '(whole file)') expect(lines[0], `${file}: expected key path ${expected}`).toContain(`${expected}:`);
      expect(stderr).not.toMatch(/\n\s+at /);
    }
  });

  it('a missing file is exit 2 with one line', async () => {
    const { code, stderr } = await runCli(['check', 'no/such/file.yaml']);
    expect(code).toBe(2);
    expect(stderr).toContain('no/such/file.yaml');
  });

  it('an unknown option is exit 2', async () => {
    const { code } = await runCli(['run', 'scenarios/demo.yaml', '--frobnicate']);
    expect(code).toBe(2);
  });

  it.each([
    ['an unknown command (with its suggestion)', ['runn'], /^singleshot: unknown command 'runn' \(Did you mean run\?\)$/],
    ['an unknown option', ['check', 'scenarios/demo.yaml', '--frobnicate'], /^singleshot: unknown option '--frobnicate'$/],
    ['a missing required option', ['run', 'scenarios/demo.yaml'], /^singleshot: required option '--out <dir>' not specified$/],
    ['a bad option value', ['run', 'scenarios/demo.yaml', '--out', 'x', '--shots', 'many'], /^singleshot: option '--shots <n>' argument 'many' is invalid\. --shots must be a whole number ≥ 1, found "many"$/],
    ['an absurd --shard', ['run', 'scenarios/demo.yaml', '--out', 'x', '--shard', '99999999999999999999/99999999999999999999'], /^singleshot: option '--shard <K\/N>' .* --shard takes K\/N with 1 ≤ K ≤ N ≤ 1048576/],
    ['a missing argument', ['report'], /^singleshot: missing required argument 'dir'$/],
  ])('%s: one line in the tool\'s form, exit 2', async (_what, args, message) => {
    const { code, stderr } = await runCli(args);
    expect(code).toBe(2);
    const lines = stderr.split('\n').filter((l) => l !== '');
    expect(lines, stderr).toHaveLength(1);
    expect(lines[0]).toMatch(message);
  });

  it('a --shard part that would score no shot is refused before anything is written', async () => {
    const dir = join(mkdtempSync(join(tmpdir(), 'singleshot-shard-')), 'out');
    // tiny has 2 scored batches: of 3 parts, the first gets none
    const { code, stderr } = await runCli(['run', 'test/fixtures/reliability/tiny.yaml', '--out', dir, '--shard', '1/3', '--quiet']);
    expect(code).toBe(2);
    expect(stderr).toMatch(/^singleshot: --shard: expected a part that scores shots \(.*at most 2 scored batches: split into at most 2 parts\), found part 1 of 3, which would score none\n$/);
    expect(existsSync(dir)).toBe(false);
    const other = await runCli(['run', 'test/fixtures/reliability/tiny.yaml', '--out', dir, '--shard', '2/3', '--quiet', '--no-report']);
    expect(other.code, other.stderr).toBe(0);
  });

  it('--keep-traces under --engine auto says that it changes the engine (and so the numbers)', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'singleshot-traces-'));
    const { code, stderr } = await runCli(['run', 'test/fixtures/reliability/tiny.yaml', '--out', join(dir, 'out'), '--keep-traces', 'raw', '--no-report']);
    expect(code, stderr).toBe(0);
    expect(stderr).toMatch(/^warning: --keep-traces: without it, --engine auto would run this scenario on the exact engine; .* its numbers differ from a run without --keep-traces/m);
    const withTraces = await runCli(['run', 'test/fixtures/reliability/tiny.yaml', '--out', join(dir, 'plain'), '--keep-traces', 'raw', '--no-report', '--engine', 'traces']);
    expect(withTraces.stderr).not.toMatch(/--keep-traces:/);
  });

  it('run refuses a non-empty --out without --force', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'singleshot-out-'));
    const first = await runCli(['run', 'test/fixtures/scenarios/small.yaml', '--out', dir, '--quiet']);
    expect(first.code).toBe(0);
    const second = await runCli(['run', 'test/fixtures/scenarios/small.yaml', '--out', dir]);
    expect(second.code).toBe(2);
    expect(second.stderr).toContain('--force');
  }, 60_000);

  it('--json prints one JSON object with the promised fields', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'singleshot-json-'));
    const { code, stdout } = await runCli(['run', 'test/fixtures/scenarios/small.yaml', '--out', dir, '--json', '--quiet']);
    expect(code).toBe(0);
    const j = JSON.parse(stdout) as { points: Record<string, unknown>[] };
    const p = j.points[0]!;
    for (const k of ['parameters', 'shots', 'errorByState', 'meanError', 'snr', 'threshold', 'budget', 'agreement']) expect(p, k).toHaveProperty(k);
    expect(Object.keys(p.errorByState as object)).toEqual(['low', 'high']);
    expect(p.budget).toHaveProperty('total');
    expect(p.meanError).toMatchObject({ rate: expect.any(Number), low: expect.any(Number), high: expect.any(Number) });
  }, 60_000);
});
