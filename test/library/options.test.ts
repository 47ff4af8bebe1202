/**
 * Every library function checks its one options object: a wrong name (with the nearest known
 * one), a wrong type, a missing required option or a value out of range is an InputError with
 * one line per problem naming the option — before anything is read or written.
 */
import { existsSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  analyzeRecords, checkScenario, fitTwin, InputError, mergeRunFolders, rerunFolder, runScenario, writeRunReport,
} from '../../src/index.ts';

const SCENARIO = 'test/fixtures/scenarios/small.yaml';
const OUT = join(mkdtempSync(join(tmpdir(), 'singleshot-options-')), 'never-written');

type Call = (options: never) => Promise<unknown>;
const FUNCTIONS: Record<string, Call> = { runScenario, checkScenario, analyzeRecords, fitTwin, mergeRunFolders, rerunFolder, writeRunReport };

/** [function, options, the line expected (a regex over one line)]. */
const CASES: [string, unknown, RegExp][] = [
  ['runScenario', { scenario: SCENARIO, outDir: 3 }, /^options\.outDir: expected a folder path \(string\), found number$/],
  ['runScenario', { scenario: SCENARIO, outdir: OUT }, /^options\.outdir: unknown option of runScenario \(did you mean "outDir"\?\)$/],
  ['runScenario', { outDir: OUT }, /^options\.scenario: expected a scenario file path \(string\) or a scenario document \(a plain object\), found nothing$/],
  ['runScenario', { scenario: ['a'], outDir: OUT }, /^options\.scenario: expected .*, found a list$/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, engine: 'fast' }, /^options\.engine: expected one of "exact", "traces", "auto", found "fast"$/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, shots: 1.5 }, /^options\.shots: expected a whole number ≥ 1, found 1\.5$/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, seed: -1 }, /^options\.seed: expected a whole number ≥ 0, found -1$/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, shard: { index: 0 } }, /^options\.shard\.count: expected a whole number ≥ 1, found nothing$/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, shard: { index: 0, count: 2, part: 1 } }, /^options\.shard\.part: unknown option of runScenario/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, report: 'no' }, /^options\.report: expected true or false, found string$/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, onProgress: 'x' }, /^options\.onProgress: expected a function \(\(done, total, phase\) => void\), found "x"$/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, signal: {} }, /^options\.signal: expected an AbortSignal/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, keepTraces: 'all' }, /^options\.keepTraces: expected one of "raw", "baseband", found "all"$/],
  ['runScenario', { scenario: SCENARIO, outDir: OUT, workers: 0 }, /^options\.workers: expected a whole number ≥ 1, found 0$/],
  ['runScenario', { scenario: { name: 'x', level: () => 1 }, outDir: OUT }, /^\(scenario object\): level: expected plain data .*, found a function$/],
  ['runScenario', { scenario: { name: 'x', shots: Number.NaN }, outDir: OUT }, /^\(scenario object\): shots: expected plain data .*, found NaN$/],
  ['runScenario', 'small.yaml', /^options: expected one options object for runScenario, found string$/],
  ['checkScenario', { file: SCENARIO }, /^options\.file: unknown option of checkScenario \(its options: scenario\)$/],
  ['checkScenario', { scenario: 42 }, /^options\.scenario: expected a scenario file path \(string\) or a scenario document \(a plain object\), found number$/],
  ['checkScenario', {}, /^options\.scenario: expected .*, found nothing$/],
  ['analyzeRecords', { records: 'r.npy', outDir: OUT, pipelinePath: 'p.yaml' }, /^options\.pipelinePath: unknown option of analyzeRecords \(did you mean "pipeline"\?\)$/],
  ['analyzeRecords', { outDir: OUT }, /^options\.records: expected a records path FILE or FILE:NAME \(string\), found nothing$/],
  ['analyzeRecords', { records: 'r.npy', outDir: OUT, carrier: -1 }, /^options\.carrier: expected a number of Hz > 0, found -1$/],
  ['analyzeRecords', { records: 'r.npy', outDir: OUT, carrier: 'off' }, /^options\.carrier: expected a number of Hz > 0 or "none", found string$/],
  ['analyzeRecords', { records: 'r.npy', outDir: OUT, unit: 'mV' }, /^options\.unit: expected one of "A", "V", "none", found "mV"$/],
  ['analyzeRecords', { records: 'r.npy', outDir: OUT, window: { start: 0 } }, /^options\.window\.length: expected a number of s > 0, found nothing$/],
  ['analyzeRecords', { records: 'r.npy', outDir: OUT, sampleRate: 0 }, /^options\.sampleRate: expected a number of Hz > 0, found 0$/],
  ['fitTwin', { records: 'r.npy' }, /^options\.out: expected a scenario file path \(string\), found nothing$/],
  ['fitTwin', { records: 'r.npy', out: join(OUT, 'twin.yaml'), resamples: 0 }, /^options\.resamples: expected a whole number ≥ 1, found 0$/],
  ['fitTwin', { records: 'r.npy', out: join(OUT, 'twin.yaml'), scale: 0 }, /^options\.scale: expected a finite number, not 0, found 0$/],
  ['fitTwin', { records: 'r.npy', out: join(OUT, 'twin.yaml'), samplerate: 5e7 }, /^options\.samplerate: unknown option of fitTwin \(did you mean "sampleRate"\?\)$/],
  ['mergeRunFolders', { folders: [], outDir: OUT }, /^options\.folders: expected a list of at least one folder path, found a list of 0$/],
  ['mergeRunFolders', { folders: 'a', outDir: OUT }, /^options\.folders: expected a list of folder paths, found string$/],
  ['mergeRunFolders', { folders: ['a', 2], outDir: OUT }, /^options\.folders\[1\]: expected a folder path \(string\), found number$/],
  ['mergeRunFolders', { folder: ['a'], outDir: OUT }, /^options\.folder: unknown option of mergeRunFolders \(did you mean "folders"\?\)$/],
  ['rerunFolder', { dir: 'a' }, /^options\.dir: unknown option of rerunFolder/],
  ['rerunFolder', { folder: 'a', workers: 'all' }, /^options\.workers: expected a whole number ≥ 1, found string$/],
  ['writeRunReport', { folder: 1 }, /^options\.folder: expected a folder path \(string\), found number$/],
  ['writeRunReport', { folder: 'a', force: 'yes' }, /^options\.force: expected true or false, found string$/],
];

describe('options checked by every library function', () => {
  it('every function has a case', () => {
    expect(new Set(CASES.map(([f]) => f))).toEqual(new Set(Object.keys(FUNCTIONS)));
  });

  it.each(CASES)('%s(%j)', async (fn, options, line) => {
    const error = await FUNCTIONS[fn]!(options as never).then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(InputError);
    const lines = (error as Error).message.split('\n');
    expect(lines.some((l) => line.test(l)), `${fn}: got\n${(error as Error).message}`).toBe(true);
    expect(existsSync(OUT)).toBe(false);
  });

  it('reports every problem at once, one line each', async () => {
    const error = await runScenario({ outDir: 3, engine: 'x', shots: 0 } as never).then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(InputError);
    const lines = (error as Error).message.split('\n').sort();
    expect(lines).toHaveLength(4);
    expect(lines.map((l) => l.split(':')[0])).toEqual(['options.engine', 'options.outDir', 'options.scenario', 'options.shots']);
  });

  it('accepts what the CLI passes: undefined for every option left out', async () => {
    const r = await checkScenario({ scenario: SCENARIO });
    expect(r.points.length).toBe(1);
    await expect(runScenario({ scenario: SCENARIO, outDir: OUT, shots: undefined, engine: undefined, signal: AbortSignal.abort() }))
      .rejects.toThrow(/interrupted|was not touched/);
  });
});
