/**
 * The resource guard: a run's memory, disk and time are estimated before it starts (pure,
 * plan/estimate.ts), and what exceeds the free memory or disk is refused with the estimate in
 * the message unless forced. Hard limits of the engine are validation errors instead.
 */
import { mkdtempSync, existsSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { estimateRun, formatBytes, formatDuration, REPORT_BYTES, SHOT_ROW_BYTES, WORKER_BYTES, type RunEstimate } from '../../src/run/estimate.ts';
import { freeDiskBytes, guardResources, ResourceError } from '../../src/app/resource-guard.ts';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { loadScenarioFile, loadScenarioText } from '../../src/scenario/load.ts';
import { MAX_RECORD_SAMPLES } from '../../src/scenario/limits.ts';
import { main } from '../../src/cli/main.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const TINY = join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml');
const base = mkdtempSync(join(tmpdir(), 'singleshot-guard-'));
afterAll(() => rmSync(base, { recursive: true, force: true }));

/** A small scenario as text; each line of `extra` ("key: value") adds or replaces a top-level key. */
function tinyText(extra: string): string {
  const keys = new Map<string, string>([
    ['name', 'guard'],
    ['timing', '{ sampleRate: 10 MHz, recordLength: 2 us }'],
    ['states', '[{name: a, level: 0, outcome: 0}, {name: b, level: 1, outcome: 1}]'],
    ['signal', '{ noise: { white: { perSample: 0.3 } } }'],
  ]);
  for (const line of extra.split('\n').filter(Boolean)) {
    const i = line.indexOf(': ');
    keys.set(line.slice(0, i), line.slice(i + 2));
  }
  return [...keys].map(([k, v]) => `${k}: ${v}`).join('\n') + '\n';
}

describe('estimateRun', () => {
  it('grows with shots, calibration shots and record length', async () => {
    const { scenario } = await loadScenarioFile(TINY);
    const e1 = estimateRun([scenario]);
    const e2 = estimateRun([{ ...scenario, shots: scenario.shots * 10 }]);
    const e3 = estimateRun([{ ...scenario, calibrationShots: scenario.calibrationShots * 100 }]);
    expect(e2.diskBytes).toBeGreaterThan(5 * e1.diskBytes);
    expect(e2.seconds - e2.fixedSeconds).toBeGreaterThan(5 * (e1.seconds - e1.fixedSeconds));
    expect(e3.memoryBytes).toBeGreaterThan(e1.memoryBytes);
    expect(estimateRun([scenario], { shotsTable: false }).disk.shots).toBeUndefined();
    expect(estimateRun([scenario], { workers: 4 }).memoryBytes).toBeGreaterThan(e1.memoryBytes);
  });

  it('counts report.html on disk when the run writes one, so a full disk is found before the run', async () => {
    const { scenario } = await loadScenarioFile(TINY);
    expect(estimateRun([scenario], { report: true }).disk.report).toBeGreaterThanOrEqual(REPORT_BYTES);
    expect(estimateRun([scenario]).disk.report).toBeUndefined();
  });

  it('counts only the worker threads that will start (never more than there are scored batches)', async () => {
    const seen: RunEstimate[] = [];
    const outDir = mkdtempSync(join(tmpdir(), 'singleshot-threads-'));
    // tiny has 2 scored batches: 64 workers asked for, 2 start
    await runToDirectory({ scenarioPath: TINY, outDir: join(outDir, 'out'), report: false, workers: 64, engine: 'traces', onEstimate: (e) => seen.push(e), free: { memoryBytes: 2 ** 40, diskBytes: 2 ** 40 } });
    expect(seen[0]!.memory.workers).toBe(2 * WORKER_BYTES);
    rmSync(outDir, { recursive: true, force: true });
  }, 60_000);

  it('predicts the size of shots.arrow within 25 % (rows × bytes per row + batch overhead)', async () => {
    const dir = join(base, 'size');
    const { scenario } = await loadScenarioFile(TINY, { shots: 16384 });
    await runToDirectory({ scenarioPath: TINY, shots: 16384, outDir: dir, report: false });
    const actual = statSync(join(dir, 'shots.arrow')).size;
    const predicted = estimateRun([scenario]).disk.shots!;
    // rows × SHOT_ROW_BYTES is the bulk; the file adds headers and padding
    expect(16384 * SHOT_ROW_BYTES).toBeLessThan(actual);
    expect(Math.abs(predicted - actual) / actual, `predicted ${predicted}, actual ${actual}`).toBeLessThan(0.25);
  });

  it('counts only the shard\'s share of the scored shots', async () => {
    const { scenario } = await loadScenarioFile(TINY, { shots: 8 * 1024 });
    const whole = estimateRun([scenario]).disk.shots!;
    const half = estimateRun([scenario], { shard: { index: 0, count: 2 } }).disk.shots!;
    expect(half / whole).toBeCloseTo(0.5, 2);
  });

  it('formats sizes and durations', () => {
    expect(formatBytes(512)).toBe('512 B');
    expect(formatBytes(1.5 * 2 ** 30)).toBe('1.5 GiB');
    expect(formatDuration(30)).toBe('30 s');
    expect(formatDuration(3600 * 5)).toBe('5 h');
  });
});

describe('guardResources', () => {
  const estimate = { memoryBytes: 8 * 2 ** 30, diskBytes: 3 * 2 ** 30, seconds: 600, fixedSeconds: 0.1, samples: 1e10, memory: { calibration: 7 * 2 ** 30, process: 2 ** 30 }, disk: { shots: 3 * 2 ** 30 } };

  it('refuses more memory than is free, showing the estimate and its biggest parts', () => {
    expect(() => guardResources('s.yaml', estimate, { memoryBytes: 2 ** 30, diskBytes: 2 ** 40 }, false))
      .toThrow(/^s\.yaml: expected a run that fits in the free memory \(1 GiB\), found an estimated 8 GiB \(calibration 7 GiB, process 1 GiB\); .*--force/);
  });

  it('refuses more disk than is free', () => {
    expect(() => guardResources('s.yaml', estimate, { memoryBytes: 2 ** 40, diskBytes: 2 ** 30 }, false))
      .toThrow(/free disk space \(1 GiB\), found an estimated 3 GiB \(shots 3 GiB\).*--no-shots-table/);
  });

  it('lets a forced run through, and one that fits', () => {
    expect(() => guardResources('s.yaml', estimate, { memoryBytes: 1, diskBytes: 1 }, true)).not.toThrow();
    expect(() => guardResources('s.yaml', estimate, { memoryBytes: 2 ** 40, diskBytes: 2 ** 40 }, false)).not.toThrow();
  });

  it('finds the free space of a folder that does not exist yet (its nearest parent)', () => {
    expect(freeDiskBytes(join(base, 'not', 'yet', 'there'))).toBeGreaterThan(0);
  });
});

describe('runs that do not fit are refused before anything is written', () => {
  it('runToDirectory with too little free memory: ResourceError, no folder created', async () => {
    const dir = join(base, 'refused');
    await expect(runToDirectory({ scenarioPath: TINY, outDir: dir, report: false, free: { memoryBytes: 1024, diskBytes: 2 ** 40 } }))
      .rejects.toBeInstanceOf(ResourceError);
    expect(existsSync(dir)).toBe(false);
  });

  it('the CLI refuses 2^31 calibration shots (≈ 100 GiB held) with exit 2 and the estimate, unless forced', async () => {
    const file = join(base, 'huge-calibration.yaml');
    writeFileSync(file, tinyText('shots: 1024\ncalibrationShots: 2147483648'));
    let err = '';
    const o = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    const e = vi.spyOn(process.stderr, 'write').mockImplementation((s) => { err += String(s); return true; });
    let code: number;
    try {
      code = await main(['node', 'singleshot', 'run', file, '--out', join(base, 'huge'), '--quiet']);
    } finally {
      o.mockRestore();
      e.mockRestore();
    }
    expect(code).toBe(2);
    expect(err).toMatch(/expected a run that fits in the free memory .*found an estimated .*GiB \(calibration/);
    expect(existsSync(join(base, 'huge'))).toBe(false);
  });

  it.each([
    ['a 10^12-sample record', 'timing: { sampleRate: 1 THz, recordLength: 1 s }', /timing\.recordLength: expected a record of at most/],
    ['2^33 shots', 'shots: 8589934592', /shots: expected at most 4294967296 shots per point/],
    ['a lifetime of 1 fs', 'transitions: [{from: b, to: a, lifetime: 1 fs}]', /transitions\[0\]\.lifetime: expected rates out of "b" giving at most 1000000 expected jumps per record/],
    ['a level of 1e200', 'states: [{name: a, level: 0, outcome: 0}, {name: b, level: 1e200, outcome: 1}]', /states\[1\]\.level: expected a (signal )?level (of magnitude )?between 1e-100 and 1e\+?100/],
    ['70 states', `states: [${Array.from({ length: 70 }, (_, i) => `{name: s${i}, level: ${i % 2}, outcome: ${i % 2}}`).join(', ')}]`, /states: expected a list of at most 64 states/],
  ])('hard limits are validation errors: %s', (_what, line, message) => {
    expect(() => loadScenarioText(tinyText(line), 'limits.yaml')).toThrow(message);
  });

  it(`MAX_RECORD_SAMPLES (${MAX_RECORD_SAMPLES}) itself is allowed`, () => {
    const text = tinyText('shots: 1').replace('recordLength: 2 us', `recordLength: ${MAX_RECORD_SAMPLES / 1e7} s`);
    expect(() => loadScenarioText(text, 'limits.yaml')).not.toThrow();
  });
});
