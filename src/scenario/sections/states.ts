/**
 * States section: the hidden states, their signal levels and outcome labels.
 */
import { z } from 'zod';
import type { Complex, StateSpec } from '../types.ts';
import { label, name, quantity, section, signalQuantity } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { KeyPath } from '../issues.ts';

const levelSchema = z
  .union(
    [
      signalQuantity('signal'),
      section({ re: signalQuantity('signal'), im: signalQuantity('signal') }),
      section({ magnitude: signalQuantity('signal', { min: 0 }), phase: quantity('angle') }),
    ],
    { error: () => 'a signal level (e.g. "120 pA"), a mapping {re, im} or a mapping {magnitude, phase}' },
  )
  .meta({ description: 'Signal level at the sensor output: real, {re, im} or {magnitude, phase}' });

const stateSchema = section({
  name: name().meta({ description: 'Unique state name' }),
  level: levelSchema.optional(),
  outcome: label().meta({ description: 'What a perfect readout reports for this state' }),
});

const statesSchema = z
  .array(stateSchema, { error: () => 'a list of states' })
  .min(2, { error: () => 'a list of at least 2 states' })
  .meta({ description: 'The hidden states of the readout (at least 2)' });

/** Top-level keys of the states section. */
export const statesShape = { states: statesSchema };

/** Validated states. */
export type StatesDoc = z.output<typeof statesSchema>;

/** A place where a signal quantity was written, and in which unit (null: a plain number). */
export interface SignalUse {
  path: KeyPath;
  unit: 'A' | 'V' | null;
}

/** The resolved states, outcome labels, and where each level's unit was written. */
export interface ResolvedStates {
  states: StateSpec[];
  outcomes: string[];
  uses: SignalUse[];
}

/** Number of distinct outcome labels the engine supports for now. */
export const OUTCOME_COUNT = 2;

/**
 * Checks names and outcomes, turns levels into complex amplitudes. With `levelsFromSensor`
 * (a sensor section exists) no state may give a level: the sensor sets them (sections/sensor.ts).
 */
export function resolveStates(doc: StatesDoc, ctx: ResolveContext, levelsFromSensor = false): ResolvedStates {
  const states: StateSpec[] = [];
  const outcomes: string[] = [];
  const uses: SignalUse[] = [];
  doc.forEach((s, i) => {
    const firstUse = states.findIndex((t) => t.name === s.name);
    if (firstUse >= 0) ctx.fail(['states', i, 'name'], `a name not already used (states[${firstUse}] is "${s.name}")`);
    const outcomeLabel = String(s.outcome);
    let outcome = outcomes.indexOf(outcomeLabel);
    if (outcome < 0) {
      if (outcomes.length === OUTCOME_COUNT) {
        const known = outcomes.map((o) => JSON.stringify(o)).join(' or ');
        ctx.fail(['states', i, 'outcome'], `${known} (exactly ${OUTCOME_COUNT} distinct outcomes for now)`);
      }
      outcome = outcomes.push(outcomeLabel) - 1;
    }
    if (s.level === undefined && !levelsFromSensor) ctx.fail(['states', i, 'level'], 'a signal level (e.g. "120 pA"), or a sensor section that sets the levels', 'nothing');
    if (s.level !== undefined && levelsFromSensor) ctx.fail(['states', i, 'level'], 'no level: the sensor section sets it from the detuning shift');
    const level = s.level === undefined ? { re: 0, im: 0 } : toComplex(s.level, ['states', i, 'level'], uses);
    states.push({ name: s.name, level, outcome });
  });
  if (outcomes.length < OUTCOME_COUNT) {
    const last = doc.length - 1;
    ctx.fail(
      ['states', last, 'outcome'],
      `an outcome different from ${JSON.stringify(outcomes[0])} (exactly ${OUTCOME_COUNT} distinct outcomes are needed)`,
    );
  }
  ctx.stateNames = states.map((s) => s.name);
  return { states, outcomes, uses };
}

type Level = NonNullable<StatesDoc[number]['level']>;

function toComplex(level: Level, path: KeyPath, uses: SignalUse[]): Complex {
  if ('value' in level) {
    uses.push({ path, unit: level.unit });
    return { re: level.value, im: 0 };
  }
  if ('re' in level) {
    uses.push({ path: [...path, 're'], unit: level.re.unit }, { path: [...path, 'im'], unit: level.im.unit });
    return { re: level.re.value, im: level.im.value };
  }
  uses.push({ path: [...path, 'magnitude'], unit: level.magnitude.unit });
  const m = level.magnitude.value;
  return { re: m * Math.cos(level.phase), im: m * Math.sin(level.phase) };
}
