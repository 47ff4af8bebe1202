/**
 * Worker threads: a run on 2 workers writes byte-identical tables to a run on this thread, for
 * both engines; the pool yields batches in task order with the same contents as in-process, and
 * an error inside a worker reaches the caller (an InputError stays one).
 */
import { mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { inProcessExecutor } from '../../src/run/executor.ts';
import { reviveError, transferables, workerPoolExecutor } from '../../src/run/pool.ts';
import type { BatchTask } from '../../src/run/batches.ts';
import type { ShotBatch } from '../../src/engine/trace/batch.ts';
import { InputError } from '../../src/errors.ts';
import { twoStateScenario } from '../support/scenarios.ts';

const SWEEP = 'test/fixtures/scenarios/shard-sweep.yaml';
const pools: { close(): Promise<void> }[] = [];
afterAll(async () => { await Promise.all(pools.map((p) => p.close())); });

function fresh(): string {
  return mkdtempSync(join(tmpdir(), 'singleshot-workers-'));
}

describe('workers', () => {
  it.each(['exact', 'traces'] as const)('engine %s: 1 and 2 workers give byte-identical tables', async (engine) => {
    const one = fresh(), two = fresh();
    await runToDirectory({ scenarioPath: SWEEP, outDir: one, engine, workers: 1, report: false });
    await runToDirectory({ scenarioPath: SWEEP, outDir: two, engine, workers: 2, report: false });
    const files = readdirSync(one).sort();
    expect(readdirSync(two).sort()).toEqual(files);
    for (const f of files) expect(readFileSync(join(two, f)).equals(readFileSync(join(one, f))), f).toBe(true);
  }, 60_000);

  it('the pool yields every batch in task order, equal to the in-process result', async () => {
    const scenario = twoStateScenario({ t1: 5e-6, recordLength: 2e-6, sampleRate: 20e6, shots: 8192 });
    const points = [{ parameters: {}, scenario }];
    // mixed engines and purposes, out of batch order, so the order can only come from the tasks
    const tasks: BatchTask[] = [5, 0, 3, 7, 1, 6, 2, 4].map((batch, i) => ({
      point: 0, purpose: i % 3 === 0 ? 'calibrate' : 'score', batch, count: 1024, engine: i % 2 ? 'exact' : 'traces',
    }));
    const pool = workerPoolExecutor(2, { perWorker: 1 });
    pools.push(pool);
    const got: ShotBatch[] = [];
    for await (const b of pool.run(points, tasks)) got.push(b as ShotBatch); // tasks without scoring: per-shot batches
    const want: ShotBatch[] = [];
    for await (const b of inProcessExecutor().run(points, tasks)) want.push(b as ShotBatch);
    expect(got.map((b) => [b.purpose, b.batch])).toEqual(tasks.map((t) => [t.purpose, t.batch]));
    got.forEach((b, i) => {
      expect(Array.from(b.intended), `task ${i}`).toEqual(Array.from(want[i]!.intended));
      expect(Array.from(b.values[0]!.inPhase), `task ${i}`).toEqual(Array.from(want[i]!.values[0]!.inPhase));
      expect(Array.from(b.values[0]!.quadrature), `task ${i}`).toEqual(Array.from(want[i]!.values[0]!.quadrature));
    });
  }, 60_000);

  it('an error in a worker rejects the run', async () => {
    const pool = workerPoolExecutor(1);
    pools.push(pool);
    const scenario = twoStateScenario({ shots: 1024 });
    const run = async () => {
      for await (const _ of pool.run([{ scenario }], [{ point: 3, purpose: 'score' as const, batch: 0, count: 1024 }])) void _;
    };
    await expect(run()).rejects.toThrow(/point 3, which the runner does not have/);
  }, 30_000);

  it('errors keep their kind across threads; batches transfer each buffer once', () => {
    const e = reviveError({ name: 'InputError', message: 'a.yaml: x: expected y, found z', file: 'a.yaml', path: 'x' });
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toBe('a.yaml: x: expected y, found z');
    const shared = new Float64Array(8);
    const list = transferables({ a: shared, b: shared.subarray(2), c: [new Uint8Array(3)], d: { e: 1 } });
    expect(list).toHaveLength(2);
  });
});
