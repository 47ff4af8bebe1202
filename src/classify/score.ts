/**
 * Scoring a batch: project each pipeline's I/Q, decide (threshold on the projected value, or a
 * classifier's own statistic of the shot's decimated bins, e.g. the log-odds), compare with the intended
 * state's outcome, and attribute every wrong shot to its cause. Shots inside a pipeline's
 * ambiguous band are flagged as discarded; their outcome and cause stay those of the plain
 * decision, so the error, the budget comparison and the paired comparisons are of the unbanded
 * rule, and the band's effect is reported beside them (summary.ts).
 *
 * Attribution uses the pipeline's own window: a first jump after the last sample the pipeline
 * reads is not its cause (pipeline windows end inside the timing window, so the batch's jump
 * cause already covers every jump that could be).
 */
import { attributeCause, CAUSE_NONE } from '../analysis/causes.ts';
import { classifyAllByThreshold } from './threshold.ts';
import { project } from './project.ts';
import type { PipelineCalibration } from './calibrate.ts';
import { projectRecords } from './project.ts';
import type { PipelineSpec, StateSpec } from '../scenario/types.ts';
import type { PipelineChain } from '../dsp/pipeline-chain.ts';
import type { BinStatistic } from './contract.ts';
import type { ShotColumns } from './shots.ts';
import { classifierOf } from './registry.ts';

/** What scoring reads of a compiled point (engine/compile-point.ts's CompiledPoint has it). */
export interface ScoringView {
  scenario: { states: readonly Pick<StateSpec, 'outcome'>[] };
  grid: { sampleRate: number; windowHi: number };
  pipelines: readonly { spec: PipelineSpec; chain: PipelineChain }[];
}

/** The statistic of each fitted model, built once (the calibration keeps the model as plain data). */
const statistics = new WeakMap<object, BinStatistic>();

/** Per pipeline: projected value, reported outcome index and cause code of every shot. */
export interface ScoredPipeline {
  projected: Float64Array;
  outcome: Uint8Array;
  /** Cause of the plain decision's error (CAUSE_NONE when right), also for discarded shots. */
  cause: Uint8Array;
  /** 1 where the shot fell inside the ambiguous band; null when the pipeline has no band. */
  discarded: Uint8Array | null;
  /** The classifier's own decision statistic per shot when it reads bins (e.g. the posterior log-odds), else null. */
  statistic: Float64Array | null;
  /** Cause code of the first jump if it happened before this pipeline's window end (else 0). */
  jumpCause: Uint8Array;
}

export function scoreBatch(point: ScoringView, calibrations: readonly PipelineCalibration[], batch: ShotColumns): ScoredPipeline[] {
  const outcomeOf = point.scenario.states.map((s) => s.outcome);
  const fs = point.grid.sampleRate;
  const scenarioEnd = point.grid.windowHi;
  return calibrations.map((cal, p) => {
    const v = batch.values[p]!;
    const chain = point.pipelines[p]!.chain;
    const projected = project(v.inPhase, v.quadrature, cal.axis, new Float64Array(batch.count));
    let statistic = projected;
    let own: Float64Array | null = null;
    const classifier = classifierOf(point.pipelines[p]!.spec);
    if (classifier.readsBins) {
      const kept = batch.records?.[p];
      if (!kept) throw new Error(`pipeline "${point.pipelines[p]!.spec.name}": scored batch carries no decimated records for the ${classifier.name} classifier`);
      const bins = projectRecords(kept.inPhase, kept.quadrature, cal.axis);
      const model = cal.model as object;
      let decide = statistics.get(model);
      if (!decide) {
        decide = classifier.statistic!(model);
        statistics.set(model, decide);
      }
      own = new Float64Array(batch.count);
      for (let i = 0; i < batch.count; i++) own[i] = decide(bins, i * kept.bins, kept.bins);
      statistic = own;
    }
    const outcome = classifyAllByThreshold(statistic, cal.rule.threshold, cal.rule.highIsOne);
    let discarded: Uint8Array | null = null;
    if (chain.band !== null) {
      discarded = new Uint8Array(batch.count);
      const t = cal.rule.threshold, h = cal.bandHalfWidth;
      for (let i = 0; i < batch.count; i++) discarded[i] = Math.abs(statistic[i]! - t) < h ? 1 : 0;
    }
    let jumpCause = batch.jumpCause;
    if (chain.processHi !== scenarioEnd) {
      const last = (chain.processHi - 1) / fs;
      jumpCause = new Uint8Array(batch.count);
      for (let i = 0; i < batch.count; i++) if (batch.jumpCause[i] !== 0 && batch.firstJump[i]! <= last) jumpCause[i] = batch.jumpCause[i]!;
    }
    const cause = new Uint8Array(batch.count);
    for (let i = 0; i < batch.count; i++) {
      const intended = batch.intended[i]!;
      cause[i] = outcome[i] === outcomeOf[intended]
        ? CAUSE_NONE
        : attributeCause(intended, batch.prepared[i]!, batch.initial[i]!, jumpCause[i]! !== 0, jumpCause[i]!);
    }
    return { projected, outcome, cause, discarded, statistic: own, jumpCause };
  });
}
