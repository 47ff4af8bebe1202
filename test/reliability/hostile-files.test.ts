/**
 * Hostile files in: the shared safe reader (io/arrow-read.ts) and the commands that read tables
 * (`report`, `analyze`, and `merge` once it exists) given a zero-byte, a truncated, a non-Arrow
 * and a wrong-schema file answer with one clear line naming the file (and the column) and exit
 * 2 — never a stack trace from inside apache-arrow.
 *
 * To cover a new command: add a row to COMMANDS (how to call it with a hostile file in place).
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { tableFromArrays, tableToIPC } from 'apache-arrow';
import { readArrowFile, singleshotMetadata } from '../../src/io/arrow-read.ts';
import { InputError } from '../../src/errors.ts';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { makeProgram } from '../../src/cli/main.ts';
import { runMain } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const TINY = join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml');
const base = mkdtempSync(join(tmpdir(), 'singleshot-hostile-'));
const run = join(base, 'run');
afterAll(() => rmSync(base, { recursive: true, force: true }));

const shards = [join(base, 'shard-1'), join(base, 'shard-2')];
beforeAll(async () => {
  const free = { memoryBytes: 2 ** 40, diskBytes: 2 ** 40 };
  await runToDirectory({ scenarioPath: TINY, outDir: run, report: false, free });
  for (const [index, dir] of shards.entries()) {
    await runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free, shard: { index, count: 2 } });
  }
});

/** The four kinds of hostile file, made from a good table; each with what the message must say. */
const HOSTILE: [string, (good: Buffer) => Buffer, RegExp][] = [
  ['zero-byte', () => Buffer.alloc(0), /empty file \(0 bytes\)/],
  ['truncated', (good) => good.subarray(0, Math.floor(good.length / 2)), /truncated file/],
  ['non-Arrow', () => Buffer.from('point,pipeline,value\n0,main,1.5\n'), /a file in another format/],
  ['wrong-schema', () => Buffer.from(tableToIPC(tableFromArrays({ something: new Float64Array([1, 2, 3]) }), 'file')), /without singleshot metadata|no such column|column/],
];


describe('readArrowFile', () => {
  it('reads a good table and its metadata', () => {
    const t = readArrowFile(join(run, 'summary.arrow'), 'summary', [{ name: 'mean_error', kind: 'number' }, 'pipeline']);
    expect(t.numRows).toBeGreaterThan(0);
    expect(singleshotMetadata(t)).toMatchObject({ table: 'summary', seed: '11', shard: '1/1' });
  });

  it.each(HOSTILE)('a %s file is an InputError naming the file', (kind, make, message) => {
    const path = join(base, `${kind}.arrow`);
    writeFileSync(path, make(readFileSync(join(run, 'summary.arrow'))));
    let error: unknown;
    try {
      readArrowFile(path, 'summary', ['mean_error']);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(InputError);
    const err = error as InputError;
    expect(err.file).toBe(path);
    expect(err.message.startsWith(`${path}: `)).toBe(true);
    expect(err.message).toMatch(message);
    expect(err.message).not.toMatch(/\n/);
  });

  it.each([
    ['a missing file', join(base, 'nope.arrow'), /no such file/],
    ['a folder', base, /a folder/],
  ])('%s is an InputError', (_what, path, message) => {
    expect(() => readArrowFile(path, 'summary')).toThrow(message);
  });

  it('names the table it expected and the one it found', () => {
    expect(() => readArrowFile(join(run, 'budget.arrow'), 'summary')).toThrow(/expected a singleshot summary table, found a "budget" table$/);
  });

  it('names a missing column as the key path, and a column of the wrong kind', () => {
    const path = join(run, 'summary.arrow');
    expect(() => readArrowFile(path, 'summary', ['no_such_column'])).toThrow(new RegExp(`^${path}: no_such_column: expected a column "no_such_column", found no such column$`));
    expect(() => readArrowFile(path, 'summary', [{ name: 'pipeline', kind: 'number' }])).toThrow(/pipeline: expected a column of number values, found Utf8 values/);
  });

  it('refuses a file bigger than the given bound without reading it', () => {
    expect(() => readArrowFile(join(run, 'shots.arrow'), 'shots', [], 100)).toThrow(/at most 100 bytes/);
  });
});

/** Commands that read tables, with how to put a hostile file in front of them. */
const COMMANDS: { name: string; args(dir: string, file: string): string[]; place(dir: string, bytes: Buffer): string }[] = [
  {
    name: 'report',
    place: (dir, bytes) => { writeFileSync(join(dir, 'summary.arrow'), bytes); return join(dir, 'summary.arrow'); },
    args: (dir) => ['report', dir, '--out', join(dir, 'page.html')],
  },
  {
    name: 'analyze',
    place: (dir, bytes) => {
      writeFileSync(join(dir, 'pipeline.yaml'), 'sampleRate: 10 MHz\n');
      writeFileSync(join(dir, 'traces.arrow'), bytes);
      return join(dir, 'traces.arrow');
    },
    args: (dir) => ['analyze', join(dir, 'traces.arrow'), '--pipeline', join(dir, 'pipeline.yaml'), '--out', join(dir, 'analysis')],
  },
  {
    // merge streams shots.arrow of each shard: damage the first shard's
    name: 'merge',
    place: (dir, bytes) => {
      cpSync(shards[0]!, join(dir, 'a'), { recursive: true });
      cpSync(shards[1]!, join(dir, 'b'), { recursive: true });
      writeFileSync(join(dir, 'a', 'shots.arrow'), bytes);
      return join(dir, 'a', 'shots.arrow');
    },
    args: (dir) => ['merge', join(dir, 'a'), join(dir, 'b'), '--out', join(dir, 'merged'), '--no-report'],
  },
  {
    name: 'fit',
    place: (dir, bytes) => { writeFileSync(join(dir, 'traces.arrow'), bytes); return join(dir, 'traces.arrow'); },
    args: (dir) => ['fit', join(dir, 'traces.arrow'), '--sample-rate', '10 MHz', '--out', join(dir, 'twin.yaml')],
  },
];
const present = new Set(makeProgram().commands.map((c) => c.name()));

describe.each(COMMANDS.filter((c) => present.has(c.name)))('$name given hostile files', (command) => {
  it.each(HOSTILE)('a %s file: exit 2 and one line naming the file', async (kind, make) => {
    const dir = join(base, `${command.name}-${kind}`);
    cpSync(run, dir, { recursive: true });
    const path = command.place(dir, make(readFileSync(join(run, 'summary.arrow'))));
    const r = await runMain(command.args(dir, path));
    expect(r.code, r.err).toBe(2);
    const lines = r.err.split('\n').filter((l) => l !== '');
    expect(lines, r.err).toHaveLength(1);
    expect(lines[0]).toMatch(/^singleshot: /);
    expect(lines[0], 'names the file').toContain(path);
  });
});

it('the test covers every command that reads tables which exists now', () => {
  // a reminder for whoever adds a table-reading command: list it in COMMANDS
  for (const c of ['report', 'analyze', 'merge', 'fit']) expect(present.has(c), c).toBe(true);
});
