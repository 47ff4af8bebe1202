import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { tableFromIPC } from 'apache-arrow';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { runOperatingPoints } from '../../src/app/operating-json.ts';
import { main } from '../../src/cli/main.ts';
import { GRID_3x4, smallScenario } from '../support/sweep-scenarios.ts';

const dir = mkdtempSync(join(tmpdir(), 'singleshot-demo-sweep-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the demo sweep (scenarios/demo-sweep.yaml)', () => {
  it('puts the error optimum at a shorter integration time than the SNR optimum, and reports both', async () => {
    const { result, refinement } = await runToDirectory({
      scenarioPath: 'scenarios/demo-sweep.yaml', outDir: join(dir, 'demo'), force: true, shots: 8192, report: false, shotsTable: false,
    });
    expect(refinement).toBeUndefined();
    const [op] = runOperatingPoints(result);
    const window = (p: Record<string, number>) => p.timing_window_length!;
    const errorBest = window(op!.lowestError.parameters), snrBest = window(op!.highestSnr!.parameters);
    // the error-minimising integration time is shorter than the SNR-maximising one whenever T1 is finite
    // (common practice, no source)
    expect(errorBest, `error optimum ${errorBest} s, SNR optimum ${snrBest} s`).toBeLessThan(snrBest);
    expect(op!.differ).toBe(true);
    // the analytic budget says the same at the relaxation time of the error optimum
    const t1 = op!.lowestError.parameters.transitions_0_lifetime!;
    const line = result.points.filter((p) => p.parameters.transitions_0_lifetime === t1);
    const analyticBest = line.reduce((a, b) => (b.summaries[0]!.analyticMean < a.summaries[0]!.analyticMean ? b : a));
    const analyticLoudest = line.reduce((a, b) => (b.summaries[0]!.analyticSnr > a.summaries[0]!.analyticSnr ? b : a));
    expect(window(analyticBest.parameters)).toBeLessThan(window(analyticLoudest.parameters));
  }, 120_000);
});

describe('run --json with --refine', () => {
  it('prints one JSON object with the operating point and the refinement, and writes the extra points', async () => {
    const file = join(dir, 'grid.yaml');
    writeFileSync(file, smallScenario(GRID_3x4));
    const out: string[] = [], err: string[] = [];
    vi.spyOn(process.stdout, 'write').mockImplementation((c: string | Uint8Array) => (out.push(String(c)), true));
    vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => (err.push(String(c)), true));
    const runDir = join(dir, 'refined');
    let code: number;
    try {
      code = await main(['node', 'singleshot', 'run', file, '--out', runDir, '--json', '--quiet', '--no-report', '--refine', 'timing.window.length', '--refine-points', '3']);
    } finally {
      vi.restoreAllMocks();
    }
    expect(code).toBe(0);
    expect(err).toEqual([]);
    const text = out.join('');
    expect(text.endsWith('\n')).toBe(true);
    expect(text.trimEnd().split('\n')).toHaveLength(1);
    const json = JSON.parse(text);
    const op = json.operatingPoint;
    expect(op.swept.map((s: { column: string }) => s.column)).toEqual(['timing_window_length', 'transitions_0_lifetime']);
    const p = op.pipelines[0];
    expect(p.pipeline).toBe('main');
    expect(p.lowestError.point).toBeLessThan(12);
    expect(p.lowestError.meanError.low).toBeLessThanOrEqual(p.lowestError.meanError.rate);
    expect(p.highestSnr.point).toBeLessThan(12);
    expect(typeof p.differ).toBe('boolean');
    expect(op.refined.key).toBe('timing.window.length');
    expect(op.refined.points.map((q: { point: number }) => q.point)).toEqual([12, 13, 14]);
    const [a, b] = op.refined.interval;
    for (const q of op.refined.points) {
      expect(q.value).toBeGreaterThan(a);
      expect(q.value).toBeLessThan(b);
    }
    const summary = tableFromIPC(readFileSync(join(runDir, 'summary.arrow')));
    expect(summary.numRows).toBe(15);
    expect(json.points).toHaveLength(15);
  }, 60_000);

  it('refuses --refine on a scenario without a sweep', async () => {
    const file = join(dir, 'plain.yaml');
    writeFileSync(file, smallScenario(''));
    const err: string[] = [];
    vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => (err.push(String(c)), true));
    vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    try {
      expect(await main(['node', 'singleshot', 'run', file, '--out', join(dir, 'plain'), '--refine'])).toBe(2);
    } finally {
      vi.restoreAllMocks();
    }
    expect(err.join('')).toContain('--refine: expected a scenario with a sweep section');
  });
});
