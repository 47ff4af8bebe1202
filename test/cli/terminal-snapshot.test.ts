/**
 * The terminal output of the demo (scenarios/demo.yaml) and of the demo sweep
 * (scenarios/demo-sweep.yaml) at small shot counts, pinned as text: the same seed gives the same
 * bytes. Every quantity carries its unit with an SI prefix — the threshold and σ in pA, the swept
 * values in µs and ms — and no dimensioned number is printed in raw SI (`5.668e-11`,
 * `0.000001414213562373095`). The sweep prints one line per point; `--verbose` every point in full.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli } from '../support/cli.ts';

const dir = mkdtempSync(join(tmpdir(), 'singleshot-terminal-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Runs `run FILE` into a fresh folder and returns stdout with the folder replaced by OUT. */
async function terminal(file: string, name: string, extra: string[] = []): Promise<string> {
  const out = join(dir, name);
  const r = await runCli(['run', file, '--out', out, '--quiet', '--no-report', '--workers', '1', ...extra]);
  expect(r.code, r.stderr).toBe(0);
  return r.stdout.split(out).join('OUT');
}

/**
 * Numbers written in raw SI: an exponent of −9 or below (currents in A, times in s; no
 * probability printed here is that small), or a decimal with 5 or more leading zeros.
 */
const RAW_SI = /\b\d(?:\.\d+)?e-(?:9|\d\d)\b|\b0\.0{4,}\d/;

describe('terminal output with units', () => {
  it('the demo at 4096 shots', async () => {
    const text = await terminal('scenarios/demo.yaml', 'demo', ['--shots', '4096']);
    await expect(text).toMatchFileSnapshot('__snapshots__/demo.txt');
    expect(text).toMatch(/σ: simulated [\d.]+ pA, analytic [\d.]+ pA; threshold [\d.]+ pA\n/);
    expect(text).not.toMatch(RAW_SI);
  }, 60_000);

  it('the demo sweep at 1024 shots: one line per point', async () => {
    const text = await terminal('scenarios/demo-sweep.yaml', 'sweep', ['--shots', '1024']);
    await expect(text).toMatchFileSnapshot('__snapshots__/demo-sweep.txt');
    const lines = text.split('\n');
    const table = lines.filter((l) => /^\d+ {2}/.test(l));
    expect(table).toHaveLength(27);
    for (const l of table) expect(l, l).toMatch(/^\d+\s+[\d.]+ µs\s+(100 µs|300 µs|1 ms)\s+.*\s[\d.]+ pA\s+(yes|NO)$/);
    expect(lines.length).toBeLessThan(45);
    expect(text).not.toMatch(RAW_SI);
  }, 60_000);

  it('the demo sweep with --verbose: every point in full, swept values by key with units', async () => {
    const text = await terminal('scenarios/demo-sweep.yaml', 'verbose', ['--shots', '1024', '--verbose']);
    const headers = text.split('\n').filter((l) => l.startsWith('point '));
    expect(headers).toHaveLength(27);
    expect(headers[3]).toBe('point 3 (timing.window.length = 1.414 µs, transitions[0].lifetime = 100 µs), pipeline "main": 1024 shots');
    expect(text.match(/\n {2}σ: simulated [\d.]+ pA, analytic [\d.]+ pA; threshold [\d.]+ pA\n/g)).toHaveLength(27);
    expect(text).not.toMatch(RAW_SI);
  }, 60_000);
});
