/**
 * From a parsed document to the resolved `Scenario`: validate with the schema, then let each
 * section fill its defaults and check what crosses sections (state names, units, the window).
 */
import type { z } from 'zod';
import { InputError, inputErrorOf } from '../errors.ts';
import type { Scenario } from './types.ts';
import { scenarioSchema, scenarioShape } from './schema.ts';
import { fallbackMessage, inDocumentOrder, zodErrorToInputErrors } from './issues.ts';
import { ResolveContext } from './context.ts';
import { resolveRun, runShape } from './sections/run.ts';
import { resolveTiming, timingShape } from './sections/timing.ts';
import { resolveStates, statesShape } from './sections/states.ts';
import { resolvePrepare, prepareShape } from './sections/prepare.ts';
import { resolveFlips, flipsShape } from './sections/flips.ts';
import { resolveTransitions, transitionsShape } from './sections/transitions.ts';
import { resolveSignal, signalShape } from './sections/signal.ts';
import { resolveSensor, sensorShape } from './sections/sensor.ts';
import { checkLimits } from './limits.ts';
import { plausibilityWarnings } from './plausibility.ts';
import { checkPipelines, processingShape, resolvePipelines, warnThresholds } from './sections/processing.ts';
import { resolveSweep, sweepShape } from './sections/sweep.ts';

/** The parsed document (keys whose schema failed are absent). */
type ScenarioDoc = z.output<typeof scenarioSchema>;

const PARSE_OPTIONS = { reportInput: true, error: fallbackMessage } as const;

/** The top-level keys each resolution step reads. */
const KEYS = {
  run: Object.keys(runShape), timing: Object.keys(timingShape), states: Object.keys(statesShape),
  prepare: Object.keys(prepareShape), sensor: Object.keys(sensorShape), flips: Object.keys(flipsShape),
  transitions: Object.keys(transitionsShape), pipelines: Object.keys(processingShape), signal: Object.keys(signalShape),
  sweep: Object.keys(sweepShape),
};

/**
 * When the whole document fails the schema: the schema's problems, and the document with every
 * top-level key that passes its own schema parsed (the others left out, and named in `failed`),
 * so that the sections that do not read a failed key can still be checked.
 */
function parsePartly(doc: unknown, error: z.ZodError, file: string): { d: ScenarioDoc; failed: Set<string>; errors: InputError[] } {
  const errors = zodErrorToInputErrors(file, error);
  if (doc === null || typeof doc !== 'object' || Array.isArray(doc)) throw inputErrorOf(errors);
  const d: Record<string, unknown> = {};
  const failed = new Set<string>();
  for (const [key, schema] of Object.entries(scenarioShape) as [string, z.ZodType][]) {
    const r = schema.safeParse((doc as Record<string, unknown>)[key], PARSE_OPTIONS);
    if (r.success) d[key] = r.data;
    else failed.add(key);
  }
  return { d: d as ScenarioDoc, failed, errors };
}

/**
 * Validates a parsed scenario document and resolves it to SI units, indices and defaults.
 * Throws `InputError` (one line per problem, naming the key path; `InputErrors` when there are
 * several): every problem of the schema, and every section's first problem — a section that
 * reads a key with a problem, or needs a section that failed, is not checked (it would only
 * repeat it). Returns warnings (one line each, `FILE: key.path: text`) for things that are
 * legal but probably wrong.
 */
export function resolveScenario(doc: unknown, file: string): { scenario: Scenario; warnings: string[] } {
  const parsed = scenarioSchema.safeParse(doc, PARSE_OPTIONS);
  const { d, failed, errors } = parsed.success ? { d: parsed.data, failed: new Set<string>(), errors: [] as InputError[] } : parsePartly(doc, parsed.error, file);
  const ctx = new ResolveContext(file, doc);
  /** Runs one step unless it reads a failed key or needs a failed step; collects its InputError. */
  function step<T>(keys: readonly string[], needs: readonly unknown[], resolve: () => T): T | undefined {
    if (keys.some((k) => failed.has(k)) || needs.some((n) => n === undefined)) return undefined;
    try {
      return resolve();
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      errors.push(e);
      return undefined;
    }
  }
  const hasSensor = (doc as Record<string, unknown> | null)?.sensor !== undefined;

  const run = step(KEYS.run, [], () => resolveRun(d, ctx));
  const timing = step(KEYS.timing, [], () => resolveTiming(d.timing, ctx));
  const st = step(KEYS.states, [], () => resolveStates(d.states, ctx, hasSensor));
  const prepare = step(KEYS.prepare, [st], () => resolvePrepare(d.prepare, ctx));
  const sensor = step(KEYS.sensor, [st, prepare], () => resolveSensor(d.sensor, ctx, st!.states, prepare!, st!.uses));
  const flips = step(KEYS.flips, [st], () => resolveFlips(d, ctx));
  // transitions need only the sample rate, which the timing schema already read
  const transitions = step([...KEYS.transitions, ...KEYS.timing], [st], () => resolveTransitions(d.transitions, ctx, d.timing.sampleRate));
  const pipes = step(KEYS.pipelines, [], () => resolvePipelines(d, ctx));
  const signal = step(KEYS.signal, [st, timing, run, sensor, pipes], () => resolveSignal(d.signal, ctx, {
    states: st!.states, uses: [...st!.uses, ...pipes!.uses], timing: timing!, shots: Math.max(run!.shots, run!.calibrationShots), hasSensor: sensor !== null,
  }));
  step([], [pipes, st, signal], () => warnThresholds(pipes!.pipelines, st!.states, signal!.unit, ctx, d.pipelines !== undefined));
  step([], [pipes, timing, run], () => checkPipelines(pipes!.pipelines, timing!, run!.calibrationShots, ctx, d.pipelines !== undefined));
  const sweep = step(KEYS.sweep, [], () => resolveSweep(d.sweep, ctx) ?? null);
  if (errors.length > 0) throw inputErrorOf(inDocumentOrder(errors, doc));

  const scenario: Scenario = {
    ...run!,
    timing: timing!,
    states: st!.states,
    outcomes: st!.outcomes,
    prepare: prepare!,
    preparationError: flips!.preparationError,
    mappingError: flips!.mappingError,
    transitions: transitions!,
    signal: signal!,
    pipelines: pipes!.pipelines,
    ...(sensor ? { sensor } : {}),
    ...(sweep ? { sweep } : {}),
  };
  checkLimits(scenario, ctx);
  plausibilityWarnings(scenario, ctx);
  return { scenario, warnings: ctx.warnings };
}
