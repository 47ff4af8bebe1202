import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { makeCheckCommand } from '../../src/cli/commands/check.ts';
import { makeInitCommand } from '../../src/cli/commands/init.ts';
import { makeSchemaCommand } from '../../src/cli/commands/schema.ts';
import { starterScenario } from '../../src/scenario/starter.ts';
import { InputError } from '../../src/errors.ts';

let out: string[];
let err: string[];
let dir: string;

beforeEach(() => {
  out = [];
  err = [];
  vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => (out.push(String(chunk)), true));
  vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => (err.push(String(chunk)), true));
  dir = mkdtempSync(join(tmpdir(), 'singleshot-scenario-cli-'));
});

afterEach(() => {
  vi.restoreAllMocks();
  rmSync(dir, { recursive: true, force: true });
});

const run = (cmd: ReturnType<typeof makeCheckCommand>, args: string[]) => cmd.exitOverride().parseAsync(args, { from: 'user' });

describe('check', () => {
  it('prints "FILE: ok (…)" for a good file', async () => {
    const file = join(dir, 'good.yaml');
    writeFileSync(file, starterScenario());
    await run(makeCheckCommand(), [file]);
    expect(out.join('')).toBe(
      `${file}: ok (2 states, outcomes "0"/"1", 1 transition, 1 pipeline, 100000 shots, 10 µs window of a 20 µs record at 10 MHz, baseband)\n`,
    );
    expect(err).toEqual([]);
  });

  it('prints warnings to stderr, one line each', async () => {
    const file = join(dir, 'warn.yaml');
    writeFileSync(file, starterScenario().replace('carrier: none', 'carrier: { shape: sine, frequency: 8 MHz }'));
    await run(makeCheckCommand(), [file]);
    expect(out.join('')).toContain(': ok (');
    expect(err).toEqual([`warning: ${file}: signal.carrier.frequency: 8 MHz is above half the sample rate (10 MHz): the carrier aliases\n`]);
  });

  it('lets the InputError through', async () => {
    const file = join(dir, 'bad.yaml');
    writeFileSync(file, starterScenario().replace('sampleRate: 10 MHz', 'sampleRate: 10 us'));
    await expect(run(makeCheckCommand(), [file])).rejects.toThrow(
      new InputError(file, 'timing.sampleRate', 'a frequency (e.g. "100 MHz")', '"10 us"'),
    );
  });
});

describe('init', () => {
  it('writes the starter to stdout without a file', async () => {
    await run(makeInitCommand(), []);
    expect(out.join('')).toBe(starterScenario());
  });

  it('writes the starter to FILE, leaving no temporary file', async () => {
    const file = join(dir, 'new.yaml');
    await run(makeInitCommand(), [file]);
    expect(readFileSync(file, 'utf8')).toBe(starterScenario());
    expect(readdirSync(dir)).toEqual(['new.yaml']);
    expect(err.join('')).toContain('singleshot check');
  });

  it('refuses to overwrite without --force, and overwrites with it', async () => {
    const file = join(dir, 'existing.yaml');
    writeFileSync(file, 'keep me\n');
    await expect(run(makeInitCommand(), [file])).rejects.toThrow(/existing\.yaml: expected a file name not in use \(add --force to replace it\), found an existing file/);
    expect(readFileSync(file, 'utf8')).toBe('keep me\n');
    expect(readdirSync(dir)).toEqual(['existing.yaml']);
    await run(makeInitCommand(), [file, '--force']);
    expect(readFileSync(file, 'utf8')).toBe(starterScenario());
    expect(readdirSync(dir)).toEqual(['existing.yaml']);
  });

  it('reports a missing folder as an InputError', async () => {
    await expect(run(makeInitCommand(), [join(dir, 'no', 'such', 'x.yaml')])).rejects.toBeInstanceOf(InputError);
  });
});

describe('schema', () => {
  it('prints the JSON Schema', async () => {
    await run(makeSchemaCommand(), []);
    const schema = JSON.parse(out.join(''));
    expect(schema.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
    expect(schema.properties.timing.properties.sampleRate).toBeDefined();
  });
});
