/**
 * Prepare section: the mixture of states that each shot starts from.
 */
import { z } from 'zod';
import { number } from '../fields.ts';
import type { ResolveContext } from '../context.ts';

const prepareSchema = z
  .record(z.string(), number({ min: 0 }), { error: () => 'a mapping from state names to weights ≥ 0' })
  .optional()
  .meta({ description: 'Weights of the prepared states (normalised; default equal over all states)' });

/** Top-level keys of the prepare section. */
export const prepareShape = { prepare: prepareSchema };

/** Validated prepare weights. */
export type PrepareDoc = z.output<typeof prepareSchema>;

/** Normalised probabilities of preparing each state (unlisted states get 0). */
export function resolvePrepare(doc: PrepareDoc, ctx: ResolveContext): number[] {
  const n = ctx.stateNames.length;
  if (doc === undefined) return new Array<number>(n).fill(1 / n);
  const weights = new Array<number>(n).fill(0);
  for (const [stateName, weight] of Object.entries(doc)) {
    weights[ctx.stateIndex(stateName, ['prepare', stateName], `"${stateName}"`)] = weight;
  }
  const total = weights.reduce((a, b) => a + b, 0);
  if (!(total > 0) || !Number.isFinite(total)) ctx.fail(['prepare'], 'weights with a positive, finite sum', 'all weights zero');
  return weights.map((w) => w / total);
}
