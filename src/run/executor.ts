/**
 * How batch tasks are run: an executor takes the points' plans and a task list, and yields the
 * results in task order, on this thread or on workers (pool.ts).
 */
import type { ShotBatch } from '../engine/trace/batch.ts';
import type { TalliedBatch } from '../engine/exact/fused.ts';
import type { PointPlan } from '../engine/point-plan.ts';
import type { TaskList } from './batches.ts';
import { TaskRunner } from './task-runner.ts';

/**
 * Runs batch tasks and yields their results in task order (in-process or on workers): a
 * ShotBatch, or a TalliedBatch for a task with `scoring` (engine/exact/fused.ts).
 */
export interface BatchExecutor {
  run(points: readonly PointPlan[], tasks: TaskList): AsyncIterable<ShotBatch | TalliedBatch>;
  close?(): Promise<void>;
}

/** Runs tasks one after another on this thread; compiled points are kept across runs while their plans stay the same. */
export function inProcessExecutor(): BatchExecutor {
  let runner: TaskRunner | null = null;
  return {
    async *run(points, tasks) {
      if (runner) runner.setPlans(points);
      else runner = new TaskRunner(points);
      for (let i = 0; i < tasks.length; i++) yield runner.run(tasks.at(i)!);
    },
  };
}
