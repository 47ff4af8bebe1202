/**
 * One pipeline run on a lab's records as a run runs it on simulated shots: calibrate on the
 * calibration rows (classify/calibrate.ts, the same code a run calibrates with: separation axis,
 * matched or optimal weights, a classifier's model, the decision rule and the ambiguous band),
 * then decide every row with the calibrated chain (classify/score.ts) and tally the labelled rows
 * that did not calibrate (analysis/tally.ts) into the summary a run writes (analysis/summary.ts).
 *
 * What records cannot say is left out, not guessed: there is no analytic budget (NaN), no cause
 * of an error, and no known clean shot — the SNR and σ come from the clean centres and σ fitted to
 * the labelled groups (analysis/value-mixture-fit.ts: two Gaussians and the ramp of records that
 * changed state) instead of a run's clean shots.
 */
import { compileChain, type PipelineChain, type RecordCarrier } from '../dsp/pipeline-chain.ts';
import { calibrate, type PipelineCalibration } from '../classify/calibrate.ts';
import { scoreBatch } from '../classify/score.ts';
import { classifierOf } from '../classify/registry.ts';
import { addToTally, emptyTally, type TallyInput } from '../analysis/tally.ts';
import { summarise, type PointSummary } from '../analysis/summary.ts';
import { unavailableBudget } from '../analysis/budget.ts';
import { fitValueMixture } from '../analysis/value-mixture-fit.ts';
import { makeRecordedScratch, recordedBatch, type RecordRows } from '../engine/recorded/batch.ts';
import type { Grid } from '../signal/grid.ts';
import type { PipelineSpec } from '../scenario/types.ts';
import { checkpoint } from './interrupt.ts';

/** Rows decided between two chances to stop (and per batch of the recorded engine). */
const ROWS_PER_BATCH = 4096;

/** How the pipeline is calibrated. */
export type CalibrationPlan =
  /** From these rows (labelled); they are decided but never tallied. */
  | { kind: 'rows'; rows: Uint8Array }
  /** As given (a stored calibration, or a fixed rule needing none). */
  | { kind: 'given'; calibration: PipelineCalibration; referencePhase: number };

export interface RecordAnalysisInput {
  source: RecordRows & { rows: number };
  /** Each row's labelled outcome (255: unlabelled), or null. */
  labels: Uint8Array | null;
  outcomes: readonly [string, string];
  spec: PipelineSpec;
  grid: Grid;
  carrier: RecordCarrier & { phase: number };
  plan: CalibrationPlan;
  signal?: AbortSignal;
}

/** Per-row columns of the analysis (every row, calibration rows too). */
export interface RecordDecisions {
  inPhase: Float64Array;
  quadrature: Float64Array;
  /** The integrated value projected on the separation axis. */
  value: Float64Array;
  /** The classifier's own statistic where it reads the bins (e.g. log-odds), else null. */
  statistic: Float64Array | null;
  outcome: Uint8Array;
  discarded: Uint8Array;
}

export interface RecordAnalysis {
  chain: PipelineChain;
  referencePhase: number;
  calibration: PipelineCalibration;
  calibrationRows: number;
  /** 1 where the row calibrated (null: nothing was calibrated from rows). */
  calibrationMask: Uint8Array | null;
  decisions: RecordDecisions;
  /** The summary of the labelled rows that did not calibrate (null without labels). */
  summary: PointSummary | null;
}

/** The reference phase for `auto`: the records' carrier phase (the axis then comes from calibration). */
function referencePhaseOf(spec: PipelineSpec, carrier: { phase: number }): number {
  return spec.referencePhase === 'auto' ? carrier.phase : spec.referencePhase;
}

/** Runs the analysis; see the file comment. */
export async function analyzeRecords(a: RecordAnalysisInput): Promise<RecordAnalysis> {
  const { source, spec, grid, carrier } = a;
  const classifier = classifierOf(spec);
  const states = a.outcomes.map((_, o) => ({ outcome: o }));
  let calibration: PipelineCalibration;
  let referencePhase: number;
  let calibrating: Uint8Array | null = null;
  if (a.plan.kind === 'rows') {
    calibrating = a.plan.rows;
    referencePhase = referencePhaseOf(spec, carrier);
    const chain = compileChain(spec, grid, carrier, referencePhase);
    const pipelines = [{ chain, keepBins: classifier.readsBins || chain.weights !== 'boxcar' }];
    const rows: number[] = [];
    for (let r = 0; r < source.rows; r++) if (calibrating[r]) rows.push(r);
    const scratch = makeRecordedScratch(source, pipelines);
    const batches = [];
    for (let from = 0; from < rows.length; from += ROWS_PER_BATCH) {
      await checkpoint(a.signal);
      batches.push(recordedBatch(source, pipelines, rows.slice(from, from + ROWS_PER_BATCH), a.labels, scratch));
    }
    const view = { scenario: { states }, pipelines: [{ spec, chain, kernels: { quadrature: chain.reference ? new Float64Array(0) : null } }] };
    calibration = calibrate(view, batches, null)[0]!;
  } else {
    calibration = a.plan.calibration;
    referencePhase = a.plan.referencePhase;
  }

  // decide every row with the calibrated chain
  const chain = compileChain(spec, grid, carrier, referencePhase, calibration.weights);
  const pipelines = [{ chain, keepBins: classifier.readsBins }];
  const view = { scenario: { states }, grid: { sampleRate: grid.sampleRate, windowHi: chain.processHi }, pipelines: [{ spec, chain }] };
  const n = source.rows;
  const d: RecordDecisions = {
    inPhase: new Float64Array(n), quadrature: new Float64Array(n), value: new Float64Array(n),
    statistic: classifier.readsBins ? new Float64Array(n) : null, outcome: new Uint8Array(n), discarded: new Uint8Array(n),
  };
  const scratch = makeRecordedScratch(source, pipelines);
  const tally = emptyTally(2, 2);
  const tallied: [number[], number[]] = [[], []];
  for (let from = 0; from < n; from += ROWS_PER_BATCH) {
    await checkpoint(a.signal);
    const rows = Array.from({ length: Math.min(ROWS_PER_BATCH, n - from) }, (_, j) => from + j);
    const batch = recordedBatch(source, pipelines, rows, a.labels, scratch);
    const scored = scoreBatch(view, [calibration], batch)[0]!;
    d.inPhase.set(batch.values[0]!.inPhase, from);
    d.quadrature.set(batch.values[0]!.quadrature, from);
    d.value.set(scored.projected, from);
    if (d.statistic && scored.statistic) d.statistic.set(scored.statistic, from);
    d.outcome.set(scored.outcome, from);
    if (scored.discarded) d.discarded.set(scored.discarded, from);
    if (!a.labels) continue;
    // tally the labelled rows that did not calibrate; a record's error has no known cause
    const keep = rows.map((r, j) => (a.labels![r] !== 255 && !calibrating?.[r] ? j : -1)).filter((j) => j >= 0);
    const pick = (x: Uint8Array) => Uint8Array.from(keep, (j) => x[j]!);
    const input: TallyInput = {
      count: keep.length, intended: pick(batch.intended), prepared: pick(batch.prepared), initial: pick(batch.initial),
      jumpCause: new Uint8Array(keep.length), projected: Float64Array.from(keep, (j) => scored.projected[j]!),
      outcome: pick(scored.outcome), cause: new Uint8Array(keep.length), discarded: scored.discarded ? pick(scored.discarded) : null,
    };
    addToTally(tally, input);
    for (const j of keep) tallied[batch.intended[j]!]!.push(scored.projected[j]!);
  }
  const calibrationRows = calibrating ? calibrating.reduce((s, x) => s + x, 0) : 0;
  const summary = a.labels
    ? summarise(spec.name, a.outcomes, [0, 1], [0.5, 0.5], tally, unavailableBudget(2), calibration.rule.threshold, calibration.rule.highIsOne,
      chain.band !== null, fitValueMixture([Float64Array.from(tallied[0]), Float64Array.from(tallied[1])]))
    : null;
  return { chain, referencePhase, calibration, calibrationRows, calibrationMask: calibrating, decisions: d, summary };
}
