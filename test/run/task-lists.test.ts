/**
 * Task lists made on demand (plan/batches.ts): the same tasks, in the same order, as the plain
 * list of every batch, for whole runs, shards and partial last batches, and concatenated over
 * points with empty parts. Exactness of bookkeeping: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { batchCount, batchPlan, ConcatenatedTasks, shardRange, type BatchTask, type TaskList } from '../../src/run/batches.ts';
import { twoStateScenario } from '../support/scenarios.ts';

/** Every batch of a point, written out (the reference). */
function eager(shots: number, batchSize: number, point: number, shard?: { index: number; count: number }): BatchTask[] {
  const [first, end] = shardRange(Math.ceil(shots / batchSize), shard);
  const out: BatchTask[] = [];
  for (let b = first; b < end; b++) out.push({ point, purpose: 'score', batch: b, count: Math.min(batchSize, shots - b * batchSize) });
  return out;
}

const all = (l: TaskList): (BatchTask | undefined)[] => Array.from({ length: l.length }, (_, i) => l.at(i));

describe('task lists', () => {
  it.each([
    [10240, 1024, undefined], [10000, 1024, undefined], [10000, 1024, { index: 0, count: 3 }],
    [10000, 1024, { index: 2, count: 3 }], [1024, 1024, { index: 1, count: 2 }], [5000, 4096, undefined],
  ])('%i shots in batches of %i, shard %o: the same tasks and shot count as the written-out list', (shots, batchSize, shard) => {
    const s = { ...twoStateScenario({ shots }), batchSize };
    const plan = batchPlan(s, 4, 'score', shard);
    const want = eager(shots, batchSize, 4, shard);
    expect(all(plan)).toEqual(want);
    expect(plan.shots).toBe(want.reduce((a, t) => a + t.count, 0));
    expect(plan.at(-1)).toBeUndefined();
    expect(plan.at(plan.length)).toBeUndefined();
    expect(batchCount(s, 'score')).toBe(Math.ceil(shots / batchSize));
  });

  it.each([[1], [3], [16], [100]])('grouped %i batches per task: the same shots, contiguous and in order, at most group·batchSize per task', (group) => {
    const s = { ...twoStateScenario({ shots: 41000 }), batchSize: 1024 };
    for (const shard of [undefined, { index: 1, count: 3 }]) {
      const plain = batchPlan(s, 0, 'score', shard);
      const g = plain.grouped(group);
      const tasks = all(g) as BatchTask[];
      expect(g.length).toBe(Math.ceil(plain.length / group));
      let next = plain.at(0)!.batch * 1024;
      for (const t of tasks) {
        expect(t.batch * 1024, 'contiguous').toBe(next);
        expect(t.count).toBeLessThanOrEqual(group * 1024);
        next += t.count;
      }
      expect(tasks.reduce((a, t) => a + t.count, 0)).toBe(plain.shots);
    }
  });

  it('carries the extra fields and concatenates points in order, skipping empty parts', () => {
    const a = batchPlan({ ...twoStateScenario({ shots: 3000 }), batchSize: 1024 }, 0, 'score').with({ engine: 'exact' });
    const empty = batchPlan({ ...twoStateScenario({ shots: 1024 }), batchSize: 1024 }, 1, 'score', { index: 0, count: 2 });
    const b = batchPlan({ ...twoStateScenario({ shots: 2048 }), batchSize: 1024 }, 2, 'score').with({ engine: 'exact' });
    expect(empty.length).toBe(0);
    const both = new ConcatenatedTasks([empty, a, empty, b, empty]);
    expect(all(both)).toEqual([...all(a), ...all(b)]);
    expect(all(both).every((t) => t?.engine === 'exact')).toBe(true);
    expect(both.at(both.length)).toBeUndefined();
  });
});
