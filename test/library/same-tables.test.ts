/**
 * The library and the command line give identical tables: the same scenario, seed and options
 * through `runScenario` and through `singleshot run` (in-process) write byte-identical files, with
 * the defaults on both sides; a scenario given as an object writes the same tables as its file.
 */
import { mkdtempSync, readFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'yaml';
import { describe, expect, it } from 'vitest';
import { runScenario, checkScenario, DEFAULTS, resultToJson } from '../../src/index.ts';
import { runCli } from '../support/cli.ts';

const SCENARIO = 'test/fixtures/scenarios/small.yaml';
const TABLES = ['shots.arrow', 'summary.arrow', 'budget.arrow', 'tallies.json', 'run.json'];

const fresh = () => mkdtempSync(join(tmpdir(), 'singleshot-lib-'));
const bytes = (dir: string, f: string) => readFileSync(join(dir, f));

function expectSameFiles(a: string, b: string, files: readonly string[]): void {
  for (const f of files) expect(bytes(a, f).equals(bytes(b, f)), `${f} differs between ${a} and ${b}`).toBe(true);
}

describe('library and CLI give identical tables', () => {
  it('with every default on both sides (engine, report, shots table, workers)', async () => {
    const lib = fresh(), cli = fresh();
    const r = await runScenario({ scenario: SCENARIO, outDir: lib, force: true });
    const { code, stderr } = await runCli(['run', SCENARIO, '--out', cli, '--force', '--quiet']);
    expect(code, stderr).toBe(0);
    expectSameFiles(lib, cli, [...TABLES, 'report.html']);
    // the result the library returns is what the CLI wrote
    const manifest = JSON.parse(bytes(cli, 'run.json').toString()) as { engine: string; files: string[] };
    expect(r.result.engine).toBe(manifest.engine);
    expect(r.files).toEqual(manifest.files);
    expect(r.report).toBe(join(lib, 'report.html'));
  }, 120_000);

  it('with the same options given (seed, shots, traces engine, no report)', async () => {
    const lib = fresh(), cli = fresh();
    const r = await runScenario({ scenario: SCENARIO, outDir: lib, force: true, seed: 77, shots: 3072, engine: 'traces', report: false });
    const { code, stdout } = await runCli(['run', SCENARIO, '--out', cli, '--force', '--quiet', '--seed', '77', '--shots', '3072', '--engine', 'traces', '--no-report', '--json']);
    expect(code).toBe(0);
    expectSameFiles(lib, cli, TABLES);
    expect(existsSync(join(lib, 'report.html'))).toBe(false);
    // the same numbers: the CLI's JSON against the library's result
    const cliJson = JSON.parse(stdout) as Record<string, unknown>;
    const libJson = resultToJson(r.result, {}, r.sweep);
    expect(cliJson.engine).toBe('traces');
    for (const key of ['engine', 'engineReason', 'points', 'comparisons']) expect(libJson[key], key).toEqual(cliJson[key]);
    expect((libJson.points as unknown[]).length).toBeGreaterThan(0);
  }, 120_000);

  it('a scenario object gives the same tables as its file', async () => {
    const file = fresh(), object = fresh();
    const doc = parse(readFileSync(SCENARIO, 'utf8')) as Record<string, unknown>;
    await runScenario({ scenario: SCENARIO, outDir: file, force: true, report: false, shots: 2048 });
    const r = await runScenario({ scenario: doc, outDir: object, force: true, report: false, shots: 2048 });
    expectSameFiles(file, object, TABLES);
    expect(r.result.points[0]!.scenario.shots).toBe(2048);
    // a changed document changes the tables (so the comparison above can fail)
    const other = fresh();
    await runScenario({ scenario: { ...doc, seed: 4243 }, outDir: other, force: true, report: false, shots: 2048 });
    expect(bytes(other, 'summary.arrow').equals(bytes(object, 'summary.arrow'))).toBe(false);
  }, 120_000);

  it('checkScenario takes an object and names it "(scenario object)" in its messages', async () => {
    const doc = parse(readFileSync(SCENARIO, 'utf8')) as Record<string, unknown>;
    const fromFile = await checkScenario({ scenario: SCENARIO });
    const fromObject = await checkScenario({ scenario: doc });
    expect(fromObject.summary).toBe(fromFile.summary);
    expect(fromObject.loaded.canonical).toBe(fromFile.loaded.canonical);
    await expect(checkScenario({ scenario: { ...doc, shots: -5 } })).rejects.toThrow(/^\(scenario object\): shots: /);
    await expect(runScenario({ scenario: { ...doc, shots: -5 }, outDir: fresh(), report: false })).rejects.toThrow(/^\(scenario object\): shots: /);
  });

  it('the library run with no engine chooses what the CLI chooses (auto), not the trace engine', async () => {
    const lib = fresh(), auto = fresh(), traces = fresh();
    const r = await runScenario({ scenario: SCENARIO, outDir: lib, force: true, report: false, shots: 2048 });
    const a = await runScenario({ scenario: SCENARIO, outDir: auto, force: true, report: false, shots: 2048, engine: 'auto' });
    const t = await runScenario({ scenario: SCENARIO, outDir: traces, force: true, report: false, shots: 2048, engine: 'traces' });
    expect(DEFAULTS.engine).toBe('auto');
    expect(r.result.engine).toBe(a.result.engine);
    expect(r.result.engineReason).toBe(a.result.engineReason);
    expect(r.result.engineReason).toMatch(/^auto/);
    // this scenario runs on the exact engine under auto, so a trace-engine default would show
    expect(r.result.engine).toBe('exact');
    expect(t.result.engine).toBe('traces');
    expectSameFiles(lib, auto, TABLES);
  }, 120_000);
});
