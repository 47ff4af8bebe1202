/**
 * Scale benchmarks (issue 6): the trace engine on 2 worker threads, the exact-statistic engine
 * on 1 core and on 2 workers against the numpy sampling of the same statistic and against the
 * trace engine, the cost of a seeding block's stream jump, and the peak RSS of whole runs at two
 * shot counts per engine.
 *
 * The exact-engine cases time exactly the per-shot work of `run --no-shots-table`: runPoints
 * with the exact engine and no per-shot consumer (so the fused path: simulation, scoring and
 * tallies per seeding block, exact-fused.ts), behind the interruptible executor the CLI uses,
 * tally-tree pushes on the main thread; calibration and budgets are per run and amortised over
 * 2^23 shots. The trace engine is timed on the same scenario doing the same per-shot work
 * (simulation + scoring + tallies).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeScratch, simulateBatch } from '../../src/engine/trace/batch.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { inProcessExecutor, type BatchExecutor } from '../../src/run/executor.ts';
import { setUpPoint, tallyBatch } from '../../src/run/point-result.ts';
import { interruptibleExecutor } from '../../src/run/interrupt.ts';
import { workerPoolExecutor } from '../../src/run/pool.ts';
import { scoreBatch } from '../../src/classify/score.ts';
import { BlockStreams } from '../../src/random/streams.ts';
import type { BatchTask } from '../../src/run/batches.ts';
import { benchWorkload } from '../workload.ts';
import { measureRate, type BenchCase } from '../harness.ts';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..', '..');

/** The workload of bench/workload.ts as a scenario file (for whole runs in a child process). */
const WORKLOAD_YAML = `
name: bench
description: benchmark workload (bench/workload.ts)
seed: 1
calibrationShots: 2048
batchSize: 4096
timing: { sampleRate: 100 MHz, recordLength: 20 us, window: { start: 0 us, length: 20 us }, shotPeriod: 20 us }
states:
  - { name: ground, level: 0, outcome: "0" }
  - { name: excited, level: 1, outcome: "1" }
transitions:
  - { from: excited, to: ground, lifetime: 200 us }
signal:
  unit: none
  carrier: { shape: sine, frequency: 1 MHz, phase: 0 deg }
  noise:
    white: { perSample: 5 }
processing:
  referencePhase: 0 deg
  threshold: midpoint
`;

/** Exact-engine shots per call of the throughput cases. */
const EXACT_SHOTS = 2 ** 23;

async function exactRate(executor: () => BatchExecutor, seconds: number): Promise<number> {
  const scenario = { ...benchWorkload(), shots: EXACT_SHOTS };
  const signal = new AbortController().signal;
  return measureRate(async () => {
    await runPoints([{ parameters: {}, scenario }], { engine: 'exact', executor: interruptibleExecutor(executor(), signal) });
    return EXACT_SHOTS;
  }, seconds, 1);
}

/** Trace engine shots/s, by case: 1 core (set by the 1-core exact case), 2 workers (set by the trace case). */
const traceShots: { oneCore?: number; twoWorkers?: number } = {};

/** Trace engine shots/s on one core: simulation + scoring + tallies (the same work per shot as a run). */
async function traceShotRate(seconds: number): Promise<number> {
  const scenario = benchWorkload();
  const point = compilePoint(scenario);
  const scratch = makeScratch(point);
  const calibration = [{ axis: { cos: 1, sin: 0 }, rule: { threshold: 0.5, highIsOne: true }, outcomeMeans: [0, 1], weights: null, bandHalfWidth: 0, likelihood: null, binSigma: NaN }];
  let batch = 0;
  return measureRate(() => {
    const result = setUpPoint(0, { parameters: {}, scenario }, calibration as never, point);
    const b = simulateBatch(point, 0, 'score', batch++ % 1000, scenario.batchSize, scratch);
    tallyBatch(result, b, scoreBatch(point, calibration as never, b));
    return scenario.batchSize;
  }, seconds, 1);
}

const ratioDetail = (rate: number, trace: number | undefined, what: string): string => (trace
  ? `${(rate / trace).toFixed(0)}× the trace engine's ${(trace / 1e3).toFixed(1)} k shots/s ${what} (target ≥ 300×); ${(rate / 1e6).toFixed(1)} M shots/s (target ≥ 20 M per core)`
  : `${(rate / 1e6).toFixed(1)} M shots/s`);

function rss(engine: 'exact' | 'traces', shots: number): { maxRssMB: number; seconds: number } {
  const dir = mkdtempSync(join(tmpdir(), 'singleshot-rss-'));
  const file = join(dir, 'workload.yaml');
  writeFileSync(file, WORKLOAD_YAML);
  // with the nursery size bin/singleshot.js runs with
  const out = execFileSync('node', ['--max-semi-space-size=2', join(root, 'bin/run-ts.js'), join(here, '..', 'rss-child.ts'), file, join(dir, 'out'), engine, String(shots), '1'], { encoding: 'utf8', cwd: root });
  return JSON.parse(out.trim().split('\n').pop()!) as { maxRssMB: number; seconds: number };
}

function rssCase(engine: 'exact' | 'traces', small: number, large: number): BenchCase {
  return {
    name: `peak RSS, ${engine} engine, ${small.toExponential(0)} vs ${large.toExponential(0)} shots (no shots table)`,
    unit: 'MB',
    async run() {
      const a = rss(engine, small), b = rss(engine, large);
      const growth = (b.maxRssMB - a.maxRssMB) / a.maxRssMB;
      return {
        rate: b.maxRssMB,
        detail: `${a.maxRssMB.toFixed(0)} MB at ${small.toExponential(0)} shots (${a.seconds.toFixed(1)} s), ${b.maxRssMB.toFixed(0)} MB at ${large.toExponential(0)} (${b.seconds.toFixed(1)} s): growth ${(100 * growth).toFixed(1)} % (target < 400 MB, within 10 %)`,
      };
    },
  };
}

export const cases: BenchCase[] = [
  {
    name: 'trace engine, 2 workers',
    unit: 'samples/s',
    baseline: 'numpy-trace',
    baselineField: 'samples_per_s',
    async run() {
      const scenario = benchWorkload();
      const samples = compilePoint(scenario).grid.samples;
      const pool = workerPoolExecutor(2);
      const tasks: BatchTask[] = Array.from({ length: 32 }, (_, i) => ({ point: 0, purpose: 'score', batch: i, count: scenario.batchSize, engine: 'traces' }));
      const points = [{ parameters: {}, scenario }];
      try {
        const rate = await measureRate(async () => {
          let n = 0;
          for await (const b of pool.run(points, tasks)) n += b.count;
          return n * samples;
        }, 4, 2);
        traceShots.twoWorkers = rate / samples;
        return { rate, detail: `${samples} samples per shot, ${(rate / samples / 1e3).toFixed(1)} k shots/s` };
      } finally {
        await pool.close();
      }
    },
  },
  {
    name: 'exact engine, 1 core (engine + scoring + tallies, as run --no-shots-table)',
    unit: 'shots/s',
    baseline: 'numpy-exact',
    baselineField: 'shots_per_s',
    async run() {
      const rate = await exactRate(() => inProcessExecutor(), 4);
      traceShots.oneCore = await traceShotRate(3);
      return { rate, detail: ratioDetail(rate, traceShots.oneCore, 'on one core') };
    },
  },
  {
    name: 'exact engine, 2 workers (engine + scoring + tallies, as run --no-shots-table --workers 2)',
    unit: 'shots/s',
    baseline: 'numpy-exact',
    baselineField: 'shots_per_s',
    async run() {
      const pool = workerPoolExecutor(2);
      try {
        // the pool is closed by runPoints after each run; keep it alive across runs
        const shared: BatchExecutor = { run: (p, t) => pool.run(p, t) };
        const rate = await exactRate(() => shared, 4);
        return { rate, detail: `${ratioDetail(rate, traceShots.twoWorkers, 'on 2 workers')}; ${(rate / 2e6).toFixed(1)} M shots/s per core` };
      } finally {
        await pool.close();
      }
    },
  },
  {
    name: 'seeding-block stream jump (BlockStreams.advanceInto)',
    unit: 'shots/s',
    async run() {
      const blocks = new BlockStreams(1, 0, 'score', 0);
      const stream = blocks.current();
      const perSecond = await measureRate(() => {
        for (let i = 0; i < 1000; i++) blocks.advanceInto(stream);
        return 1000;
      }, 2, 0.5);
      return { rate: perSecond * 1024, detail: `${(1e6 / perSecond).toFixed(3)} µs per jump = ${(1e9 / perSecond / 1024).toFixed(3)} ns per shot (one jump per 1024-shot block)` };
    },
  },
  rssCase('traces', 1e5, 1e6),
  rssCase('exact', 1e6, 1e8),
];
