import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { tableFromIPC } from 'apache-arrow';
import { readFileSync } from 'node:fs';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import { columnName, parseKeyPath, spacedValues } from '../../src/scenario/sections/sweep.ts';
import { expandSweep, substitute, sweepCombinations } from '../../src/run/sweep.ts';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { GRID_3x4, ZIP_4, smallScenario } from '../support/sweep-scenarios.ts';

const dir = mkdtempSync(join(tmpdir(), 'singleshot-sweep-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function expand(text: string) {
  const doc = parseScenarioText(text, 'test.yaml');
  const { scenario } = resolveScenario(doc, 'test.yaml');
  return expandSweep(doc, scenario, 'test.yaml');
}

function errorOf(text: string): string {
  try {
    expand(text);
  } catch (e) {
    return (e as Error).message;
  }
  return 'no error';
}

describe('key paths and column names', () => {
  it.each([
    ['timing.window.length', ['timing', 'window', 'length'], 'timing_window_length'],
    ['transitions[0].lifetime', ['transitions', 0, 'lifetime'], 'transitions_0_lifetime'],
    ['signal.noise.white.density', ['signal', 'noise', 'white', 'density'], 'signal_noise_white_density'],
    ['prepare["two words"]', ['prepare', 'two words'], 'prepare_two_words'],
    ['shots', ['shots'], 'shots_swept'],
  ])('%s', (text, path, column) => {
    expect(parseKeyPath(text)).toEqual(path);
    expect(columnName(path)).toBe(column);
  });

  it.each(['', '.a', 'a..b', 'a[x]', 'a[0', '3a'])('refuses %j', (text) => {
    expect(parseKeyPath(text)).toBeNull();
  });
});

describe('values', () => {
  it('spaces linear and log ranges with exact ends', () => {
    expect(spacedValues(1, 4, 4, 'linear')).toEqual([1, 2, 3, 4]);
    const log = spacedValues(1e-6, 1e-3, 4, 'log');
    expect(log[0]).toBe(1e-6);
    expect(log[3]).toBe(1e-3);
    // equal ratios of 10 between neighbours (common practice, no source)
    for (let i = 1; i < 4; i++) expect(log[i]! / log[i - 1]!).toBeCloseTo(10, 12);
  });

  it('combines a grid with the last value fastest, and zips in step', () => {
    const spec = { combine: 'grid' as const, axes: [{ values: [1, 2] }, { values: [1, 2, 3] }] } as never;
    expect(sweepCombinations(spec)).toEqual([[0, 0], [0, 1], [0, 2], [1, 0], [1, 1], [1, 2]]);
    const zip = { combine: 'zip' as const, axes: [{ values: [1, 2] }, { values: [3, 4] }] } as never;
    expect(sweepCombinations(zip)).toEqual([[0, 0], [1, 1]]);
  });

  it('substitutes a value, creating missing mappings, without touching the input', () => {
    const doc = { timing: { sampleRate: 1 }, list: [{ a: 1 }] };
    expect(substitute(doc, ['timing', 'window', 'length'], '2 us')).toEqual({ timing: { sampleRate: 1, window: { length: '2 us' } }, list: [{ a: 1 }] });
    expect(substitute(doc, ['list', 0, 'a'], 5)).toEqual({ timing: { sampleRate: 1 }, list: [{ a: 5 }] });
    expect(doc).toEqual({ timing: { sampleRate: 1 }, list: [{ a: 1 }] });
  });
});

describe('expansion', () => {
  it('a 3 × 4 grid gives 12 points with SI values and units', () => {
    const points = expand(smallScenario(GRID_3x4));
    expect(points).toHaveLength(12);
    expect(points.map((p) => p.parameters.timing_window_length)).toEqual([1, 1, 1, 1, 2, 2, 2, 2, 4, 4, 4, 4].map((x) => x / 1e6));
    expect(points[5]!.scenario.timing.windowLength).toBe(2e-6);
    expect(points[5]!.scenario.transitions[0]!.rate).toBeCloseTo(1 / points[5]!.parameters.transitions_0_lifetime!, 6);
    expect(points[0]!.units).toEqual({ timing_window_length: 's', transitions_0_lifetime: 's' });
    expect(points[0]!.scenario.sweep).toBeUndefined();
  });

  it('zip gives 4 points', () => {
    const points = expand(smallScenario(ZIP_4));
    expect(points).toHaveLength(4);
    expect(points[3]!.parameters).toEqual({ timing_window_length: 4e-6, signal_noise_white_density: 45e-15 });
    expect(points[0]!.units!.signal_noise_white_density).toBe('A/rtHz');
  });

  it('no sweep gives one point without parameters', () => {
    expect(expand(smallScenario('')).map((p) => p.parameters)).toEqual([{}]);
  });

  it.each([
    ['a key that is not there', GRID_3x4.replace('timing.window.length', 'timing.windw.length'), 'timing.windw: expected a known key'],
    ['a key holding a mapping', GRID_3x4.replace('key: timing.window.length', 'key: timing.window'), 'sweep.vary[0].key: expected a key that holds a number or a quantity'],
    ['a list index past the end', GRID_3x4.replace('transitions[0]', 'transitions[3]'), 'sweep.vary[1].key: expected a key path into the scenario (transitions has 1 entries)'],
    ['a value of the wrong kind', GRID_3x4.replace('"2 us"', '"2 MHz"'), 'sweep.vary[0].values[1]: expected a value of the same kind as the scenario\'s timing.window.length'],
    ['a value that does not fit the point', GRID_3x4.replace('"4 us"', '"40 us"'), 'timing.window.length: expected a length that ends inside the record'],
    ['zip of unequal lengths', ZIP_4.replace(', "45 fA/rtHz"', ''), 'sweep.vary[1]: expected as many values as sweep.vary[0] (4) to zip them, found 3'],
    ['the same key twice', GRID_3x4.replace('transitions[0].lifetime', 'timing.window.length'), 'sweep.vary[1].key: expected a key not already swept'],
    ['log spacing through zero', GRID_3x4.replace('from: 50 us', 'from: 0 us'), 'sweep.vary[1].range.from: expected a value > 0 (log spacing)'],
    ['values and range together', GRID_3x4.replace('values: ["1 us", "2 us", "4 us"]', 'values: ["1 us"]\n      range: { from: 1 us, to: 2 us, count: 2 }'), 'sweep.vary[0]: expected either values or range, found both'],
  ])('names the key path for %s', (_what, sweep, message) => {
    expect(errorOf(smallScenario(sweep))).toContain(message);
  });

  it('says which point failed', () => {
    expect(errorOf(smallScenario(GRID_3x4.replace('"4 us"', '"40 us"')))).toMatch(/^test\.yaml: timing\.window\.length: .* \(at sweep point 8 of 12: timing\.window\.length = "40 us", transitions\[0\]\.lifetime = "0\.00005 s"\)$/);
  });
});

describe('tables of a swept run', () => {
  async function run(name: string, sweep: string) {
    const file = join(dir, `${name}.yaml`);
    writeFileSync(file, smallScenario(sweep));
    const out = join(dir, name);
    await runToDirectory({ scenarioPath: file, outDir: out, force: true, report: false, shotsTable: false });
    const summary = tableFromIPC(readFileSync(join(out, 'summary.arrow')));
    const budget = tableFromIPC(readFileSync(join(out, 'budget.arrow')));
    return { summary, budget };
  }

  it('a 3 × 4 grid writes 12 summary rows with the swept columns and their units', async () => {
    const { summary, budget } = await run('grid', GRID_3x4);
    expect(summary.numRows).toBe(12);
    const field = summary.schema.fields.find((f) => f.name === 'timing_window_length')!;
    expect(field.metadata.get('unit')).toBe('s');
    expect(summary.schema.fields.find((f) => f.name === 'transitions_0_lifetime')!.metadata.get('unit')).toBe('s');
    expect(Array.from(summary.getChild('timing_window_length')!)).toEqual([1, 1, 1, 1, 2, 2, 2, 2, 4, 4, 4, 4].map((x) => x / 1e6));
    expect(Array.from(summary.getChild('point')!)).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11]);
    expect(new Set(Array.from(budget.getChild('point')!)).size).toBe(12);
    expect(budget.schema.fields.find((f) => f.name === 'transitions_0_lifetime')!.metadata.get('unit')).toBe('s');
  });

  it('zip writes 4 summary rows', async () => {
    const { summary } = await run('zip', ZIP_4);
    expect(summary.numRows).toBe(4);
    expect(summary.schema.fields.find((f) => f.name === 'signal_noise_white_density')!.metadata.get('unit')).toBe('A/rtHz');
  });
});
