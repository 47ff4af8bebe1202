/**
 * Preparation and mapping errors: the probability that a shot's state is replaced by another
 * before the record, given directly or computed from physics (Boltzmann, Landau–Zener).
 */
import { z } from 'zod';
import type { FlipSpec } from '../types.ts';
import { name, number, probability, quantity, section, type ShapeOutput } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { KeyPath } from '../issues.ts';
import { formatQuantity } from '../units.ts';
import { thermalPopulation } from '../../physics/preparation.ts';
import { landauZenerProbability } from '../../physics/mapping.ts';
import { ELEMENTARY_CHARGE } from '../../physics/constants.ts';

const positive = { min: 0, minExclusive: true } as const;

const intoSchema = name().optional().meta({
  description: 'State the shot ends up in (default: the other state when there are exactly 2)',
});

const preparationErrorSchema = section({
  probability: probability().optional(),
  thermal: section({
    splitting: quantity('energy', { min: 0 }, 'Energy of the excited manifold above the ground state'),
    temperature: quantity('temperature', positive, 'Effective electron temperature'),
    degeneracy: number(positive).optional().meta({ description: 'Degeneracy of the excited manifold (default 1)' }),
  })
    .optional()
    .meta({ description: 'Boltzmann population: p = g·e^(−E/kT)/(1 + g·e^(−E/kT))' }),
  into: intoSchema,
});

const mappingErrorSchema = section({
  probability: probability().optional(),
  landauZener: section({
    coupling: quantity('energy', { min: 0 }, 'Coupling Δ (half the minimum gap)'),
    sweepRate: quantity('sweepRate', positive, 'Sweep rate of the diabatic energy difference'),
  })
    .optional()
    .meta({ description: 'Landau–Zener probability P = exp(−2πΔ²/(ħv))' }),
  dephasing: probability().optional().meta({ description: 'Extra probability, combined as 1-(1-p)(1-d)' }),
  into: intoSchema,
});

const mappingFrom = (what: string) => ({ error: () => `a mapping from state names to ${what}` });

/** Top-level keys of the preparation and mapping error section. */
export const flipsShape = {
  preparationError: z
    .record(z.string(), preparationErrorSchema, mappingFrom('preparation errors'))
    .optional()
    .meta({ description: 'Preparation error, keyed by the prepared state' }),
  mappingError: z
    .record(z.string(), mappingErrorSchema, mappingFrom('mapping errors'))
    .optional()
    .meta({ description: 'Mapping error, keyed by the state after preparation' }),
};

/** Validated preparation and mapping errors. */
export type FlipsDoc = ShapeOutput<typeof flipsShape>;

const eV = (joules: number) => formatQuantity(joules / ELEMENTARY_CHARGE, 'eV');

/** One entry per state: its preparation error and its mapping error (or null). */
export function resolveFlips(
  doc: FlipsDoc,
  ctx: ResolveContext,
): { preparationError: (FlipSpec | null)[]; mappingError: (FlipSpec | null)[] } {
  const n = ctx.stateNames.length;
  const preparationError = new Array<FlipSpec | null>(n).fill(null);
  const mappingError = new Array<FlipSpec | null>(n).fill(null);

  for (const [state, e] of Object.entries(doc.preparationError ?? {})) {
    const at: KeyPath = ['preparationError', state];
    const i = ctx.stateIndex(state, at, JSON.stringify(state));
    if ((e.probability === undefined) === (e.thermal === undefined)) {
      ctx.fail(at, 'either probability or thermal', e.probability === undefined ? 'neither' : 'both');
    }
    let p: number;
    let origin: string;
    if (e.thermal) {
      const { splitting, temperature } = e.thermal;
      const g = e.thermal.degeneracy ?? 1;
      p = thermalPopulation(splitting, temperature, g);
      origin = `Boltzmann: ${eV(splitting)} at ${formatQuantity(temperature, 'K')}, g = ${g}`;
    } else {
      p = e.probability!;
      origin = 'given probability';
    }
    preparationError[i] = { probability: p, into: resolveInto(e.into, i, at, ctx), origin };
  }

  for (const [state, e] of Object.entries(doc.mappingError ?? {})) {
    const at: KeyPath = ['mappingError', state];
    const i = ctx.stateIndex(state, at, JSON.stringify(state));
    if (e.probability !== undefined && e.landauZener !== undefined) ctx.fail(at, 'either probability or landauZener', 'both');
    if (e.probability === undefined && e.landauZener === undefined && e.dephasing === undefined) {
      ctx.fail(at, 'probability, landauZener or dephasing', 'none of them');
    }
    let p = 0;
    const parts: string[] = [];
    if (e.landauZener) {
      const { coupling, sweepRate } = e.landauZener;
      p = landauZenerProbability(coupling, sweepRate);
      const meVPerNs = Number((sweepRate / ELEMENTARY_CHARGE / 1e6).toPrecision(4));
      parts.push(`Landau–Zener: Δ = ${eV(coupling)}, v = ${meVPerNs} meV/ns`);
    } else if (e.probability !== undefined) {
      p = e.probability;
      parts.push('given probability');
    }
    if (e.dephasing !== undefined) {
      p = 1 - (1 - p) * (1 - e.dephasing);
      parts.push(`dephasing ${e.dephasing}`);
    }
    mappingError[i] = { probability: p, into: resolveInto(e.into, i, at, ctx), origin: parts.join(' + ') };
  }
  return { preparationError, mappingError };
}

/** The target state: given, or the other one when there are exactly two. */
function resolveInto(into: string | undefined, self: number, at: KeyPath, ctx: ResolveContext): number {
  if (into === undefined) {
    if (ctx.stateNames.length === 2) return 1 - self;
    ctx.fail([...at, 'into'], 'the name of the state it turns into (required when there are more than 2 states)');
  }
  const target = ctx.stateIndex(into, [...at, 'into']);
  if (target === self) ctx.fail([...at, 'into'], `a state other than "${ctx.stateNames[self]}"`);
  return target;
}
