/**
 * Which engine runs a scenario, and why. The exact-statistic engine (exact-batch.ts) is valid
 * when every pipeline is a linear functional of the record and every noise source is Gaussian
 * (white, or 1/f on its timeline); otherwise only the trace engine (batch.ts) is right.
 *
 * The test is deliberately conservative: a scenario or pipeline key that this file does not
 * list as exact-safe blocks the exact engine, so a new signal-chain feature (telegraph
 * noise, clipping, ADC, an HMM classifier …) runs on the trace engine until someone checks
 * that the exact engine handles it and adds its key below.
 */
import { InputError } from '../errors.ts';
import type { Scenario } from '../scenario/types.ts';
import { applySensor } from '../physics/sensor-scenario.ts';
import { sourcesByKind } from '../signal/noise/registry.ts';
import { classifierOf, needsCalibrationBins } from '../classify/registry.ts';

/** The engines. */
export type EngineName = 'exact' | 'traces';
/** What the user may ask for. */
export type EngineRequest = EngineName | 'auto';

/** The engine that runs, with the reason shown in every output. */
export interface EngineChoice {
  engine: EngineName;
  reason: string;
}

/** Top-level scenario keys the exact engine handles (what the trace engine reads from them, or nothing per shot). */
export const EXACT_SCENARIO_KEYS: ReadonlySet<string> = new Set([
  'name', 'description', 'seed', 'shots', 'calibrationShots', 'batchSize', 'timing', 'states', 'outcomes',
  'prepare', 'preparationError', 'mappingError', 'transitions', 'signal', 'pipelines',
  // the sensor only sets levels, rates and white noise (applied before compiling); a sweep only makes points
  'sensor', 'sweep',
]);
/**
 * Signal-chain keys the exact engine handles: carrier, gain, white Gaussian noise (given or from
 * its parts) and the analog response. The noise sources beyond white (`sources`) each say
 * whether the exact engine may use them (signal/noise/contract.ts `exactBlocker`).
 */
export const EXACT_SIGNAL_KEYS: ReadonlySet<string> = new Set(['carrier', 'gain', 'white', 'unit', 'components', 'response']);
/** Pipeline keys the exact engine handles (the kernels carry the linear processing; weights and classifier are checked apart). */
export const EXACT_PIPELINE_KEYS: ReadonlySet<string> = new Set([
  'name', 'referencePhase', 'threshold', 'window', 'filter', 'decimate', 'ambiguousBand', 'weights', 'classifier',
]);

/** Why a known key blocks the exact engine. */
const KNOWN_BLOCKERS: Record<string, string> = {
  keepTraces: 'traces are kept, which needs every record',
  'signal.digitizer': 'clipping and quantisation are not linear',
};

/** A value that switches nothing on (absent, null, false, an empty list or mapping). */
function inactive(v: unknown): boolean {
  if (v === undefined || v === null || v === false) return true;
  if (Array.isArray(v)) return v.length === 0;
  if (typeof v === 'object') return Object.keys(v).length === 0;
  return false;
}

/** The run's options that matter to the engine choice. */
export interface EngineOptions {
  /** Every scored record is kept (traces.arrow), which only the trace engine makes. */
  keepTraces?: 'raw' | 'baseband';
}

/** Why the exact engine cannot run this scenario with these options (empty when it can). */
export function exactBlockers(input: Scenario, options: EngineOptions = {}): string[] {
  const scenario = applySensor(input);
  const out: string[] = [];
  const block = (key: string, generic: string) => out.push(`${key}: ${KNOWN_BLOCKERS[key] ?? generic}`);
  for (const [k, v] of Object.entries(scenario)) {
    if (!EXACT_SCENARIO_KEYS.has(k) && !inactive(v)) block(k, 'not handled by the exact engine');
  }
  if (options.keepTraces) block('keepTraces', '');
  for (const [k, v] of Object.entries(scenario.signal)) {
    if (k === 'sources') {
      for (const { kind } of sourcesByKind(scenario.signal.sources)) if (kind.exactBlocker !== null) block(`signal.${kind.kind}`, kind.exactBlocker);
    } else if (!EXACT_SIGNAL_KEYS.has(k) && !inactive(v)) block(`signal.${k}`, 'not known to be white Gaussian noise on a linear chain');
  }
  for (const p of scenario.pipelines) {
    for (const [k, v] of Object.entries(p)) {
      if (!EXACT_PIPELINE_KEYS.has(k) && !inactive(v)) block(`pipeline "${p.name}" ${k}`, 'not known to be a linear functional of the record');
    }
    const classifier = classifierOf(p);
    if (classifier.exactBlocker !== null) out.push(`pipeline "${p.name}": ${classifier.exactBlocker}`);
    else if (needsCalibrationBins(p)) out.push(`pipeline "${p.name}": ${p.weights} weights are calibrated from recorded traces`);
  }
  return out;
}

const EXACT_WHY = 'every pipeline is a linear functional of the record and the noise is Gaussian, '
  + 'so each integrated I/Q is drawn from its exact distribution (signal from the state path, white noise as one joint Gaussian, '
  + '1/f through each kernel from its timeline across shots)';
const TRACES_WHY = 'every sample of every record is synthesised and processed';

/** Picks the engine for a run (the same for all its points). `--engine exact` on an unsuitable scenario is an InputError. */
export function chooseEngine(scenarios: readonly Scenario[], request: EngineRequest = 'auto', options: EngineOptions = {}): EngineChoice {
  if (request === 'traces') return { engine: 'traces', reason: `requested (--engine traces): ${TRACES_WHY}` };
  const blockers = [...new Set(scenarios.flatMap((s) => exactBlockers(s, options)))];
  if (request === 'exact') {
    if (blockers.length > 0) throw new InputError('--engine exact', '', `the exact engine does not apply: ${blockers.join('; ')} (use --engine traces or auto)`);
    return { engine: 'exact', reason: `requested (--engine exact): ${EXACT_WHY}` };
  }
  if (blockers.length > 0) return { engine: 'traces', reason: `auto: the exact engine does not apply (${blockers.join('; ')}); ${TRACES_WHY}` };
  return { engine: 'exact', reason: `auto: ${EXACT_WHY}` };
}
