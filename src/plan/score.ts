/**
 * Scoring a batch: project each pipeline's I/Q, apply its calibrated threshold, compare with
 * the intended state's outcome, and attribute every wrong shot to its cause.
 */
import { attributeCause, CAUSE_NONE } from '../analysis/causes.ts';
import { classifyAllByThreshold } from '../classify/threshold.ts';
import { project } from '../classify/project.ts';
import type { ShotBatch } from './batch.ts';
import type { PipelineCalibration } from './calibrate.ts';
import type { CompiledPoint } from './compile.ts';

/** Per pipeline: projected value, reported outcome index and cause code of every shot. */
export interface ScoredPipeline {
  projected: Float64Array;
  outcome: Uint8Array;
  cause: Uint8Array;
}

export function scoreBatch(point: CompiledPoint, calibrations: readonly PipelineCalibration[], batch: ShotBatch): ScoredPipeline[] {
  const outcomeOf = point.scenario.states.map((s) => s.outcome);
  return calibrations.map((cal, p) => {
    const v = batch.values[p]!;
    const projected = project(v.inPhase, v.quadrature, cal.axis, new Float64Array(batch.count));
    const outcome = classifyAllByThreshold(projected, cal.rule.threshold, cal.rule.highIsOne);
    const cause = new Uint8Array(batch.count);
    for (let i = 0; i < batch.count; i++) {
      const intended = batch.intended[i]!;
      cause[i] = outcome[i] === outcomeOf[intended]
        ? CAUSE_NONE
        : attributeCause(intended, batch.prepared[i]!, batch.initial[i]!, batch.jumpCause[i]! !== 0, batch.jumpCause[i]!);
    }
    return { projected, outcome, cause };
  });
}
