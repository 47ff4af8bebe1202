/**
 * `singleshot merge` refuses, with exit code 2 and one clear line, every set of folders that
 * cannot make the unsharded run: a missing shard, a duplicated shard, a shard of another seed or
 * of another scenario, a shard of another split, an unfinished shard, a folder without tallies.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { runCli } from '../support/cli.ts';

const SMALL = 'test/fixtures/scenarios/small.yaml';
let root = '';
const dir = (name: string) => join(root, name);


afterEach(() => vi.restoreAllMocks());

beforeAll(async () => {
  root = mkdtempSync(join(tmpdir(), 'singleshot-merge-'));
  const common = ['--quiet', '--no-report', '--workers', '1', '--engine', 'exact', '--no-shots-table'];
  for (const k of [1, 2, 3]) {
    expect((await runCli(['run', SMALL, '--out', dir(`part${k}`), '--shard', `${k}/3`, ...common])).code).toBe(0);
  }
  expect((await runCli(['run', SMALL, '--out', dir('seed2'), '--shard', '2/3', '--seed', '99', ...common])).code).toBe(0);
  const other = join(root, 'other.yaml');
  writeFileSync(other, readFileSync(SMALL, 'utf8').replace('name: small test readout', 'name: another readout'));
  expect((await runCli(['run', other, '--out', dir('scenario2'), '--shard', '2/3', ...common])).code).toBe(0);
  expect((await runCli(['run', SMALL, '--out', dir('half2'), '--shard', '2/2', ...common])).code).toBe(0);
  cpSync(dir('part2'), dir('unfinished'), { recursive: true });
  const manifest = join(dir('unfinished'), 'run.json');
  writeFileSync(manifest, readFileSync(manifest, 'utf8').replace('"complete": true', '"complete": false'));
  cpSync(dir('part2'), dir('untallied'), { recursive: true });
  rmSync(join(dir('untallied'), 'tallies.json'));
}, 120_000);

describe('merge refuses what cannot make the unsharded run', () => {
  it('accepts the three shards (the control case)', async () => {
    const r = await runCli(['merge', dir('part1'), dir('part2'), dir('part3'), '--out', dir('ok'), '--no-report']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
  });

  it.each([
    ['a missing shard', ['part1', 'part3'], /no shard 2\/3 among the 2 folders given/],
    ['a duplicated shard', ['part1', 'part2', 'part2', 'part3'], /part2\/run\.json: shard: expected each shard once, found shard 2\/3 again \(also in .*part2\)/],
    ['a shard from another seed', ['part1', 'seed2', 'part3'], /seed2\/run\.json: seed: expected seed 4242 like .*part1.*found seed 99: a shard of another run/],
    ['a shard from another scenario', ['part1', 'scenario2', 'part3'], /scenario2\/run\.json: scenario: expected the scenario of .*part1, found a different scenario: a shard of another run/],
    ['a shard of another split', ['part1', 'half2', 'part3'], /half2\/run\.json: shard: expected a part of 3 like .*part1 \(shard 1\/3\), found shard 2\/2/],
    ['an unfinished shard', ['part1', 'unfinished', 'part3'], /unfinished\/run\.json: complete: expected a finished run, found complete: false/],
    ['a shard without tallies', ['part1', 'untallied', 'part3'], /untallied\/tallies\.json: expected a file run\.json lists, found no such file/],
  ])('%s → exit 2 with one line naming it', async (_what, parts, message) => {
    const r = await runCli(['merge', ...parts.map(dir), '--out', dir(`out-${parts.join('-')}`), '--no-report']);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr.trim().split('\n'), r.stderr).toHaveLength(1);
    expect(r.stderr).toMatch(/^singleshot: /);
    expect(r.stderr).toMatch(message);
  });
});
