/**
 * Example records for the report: a few shots of one point re-simulated on the point's own
 * 'aux' stream (never the scored shots' streams), with the whole record synthesised, so that
 * the same scenario always shows the same examples. One clean shot per intended state and,
 * where the chain has jumps, a shot whose first jump falls inside the window (preferably a
 * relaxation near the window's middle).
 */
import { CAUSE_RELAXATION } from '../../analysis/causes.ts';
import { SEED_BLOCK } from '../../random/streams.ts';
import { makeScratch, simulateBatch } from './batch.ts';
import type { CompiledPoint } from '../compile-point.ts';
import { project, type Axis } from '../../classify/project.ts';

/** One example shot: its history and its raw record over the whole record. */
export interface ExampleShot {
  /** What the shot shows: "clean" or "jump in window". */
  kind: 'clean' | 'jump';
  intended: number;
  /** State at the record start (after preparation and mapping). */
  initial: number;
  atWindowEnd: number;
  /** Time of the first jump (s), NaN if none. */
  firstJump: number;
  /** Cause code of the first jump if it touched the window (0 otherwise). */
  jumpCause: number;
  /** Per pipeline: the integrated I and Q. */
  values: { inPhase: number; quadrature: number }[];
  record: Float64Array;
}

/** Seeding blocks searched for a shot with a jump in the window. */
export const EXAMPLE_BLOCKS = 16;

/** The point with the whole record synthesised (the kernels still read only their support). */
function wholeRecord(point: CompiledPoint): CompiledPoint {
  return { ...point, synthLo: 0, synthHi: point.grid.samples };
}

/** Re-runs shots 0 … i of seeding block `block` so that the scratch record holds shot i; returns that shot. */
function shotAt(point: CompiledPoint, pointIndex: number, block: number, i: number, kind: ExampleShot['kind']): ExampleShot {
  const scratch = makeScratch(point);
  const b = simulateBatch(point, pointIndex, 'aux', block, i + 1, scratch);
  return {
    kind, intended: b.intended[i]!, initial: b.initial[i]!, atWindowEnd: b.atWindowEnd[i]!,
    firstJump: b.firstJump[i]!, jumpCause: b.jumpCause[i]!,
    values: b.values.map((v) => ({ inPhase: v.inPhase[i]!, quadrature: v.quadrature[i]! })),
    record: Float64Array.from(scratch.record),
  };
}

/** Example shots of a compiled point (deterministic for a scenario and point index). */
export function exampleShots(compiled: CompiledPoint, pointIndex: number): ExampleShot[] {
  const point = wholeRecord(compiled);
  const sc = point.scenario;
  const fs = point.grid.sampleRate;
  const windowStart = point.grid.windowLo / fs;
  const windowEnd = (point.grid.windowHi - 1) / fs;
  const middle = (windowStart + windowEnd) / 2;
  // batches of one seeding block, so that batch index = block index
  const oneBlock: CompiledPoint = { ...point, scenario: { ...sc, batchSize: SEED_BLOCK } };
  const scratch = makeScratch(oneBlock);
  const out: ExampleShot[] = [];
  const first = simulateBatch(oneBlock, pointIndex, 'aux', 0, SEED_BLOCK, scratch);
  sc.states.forEach((_, s) => {
    for (let i = 0; i < first.count; i++) {
      const clean = first.intended[i] === s && first.prepared[i] === s && first.initial[i] === s && first.jumpCause[i] === 0;
      if (clean) {
        out.push(shotAt(oneBlock, pointIndex, 0, i, 'clean'));
        return;
      }
    }
  });
  if (sc.transitions.length === 0) return out;
  let best: { block: number; i: number; score: number } | null = null;
  for (let block = 0; block < EXAMPLE_BLOCKS && best === null; block++) {
    const b = block === 0 ? first : simulateBatch(oneBlock, pointIndex, 'aux', block, SEED_BLOCK, scratch);
    for (let i = 0; i < b.count; i++) {
      const t = b.firstJump[i]!;
      if (!(t > windowStart && t <= windowEnd) || b.prepared[i] !== b.intended[i] || b.initial[i] !== b.prepared[i]) continue;
      // prefer relaxation, then a jump near the window's middle
      const score = (b.jumpCause[i] === CAUSE_RELAXATION ? 0 : 1) + Math.abs(t - middle) / (windowEnd - windowStart + 1 / fs);
      if (best === null || score < best.score) best = { block, i, score };
    }
  }
  if (best) out.push(shotAt(oneBlock, pointIndex, best.block, best.i, 'jump'));
  return out;
}

/** Shots re-simulated for a histogram when the run wrote no shots table. */
export const FALLBACK_BLOCKS = 16;

/** Integrated values per intended state from re-simulated 'aux' shots (when no shots table exists). */
export function resimulatedValues(c: CompiledPoint, pointIndex: number, pipeline: number, axis: Axis): Float64Array[] {
  const parts: number[][] = c.scenario.states.map(() => []);
  const oneBlock: CompiledPoint = { ...c, scenario: { ...c.scenario, batchSize: SEED_BLOCK } };
  const scratch = makeScratch(oneBlock);
  // blocks far from those the examples use, so the two never share shots
  for (let b = 0; b < FALLBACK_BLOCKS; b++) {
    const batch = simulateBatch(oneBlock, pointIndex, 'aux', 1024 + b, SEED_BLOCK, scratch);
    const v = batch.values[pipeline]!;
    const projected = project(v.inPhase, v.quadrature, axis, new Float64Array(batch.count));
    for (let i = 0; i < batch.count; i++) parts[batch.intended[i]!]!.push(projected[i]!);
  }
  return parts.map((p) => Float64Array.from(p));
}
