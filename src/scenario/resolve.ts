/**
 * From a parsed document to the resolved `Scenario`: validate with the schema, then let each
 * section fill its defaults and check what crosses sections (state names, units, the window).
 */
import type { Scenario } from './types.ts';
import { scenarioSchema } from './schema.ts';
import { fallbackMessage, zodErrorToInputError } from './issues.ts';
import { ResolveContext } from './context.ts';
import { resolveRun } from './sections/run.ts';
import { resolveTiming } from './sections/timing.ts';
import { resolveStates } from './sections/states.ts';
import { resolvePrepare } from './sections/prepare.ts';
import { resolveFlips } from './sections/flips.ts';
import { resolveTransitions } from './sections/transitions.ts';
import { resolveSignal } from './sections/signal.ts';
import { resolveSensor } from './sections/sensor.ts';
import { checkLimits } from './limits.ts';
import { plausibilityWarnings } from './plausibility.ts';
import { checkPipelines, resolvePipelines, warnThresholds } from './sections/processing.ts';
import { resolveSweep } from './sections/sweep.ts';

/**
 * Validates a parsed scenario document and resolves it to SI units, indices and defaults.
 * Throws `InputError` (one line, naming the key path) on the first problem; returns warnings
 * (one line each, `FILE: key.path: text`) for things that are legal but probably wrong.
 */
export function resolveScenario(doc: unknown, file: string): { scenario: Scenario; warnings: string[] } {
  const parsed = scenarioSchema.safeParse(doc, { reportInput: true, error: fallbackMessage });
  if (!parsed.success) throw zodErrorToInputError(file, parsed.error);
  const d = parsed.data;
  const ctx = new ResolveContext(file, doc);

  const run = resolveRun(d, ctx);
  const timing = resolveTiming(d.timing, ctx);
  const { states, outcomes, uses: levelUses } = resolveStates(d.states, ctx, d.sensor !== undefined);
  const prepare = resolvePrepare(d.prepare, ctx);
  const sensor = resolveSensor(d.sensor, ctx, states, prepare, levelUses);
  const { preparationError, mappingError } = resolveFlips(d, ctx);
  const transitions = resolveTransitions(d.transitions, ctx, timing.sampleRate);
  const { pipelines, uses: thresholdUses } = resolvePipelines(d, ctx);
  const signal = resolveSignal(d.signal, ctx, {
    states, uses: [...levelUses, ...thresholdUses], timing, shots: Math.max(run.shots, run.calibrationShots), hasSensor: sensor !== null,
  });
  warnThresholds(pipelines, states, signal.unit, ctx, d.pipelines !== undefined);
  checkPipelines(pipelines, timing, run.calibrationShots, ctx, d.pipelines !== undefined);
  const sweep = resolveSweep(d.sweep, ctx);

  const scenario: Scenario = {
    ...run,
    timing,
    states,
    outcomes,
    prepare,
    preparationError,
    mappingError,
    transitions,
    signal,
    pipelines,
    ...(sensor ? { sensor } : {}),
    ...(sweep ? { sweep } : {}),
  };
  checkLimits(scenario, ctx);
  plausibilityWarnings(scenario, ctx);
  return { scenario, warnings: ctx.warnings };
}
