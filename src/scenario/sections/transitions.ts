/**
 * Transitions section: rates of the continuous-time Markov chain during the record.
 */
import { z } from 'zod';
import type { TransitionSpec } from '../types.ts';
import { name, oneOf, quantity, section } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import { formatQuantity } from '../units.ts';

const positive = { min: 0, minExclusive: true } as const;

const transitionSchema = section({
  from: name().meta({ description: 'State the transition leaves' }),
  to: name().meta({ description: 'State the transition enters' }),
  lifetime: quantity('time', positive, 'Mean time before the transition (1/rate), e.g. T1').optional(),
  rate: quantity('rate', positive, 'Rate in 1/s (give this or lifetime)').optional(),
  kind: oneOf(['relaxation', 'excitation', 'leakage'])
    .optional()
    .meta({ description: 'Default: relaxation when "to" is listed before "from", else excitation' }),
});

const transitionsSchema = z
  .array(transitionSchema, { error: () => 'a list of transitions' })
  .optional()
  .meta({ description: 'Transitions between states during the record' });

/** Top-level keys of the transitions section. */
export const transitionsShape = { transitions: transitionsSchema };

/** Validated transitions. */
export type TransitionsDoc = z.output<typeof transitionsSchema>;

/** Turns names into indices and lifetimes into rates; warns when a lifetime is below one sample. */
export function resolveTransitions(doc: TransitionsDoc, ctx: ResolveContext, sampleRate: number): TransitionSpec[] {
  const out: TransitionSpec[] = [];
  (doc ?? []).forEach((t, i) => {
    const at = ['transitions', i];
    const from = ctx.stateIndex(t.from, [...at, 'from']);
    const to = ctx.stateIndex(t.to, [...at, 'to']);
    if (from === to) ctx.fail([...at, 'to'], `a state other than "from" ("${t.from}")`);
    if ((t.lifetime === undefined) === (t.rate === undefined)) {
      ctx.fail(at, 'either lifetime or rate', t.rate === undefined ? 'neither' : 'both');
    }
    const earlier = out.findIndex((o) => o.from === from && o.to === to);
    if (earlier >= 0) ctx.fail([...at, 'to'], `one entry per pair of states (transitions[${earlier}] is already ${t.from} → ${t.to})`);
    const rate = t.rate ?? 1 / t.lifetime!;
    if (rate > sampleRate) {
      const key = t.rate === undefined ? 'lifetime' : 'rate';
      ctx.warn(
        [...at, key],
        `lifetime ${formatQuantity(1 / rate, 's')} is shorter than one sample (${formatQuantity(1 / sampleRate, 's')})`,
      );
    }
    out.push({ from, to, rate, kind: t.kind ?? (to < from ? 'relaxation' : 'excitation') });
  });
  return out;
}
