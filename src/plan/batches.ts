/**
 * The fixed division of each point's shots into batches. Batch b holds shots
 * [b·batchSize, (b+1)·batchSize) and has its own random stream, so any subset of batches, in any
 * process, reproduces exactly the same shots. Shards take contiguous runs of batches.
 */
import type { StreamPurpose } from '../random/streams.ts';
import type { FusedScoring } from './exact-fused.ts';
import type { Scenario } from '../scenario/types.ts';

export interface BatchTask {
  point: number;
  purpose: StreamPurpose;
  batch: number;
  count: number;
  /** Engine that runs it (plan/engine.ts); default the trace engine. */
  engine?: 'exact' | 'traces';
  /**
   * Exact engine only: score and tally the shots where they are simulated and return a
   * TalliedBatch instead of the per-shot columns (exact-fused.ts; runs without a shots table).
   */
  scoring?: FusedScoring;
}

/** Number of batches of a point for a purpose. */
export function batchCount(scenario: Scenario, purpose: StreamPurpose): number {
  const shots = purpose === 'calibrate' ? scenario.calibrationShots : scenario.shots;
  return Math.ceil(shots / scenario.batchSize);
}

/** The range of batches [first, end) that shard K of N runs. */
export function shardRange(batches: number, shard?: { index: number; count: number }): [number, number] {
  if (!shard) return [0, batches];
  return [Math.floor((shard.index * batches) / shard.count), Math.floor(((shard.index + 1) * batches) / shard.count)];
}

export function batchPlan(scenario: Scenario, point: number, purpose: StreamPurpose, shard?: { index: number; count: number }): BatchTask[] {
  const shots = purpose === 'calibrate' ? scenario.calibrationShots : scenario.shots;
  const n = batchCount(scenario, purpose);
  const [first, end] = shardRange(n, shard);
  const tasks: BatchTask[] = [];
  for (let b = first; b < end; b++) {
    tasks.push({ point, purpose, batch: b, count: Math.min(scenario.batchSize, shots - b * scenario.batchSize) });
  }
  return tasks;
}
