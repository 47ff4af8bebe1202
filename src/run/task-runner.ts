/**
 * Running one batch task with the engine it names, with per-point compiled tables and scratch
 * kept across tasks (shared by the in-process executor and the worker threads).
 */
import { ScenarioProblem } from '../errors.ts';
import { makeScratch, simulateBatch, type BatchScratch, type ShotBatch } from '../engine/trace/batch.ts';
import type { BatchTask } from './batches.ts';
import { compilePoint, type CompiledPoint } from '../engine/compile-point.ts';
import { makeExactScratch, simulateExactBatch, type ExactScratch } from '../engine/exact/batch.ts';
import { simulateTalliedBatch, type TalliedBatch } from '../engine/exact/fused.ts';
import type { PointPlan } from '../engine/point-plan.ts';

/** How many points' compiled tables a runner keeps (tasks arrive in point order). */
const KEPT_POINTS = 4;

interface Entry {
  plan: PointPlan;
  compiled: CompiledPoint;
  traces?: BatchScratch;
  exact?: ExactScratch;
}

/** Runs tasks of a set of points; compiles a point on first use and keeps the last few. */
export class TaskRunner {
  private readonly kept = new Map<number, Entry>();

  constructor(private plans: readonly PointPlan[]) {}

  /** Replaces the points (e.g. the scored plans after calibration); drops cached tables whose plan changed. */
  setPlans(plans: readonly PointPlan[]): void {
    this.plans = plans;
    for (const [i, e] of this.kept) if (!plans[i] || !samePlan(plans[i]!, e.plan)) this.kept.delete(i);
  }

  private entry(point: number): Entry {
    let e = this.kept.get(point);
    const plan = this.plans[point];
    if (e && plan && samePlan(plan, e.plan)) {
      this.kept.delete(point);
      this.kept.set(point, e); // most recently used last
      return e;
    }
    if (!plan) throw new Error(`task for point ${point}, which the runner does not have`);
    e = { plan, compiled: compilePoint(plan.scenario, plan) };
    this.kept.set(point, e);
    while (this.kept.size > KEPT_POINTS) this.kept.delete(this.kept.keys().next().value!);
    return e;
  }

  run(t: BatchTask): ShotBatch | TalliedBatch {
    try {
      return this.runTask(t);
    } catch (e) {
      // a problem of the scenario says at which point it showed
      if (e instanceof ScenarioProblem && e.point === null) e.point = t.point;
      throw e;
    }
  }

  private runTask(t: BatchTask): ShotBatch | TalliedBatch {
    const e = this.entry(t.point);
    if (t.engine === 'exact') {
      e.exact ??= makeExactScratch(e.compiled);
      if (t.scoring) return simulateTalliedBatch(e.compiled, t.point, t.purpose, t.batch, t.count, t.scoring, e.exact);
      return simulateExactBatch(e.compiled, t.point, t.purpose, t.batch, t.count, e.exact);
    }
    e.traces ??= makeScratch(e.compiled);
    return simulateBatch(e.compiled, t.point, t.purpose, t.batch, t.count, e.traces);
  }
}

/** Whether two plans compile to the same point: the same scenario object, weights and kept traces. */
function samePlan(a: PointPlan, b: PointPlan): boolean {
  if (a === b) return true;
  if (a.scenario !== b.scenario || a.keepTraces !== b.keepTraces) return false;
  const wa = a.weights ?? [], wb = b.weights ?? [];
  const n = Math.max(wa.length, wb.length);
  for (let i = 0; i < n; i++) if ((wa[i] ?? null) !== (wb[i] ?? null)) return false;
  return true;
}
