import { compilePoint } from '../src/engine/compile-point.ts';
import { makeScratch, simulateBatch } from '../src/engine/trace/batch.ts';
import type { Scenario } from '../src/scenario/types.ts';
import type { PointPlan } from '../src/engine/point-plan.ts';
/** Types and helpers shared by benchmark cases. */

export interface BenchResult {
  /** Items per second (samples or shots, as `unit` says). */
  rate: number;
  detail?: string;
}

export interface BenchCase {
  name: string;
  unit: 'samples/s' | 'shots/s' | 'MB' | '× a bare Node start';
  /** Name of the numpy baseline the rate is compared with (a bench/*.py script), if any. */
  baseline?: 'numpy-trace' | 'numpy-exact';
  /** Which baseline figure to compare with. */
  baselineField?: 'samples_per_s' | 'shots_per_s';
  run(): Promise<BenchResult>;
}

/** The median of `xs` (the mean of the middle two for an even count). */
export function median(xs: readonly number[]): number {
  const v = [...xs].sort((a, b) => a - b);
  return v.length % 2 ? v[(v.length - 1) / 2]! : (v[v.length / 2 - 1]! + v[v.length / 2]!) / 2;
}

/** Runs `work` repeatedly for about `seconds` after a warm-up; returns items per second. */
export async function measureRate(work: () => number | Promise<number>, seconds = 3, warmup = 1): Promise<number> {
  let t0 = performance.now();
  while (performance.now() - t0 < warmup * 1000) await work();
  let items = 0;
  t0 = performance.now();
  while (performance.now() - t0 < seconds * 1000) items += await work();
  return items / ((performance.now() - t0) / 1000);
}

/**
 * Trace-engine samples/s of several scenarios measured side by side: one batch of each in
 * turn, so that load on the machine hits all alike and their ratios stay meaningful.
 */
export function interleavedTraceRates(plans: readonly (Scenario | PointPlan)[], warmupMs = 2000, measureMs = 8000): number[] {
  const runs = plans.map((plan) => {
    const { scenario, ...options } = 'scenario' in plan ? plan : { scenario: plan };
    const point = compilePoint(scenario, options);
    return { scenario, point, scratch: makeScratch(point), time: 0, samples: 0 };
  });
  let batch = 0;
  const step = () => {
    for (const r of runs) {
      const t0 = performance.now();
      simulateBatch(r.point, 0, 'score', batch % 1000, r.scenario.batchSize, r.scratch);
      r.time += performance.now() - t0;
      r.samples += r.scenario.batchSize * r.point.grid.samples;
    }
    batch++;
  };
  for (const until = performance.now() + warmupMs; performance.now() < until;) step();
  for (const r of runs) { r.time = 0; r.samples = 0; }
  for (const until = performance.now() + measureMs; performance.now() < until;) step();
  return runs.map((r) => r.samples / (r.time / 1000));
}
