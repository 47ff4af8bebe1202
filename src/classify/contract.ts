/**
 * The classifier contract. A classifier is one file that says, in one object:
 * - what it reads of each shot: the pipeline's integrated (projected, weighted) value, or the
 *   decimated record (`readsBins`), and which scenario keys do not apply to it;
 * - whether the exact engine may run it, and whether recorded traces alone can calibrate it;
 * - how it calibrates: a model fitted from the labelled calibration records (plain data, saved
 *   with the calibration for shards and `analyze`), the decision statistic it builds from that
 *   model, and the decision rule on its statistic;
 * - its analytic budget where one exists.
 * The registry (registry.ts) lists them; calibration, scoring, the engines' choice of what to
 * keep per shot, the engine choice and the budget ask the classifier, never its name.
 */
import type { Scenario, ThresholdSpec } from '../scenario/types.ts';
import type { Budget, BudgetInput } from '../analysis/budget.ts';
import type { NoisePlan } from '../signal/noise-plan.ts';
import type { PipelineChain } from '../dsp/pipeline-chain.ts';
import type { ThresholdRule } from './threshold.ts';
import type { Axis } from './project.ts';
import type { CalibrationRecords } from './calibrate-records.ts';

/** What a classifier may use of the simulated device (absent for recorded traces). */
export interface DeviceView {
  scenario: Pick<Scenario, 'states' | 'transitions' | 'prepare' | 'preparationError' | 'mappingError'>;
  grid: { sampleRate: number; samples: number };
  /** Noise-free record of each state (carrier and gain included). */
  waveforms: readonly Float64Array[];
}

/** A decision statistic of one record's projected bins [offset, offset + count); allocates nothing. */
export type BinStatistic = (bins: Float64Array, offset: number, count: number) => number;

/** A kind of classifier (see the file comment). `Model` is its fitted model: plain data. */
export interface ClassifierKind<Model = unknown> {
  /** Its word in the scenario (`classifier: …`). */
  name: string;
  /** What it does, for the scenario's schema. */
  description: string;
  /** It reads each shot's decimated record; otherwise it decides on the pipeline's integrated value. */
  readsBins: boolean;
  /**
   * Whether its statistic (and so its threshold and σ) is in the signal's unit — the integrated
   * value or a bin of the record; false for a dimensionless statistic such as a log-odds.
   */
  signalUnitStatistic: boolean;
  /** Scenario keys that do not apply to it, each with the reason shown. */
  refuses: { threshold?: string; weights?: string; bandWidth?: string };
  /** Why the exact engine cannot run it (shown to the user), or null when it can. */
  exactBlocker: string | null;
  /** Why recorded traces alone cannot calibrate it (`analyze`), or null when they can. */
  needsDevice: string | null;
  /** Why it cannot work on a record without noise (it divides by the noise), or null when it can. */
  needsNoise: string | null;
  /** Fits its model from labelled calibration records (kinds that read bins); `device` is null for recorded traces. */
  fit?(records: CalibrationRecords, chain: PipelineChain, axis: Axis, device: DeviceView | null): Model;
  /** What is wrong with a model read back from a file (a stored calibration), or null when it is whole (kinds with a model). */
  modelProblem?(model: unknown): string | null;
  /** The statistic its fitted model decides on (kinds that read bins). */
  statistic?(model: Model): BinStatistic;
  /** The decision rule on its statistic, from the calibration statistics of each intended outcome and their means. */
  rule(threshold: ThresholdSpec, statistic: readonly [Float64Array, Float64Array], mean0: number, mean1: number): ThresholdRule;
  /** Its analytic budget at a point (null where no closed form exists). */
  budget(input: Omit<BudgetInput, 'noiseVariance'>, noise: NoisePlan): Budget | null;
}
