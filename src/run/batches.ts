/**
 * The fixed division of each point's shots into batches. Batch b holds shots
 * [b·batchSize, (b+1)·batchSize) and has its own random stream, so any subset of batches, in any
 * process, reproduces exactly the same shots. Shards take contiguous runs of batches.
 */
import type { StreamPurpose } from '../random/streams.ts';
import type { FusedScoring } from '../engine/exact/fused-scoring.ts';
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

/**
 * Tasks in the order they are handed out, made on demand: a run of 10^10 shots has millions of
 * batches, and a list of them would grow with the shot count (arrays of tasks satisfy it too).
 */
export interface TaskList {
  readonly length: number;
  at(index: number): BatchTask | undefined;
}

/**
 * The batches [first, end) of one point and purpose, each task with `extra` fields (engine,
 * scoring), `group` consecutive batches per task (the last task may hold fewer).
 */
export class PlannedTasks implements TaskList {
  readonly length: number;

  constructor(
    private readonly point: number, private readonly purpose: StreamPurpose, private readonly first: number,
    private readonly end: number, private readonly batchSize: number, private readonly shotsOfPoint: number,
    private readonly extra: Pick<BatchTask, 'engine' | 'scoring'> = {}, private readonly group = 1,
  ) {
    this.length = Math.max(0, Math.ceil((end - first) / group));
  }

  at(index: number): BatchTask | undefined {
    if (!(index >= 0 && index < this.length)) return undefined;
    const b = this.first + index * this.group;
    const last = Math.min(this.end, b + this.group);
    const count = Math.min(last * this.batchSize, this.shotsOfPoint) - b * this.batchSize;
    return { point: this.point, purpose: this.purpose, batch: b, count, ...this.extra };
  }

  /** Shots in these tasks. */
  get shots(): number {
    if (this.end <= this.first) return 0;
    return Math.min(this.shotsOfPoint, this.end * this.batchSize) - this.first * this.batchSize;
  }

  /** The same batches with other extra fields. */
  with(extra: Pick<BatchTask, 'engine' | 'scoring'>): PlannedTasks {
    return new PlannedTasks(this.point, this.purpose, this.first, this.end, this.batchSize, this.shotsOfPoint, extra, this.group);
  }

  /**
   * The same batches, `group` per task: for work whose batches cost little next to handing a
   * task to a worker (the fused exact path). A task's shots then span several batches; the
   * numbers do not change, since they depend on seeding blocks only.
   */
  grouped(group: number): PlannedTasks {
    return new PlannedTasks(this.point, this.purpose, this.first, this.end, this.batchSize, this.shotsOfPoint, this.extra, group);
  }
}

/** Several task lists one after another. */
export class ConcatenatedTasks implements TaskList {
  readonly length: number;
  /** starts[k]: index of list k's first task. */
  private readonly starts: number[] = [];

  constructor(private readonly lists: readonly TaskList[]) {
    let n = 0;
    for (const l of lists) { this.starts.push(n); n += l.length; }
    this.length = n;
  }

  at(index: number): BatchTask | undefined {
    if (!(index >= 0 && index < this.length)) return undefined;
    // the last list starting at or before index (binary search; lists may be empty)
    let lo = 0, hi = this.lists.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.starts[mid]! <= index) lo = mid;
      else hi = mid - 1;
    }
    return this.lists[lo]!.at(index - this.starts[lo]!);
  }
}

/** The batches of one point and purpose (a shard's part when given), as tasks made on demand. */
export function batchPlan(scenario: Scenario, point: number, purpose: StreamPurpose, shard?: { index: number; count: number }): PlannedTasks {
  const shots = purpose === 'calibrate' ? scenario.calibrationShots : scenario.shots;
  const [first, end] = shardRange(batchCount(scenario, purpose), shard);
  return new PlannedTasks(point, purpose, first, end, scenario.batchSize, shots);
}
