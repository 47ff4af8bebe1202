/**
 * Building blocks of the scenario schema (zod v4): quantities with units, integers,
 * probabilities, names and strict sections. Each carries its own one-line "expected …" text,
 * which `issues.ts` turns into an `InputError`.
 */
import { z } from 'zod';
import { describeFound } from '../errors.ts';
import { DIMENSIONS, parseQuantity, quantityAs, unitProblem, UnitSyntaxError, type Dimension, type DimensionName } from './units.ts';
import { magnitudeOf, magnitudeText, PLAIN_MAX, withinMagnitude } from './bounds.ts';
import { suggestKey } from './suggest.ts';

/** Bounds on a number; exclusive bounds are strict. */
export interface Range {
  min?: number;
  minExclusive?: boolean;
  max?: number;
  maxExclusive?: boolean;
}

/** " > 0", " between 0 and 1", … (empty when unbounded). */
export function rangeText(range: Range): string {
  const { min, max } = range;
  if (min !== undefined && max !== undefined) return ` between ${min} and ${max}`;
  if (min !== undefined) return ` ${range.minExclusive ? '>' : '≥'} ${min}`;
  if (max !== undefined) return ` ${range.maxExclusive ? '<' : '≤'} ${max}`;
  return '';
}

/** Whether `x` lies within `range`. */
export function inRange(x: number, range: Range): boolean {
  if (range.min !== undefined && (range.minExclusive ? !(x > range.min) : !(x >= range.min))) return false;
  if (range.max !== undefined && (range.maxExclusive ? !(x < range.max) : !(x <= range.max))) return false;
  return true;
}

/** A user-facing problem found inside a field: the expected text and what was found. */
function report(ctx: z.RefinementCtx, expected: string, found: string): void {
  ctx.addIssue({ code: 'custom', message: expected, params: { found } });
}

/** A value of a signal quantity: SI value and which signal unit was written (null: plain number). */
export interface SignalValue {
  value: number;
  unit: 'A' | 'V' | null;
}

function expectedQuantity(kind: DimensionName, alternative?: string): string {
  const d = DIMENSIONS[kind];
  const main = `${d.label} (e.g. "${d.example}")`;
  return alternative ? `${alternative} or ${main}` : main;
}

/** Reads a quantity; reports a wrong form or dimension, then a value out of range. */
function readQuantity(
  input: number | string,
  kind: DimensionName,
  range: Range,
  expected: string,
  ctx: z.RefinementCtx,
): { value: number; index: number } | undefined {
  let q;
  try {
    q = parseQuantity(input);
  } catch (e) {
    if (!(e instanceof UnitSyntaxError)) throw e;
    report(ctx, expected, `${describeFound(input)} (${unitProblem(e, kind)})`);
    return undefined;
  }
  const read = quantityAs(q, kind);
  if (read === null) {
    report(ctx, expected, describeFound(input));
    return undefined;
  }
  if (!inRange(read.value, range)) {
    report(ctx, `${DIMENSIONS[kind].label}${rangeText(range)}`, describeFound(input));
    return undefined;
  }
  // every quantity reaches arithmetic: its magnitude is bounded by its dimension (bounds.ts)
  const magnitude = magnitudeOf(kind, DIMENSIONS[kind].dims[read.index]! as Dimension);
  if (magnitude !== null && !withinMagnitude(read.value, magnitude)) {
    report(ctx, `${DIMENSIONS[kind].label} ${magnitudeText(magnitude)}`, describeFound(input));
    return undefined;
  }
  return read;
}

function quantityInput(expected: string, kind: DimensionName, description?: string) {
  const d = DIMENSIONS[kind];
  const energy = d.dims.some((x) => x.length === 5 && x[2] === 1 && x.every((p, i) => i === 2 || p === 0));
  const form = `${d.label}: a number in SI units or a string with a unit, e.g. "${d.example}"${energy ? '; an energy may be given as a frequency f, the energy h·f ("5 GHz", or "5 GHz*h")' : ''}`;
  return z
    .union([z.number(), z.string()], { error: () => expected })
    .meta({ description: description ? `${description} (${form})` : form });
}

/**
 * A quantity of the given dimension, written as a plain number (SI) or "number unit";
 * parses to the SI value. `description` is for the JSON Schema; `alternative` names other
 * accepted forms in the error message.
 */
export function quantity(kind: DimensionName, range: Range = {}, description?: string, alternative?: string) {
  const expected = expectedQuantity(kind, alternative);
  return quantityInput(expected, kind, description).transform((input, ctx) => {
    const q = readQuantity(input, kind, range, expected, ctx);
    return q === undefined ? z.NEVER : q.value;
  });
}

/** A signal quantity (a level or a noise density in A or V, or a plain number). */
export function signalQuantity(kind: 'signal' | 'noiseDensity', range: Range = {}, description?: string) {
  const expected = expectedQuantity(kind);
  return quantityInput(expected, kind, description).transform((input, ctx): SignalValue => {
    const q = readQuantity(input, kind, range, expected, ctx);
    if (q === undefined) return z.NEVER;
    const plain = typeof input === 'number' || parseQuantity(input).plain;
    return { value: q.value, unit: plain ? null : q.index === 0 ? 'A' : 'V' };
  });
}

/** A quantity that says which accepted dimension it had: SI value, dimension index, plain or not. */
export interface KindedValue {
  value: number;
  /** Index into DIMENSIONS[kind].dims (0 for a plain number). */
  index: number;
  plain: boolean;
}

/** A quantity of one of several dimensions (e.g. a signal or an energy); keeps which one was written. */
export function kindedQuantity(kind: DimensionName, range: Range = {}, description?: string) {
  const expected = expectedQuantity(kind);
  return quantityInput(expected, kind, description).transform((input, ctx): KindedValue => {
    const q = readQuantity(input, kind, range, expected, ctx);
    if (q === undefined) return z.NEVER;
    return { value: q.value, index: q.index, plain: typeof input === 'number' || parseQuantity(input).plain };
  });
}

/** An integer in [min, max]; `expected` replaces the default message. */
export function integer(min: number, max: number = Number.MAX_SAFE_INTEGER, expected?: string) {
  expected ??= max === Number.MAX_SAFE_INTEGER ? `an integer ≥ ${min}` : `an integer from ${min} to ${max}`;
  const error = () => expected;
  return z.number({ error }).int({ error }).min(min, { error }).max(max, { error });
}

/** A plain number within `range`, and of magnitude at most PLAIN_MAX (bounds.ts). */
export function number(range: Range = {}) {
  const expected = `a number${rangeText(range)}`;
  const error = () => expected;
  let schema = z.number({ error });
  if (range.min !== undefined) schema = range.minExclusive ? schema.gt(range.min, { error }) : schema.min(range.min, { error });
  if (range.max !== undefined) schema = range.maxExclusive ? schema.lt(range.max, { error }) : schema.max(range.max, { error });
  return schema.refine((x) => Math.abs(x) <= PLAIN_MAX, { error: () => `${expected} of magnitude at most ${PLAIN_MAX}` });
}

/** A probability, a plain number in [0, 1]. */
export function probability() {
  return number({ min: 0, max: 1 }).meta({ description: 'a probability between 0 and 1' });
}

/** Pattern of state and pipeline names. */
export const NAME_PATTERN = /^[A-Za-z_][A-Za-z0-9_-]*$/;

/** A name: letters, digits, '_' and '-', starting with a letter or '_'. */
export function name() {
  const expected = 'a name of letters, digits, "_" or "-" starting with a letter or "_"';
  const error = () => expected;
  return z.string({ error }).regex(NAME_PATTERN, { error });
}

/** A non-empty string. */
export function text() {
  const error = () => 'a non-empty string';
  return z.string({ error }).min(1, { error });
}

/** An outcome label: a string or a number (stringified later). */
export function label() {
  const error = () => 'an outcome label (a string or a number)';
  return z.union([z.string().min(1), z.number()], { error });
}

/** One of the given words. */
export function oneOf<const T extends readonly [string, ...string[]]>(words: T) {
  const expected = `one of ${words.map((w) => `"${w}"`).join(', ')}`;
  return z.enum(words, { error: () => expected });
}

/**
 * A strict mapping: unknown keys are errors, with a "did you mean" suggestion, first among the
 * keys the mapping does not have yet (a key already written is seldom the one meant). The message holds
 * one line per unknown key, in the issue's order; `issues.ts` reports each with its key path.
 * `what` describes the mapping when something else was found (default: its list of keys).
 */
export function section<S extends z.ZodRawShape>(shape: S, what?: string) {
  const keys = Object.keys(shape);
  return z.strictObject(shape, {
    error: (iss) => {
      if (iss.code === 'unrecognized_keys') {
        const input = iss.input;
        const written = input !== null && typeof input === 'object' ? Object.keys(input) : [];
        const free = keys.filter((k) => !written.includes(k));
        return iss.keys.map((key) => {
          const meant = suggestKey(key, free) ?? suggestKey(key, keys);
          return meant === undefined ? `one of the keys ${keys.join(', ')}` : `a known key (did you mean "${meant}"?)`;
        }).join('\n');
      }
      if (iss.code === 'invalid_type') return what ?? `a mapping with keys ${keys.join(', ')}`;
      return undefined;
    },
  });
}

/** The validated type of a group of top-level keys (optional keys stay optional). */
export type ShapeOutput<S extends z.ZodRawShape> = z.output<z.ZodObject<S>>;
