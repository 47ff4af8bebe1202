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
import { resolvePipelines, warnThresholds } from './sections/processing.ts';

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
  const { states, outcomes, uses: levelUses } = resolveStates(d.states, ctx);
  const prepare = resolvePrepare(d.prepare, ctx);
  const { preparationError, mappingError } = resolveFlips(d, ctx);
  const transitions = resolveTransitions(d.transitions, ctx, timing.sampleRate);
  const { pipelines, uses: thresholdUses } = resolvePipelines(d, ctx);
  const signal = resolveSignal(d.signal, ctx, { states, uses: [...levelUses, ...thresholdUses], timing });
  warnThresholds(pipelines, states, signal.unit, ctx, d.pipelines !== undefined);

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
  };
  return { scenario, warnings: ctx.warnings };
}
