/**
 * Processing section: the lab's decision chain, as one pipeline (`processing`) or a list of
 * named ones (`pipelines`).
 */
import { z } from 'zod';
import type { PipelineSpec, StateSpec } from '../types.ts';
import { name, oneOf, quantity, section, signalQuantity, type ShapeOutput } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { KeyPath } from '../issues.ts';
import type { SignalUse } from './states.ts';
import { formatQuantity } from '../units.ts';

/** Name of the pipeline made from `processing`, or the default one. */
export const MAIN_PIPELINE = 'main';

const referencePhaseSchema = z
  .union([z.literal('auto'), quantity('angle', {}, 'Reference phase', '"auto"')], { error: () => '"auto" or an angle (e.g. "30 deg")' })
  .optional()
  .meta({ description: '"auto" (along the state separation) or an angle (default auto)' });

const thresholdSchema = z
  .union([oneOf(['midpoint', 'optimal']), section({ fixed: signalQuantity('signal') })], {
    error: () => '"midpoint", "optimal" or a mapping {fixed: level}',
  })
  .optional()
  .meta({ description: 'midpoint | optimal | {fixed: "60 pA"} (default midpoint)' });

const chain = { referencePhase: referencePhaseSchema, threshold: thresholdSchema };

/** Top-level keys of the processing section. */
export const processingShape = {
  processing: section(chain).optional().meta({ description: 'One processing pipeline, named "main"' }),
  pipelines: z
    .array(section({ name: name(), ...chain }), { error: () => 'a list of pipelines' })
    .min(1, { error: () => 'a list of at least 1 pipeline' })
    .optional()
    .meta({ description: 'Several named pipelines, run on the same shots (instead of processing)' }),
};

/** Validated processing keys. */
export type ProcessingDoc = ShapeOutput<typeof processingShape>;

type ChainDoc = NonNullable<ProcessingDoc['processing']>;

/** The pipelines, and where fixed thresholds were written (for the signal unit check). */
export function resolvePipelines(doc: ProcessingDoc, ctx: ResolveContext): { pipelines: PipelineSpec[]; uses: SignalUse[] } {
  if (doc.processing !== undefined && doc.pipelines !== undefined) {
    ctx.fail(['pipelines'], 'either processing or pipelines', 'both');
  }
  const uses: SignalUse[] = [];
  if (doc.pipelines === undefined) {
    return { pipelines: [toPipeline(MAIN_PIPELINE, doc.processing ?? {}, ['processing'], uses)], uses };
  }
  const pipelines: PipelineSpec[] = [];
  doc.pipelines.forEach((p, i) => {
    const earlier = pipelines.findIndex((q) => q.name === p.name);
    if (earlier >= 0) ctx.fail(['pipelines', i, 'name'], `a name not already used (pipelines[${earlier}] is "${p.name}")`);
    pipelines.push(toPipeline(p.name, p, ['pipelines', i], uses));
  });
  return { pipelines, uses };
}

function toPipeline(pipelineName: string, c: ChainDoc, at: KeyPath, uses: SignalUse[]): PipelineSpec {
  const t = c.threshold ?? 'midpoint';
  let threshold: PipelineSpec['threshold'];
  if (typeof t === 'string') threshold = { method: t, value: 0 };
  else {
    threshold = { method: 'fixed', value: t.fixed.value };
    uses.push({ path: [...at, 'threshold', 'fixed'], unit: t.fixed.unit });
  }
  return { name: pipelineName, referencePhase: c.referencePhase ?? 'auto', threshold };
}

/**
 * Warns when a fixed threshold lies outside the span of the levels: the real levels at
 * baseband, else the levels projected on the reference axis (Re(level·e^(−iφ))), where for
 * 'auto' the axis points from the mean level of the first outcome to that of the second.
 */
export function warnThresholds(
  pipelines: PipelineSpec[],
  states: StateSpec[],
  unit: string,
  ctx: ResolveContext,
  fromList: boolean,
): void {
  pipelines.forEach((p, i) => {
    if (p.threshold.method !== 'fixed') return;
    const real = states.every((s) => s.level.im === 0);
    const phase = real ? 0 : p.referencePhase === 'auto' ? autoPhase(states) : p.referencePhase;
    const projected = states.map((s) => s.level.re * Math.cos(phase) + s.level.im * Math.sin(phase));
    const lo = Math.min(...projected);
    const hi = Math.max(...projected);
    const v = p.threshold.value;
    if (v < lo || v > hi) {
      const path = fromList ? ['pipelines', i, 'threshold', 'fixed'] : ['processing', 'threshold', 'fixed'];
      ctx.warn(path, `${formatQuantity(v, unit)} is outside the span of the levels (${formatQuantity(lo, unit)} to ${formatQuantity(hi, unit)})`);
    }
  });
}

function autoPhase(states: StateSpec[]): number {
  const mean = (outcome: number) => {
    const of = states.filter((s) => s.outcome === outcome);
    return {
      re: of.reduce((a, s) => a + s.level.re, 0) / of.length,
      im: of.reduce((a, s) => a + s.level.im, 0) / of.length,
    };
  };
  const a = mean(0);
  const b = mean(1);
  return Math.atan2(b.im - a.im, b.re - a.re);
}
