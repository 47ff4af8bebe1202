/**
 * Noise beyond a given white density, under `signal.noise`: white noise from the parts of the
 * chain (`components`), and one key per registered kind of noise source (signal/noise/registry.ts:
 * `flicker`, `telegraph`, …), each an entry or a list of entries. A kind declares its keys as
 * data (its `config.fields`); this section turns them into the schema and hands each validated
 * entry to the kind to resolve. With a sensor section, a kind's signal-or-energy values may be
 * given as detuning (charge) noise in energy units ("1 ueV/rtHz", "3 ueV"); the sensor's slope
 * turns them into current (physics/sensor-scenario.ts).
 */
import { z } from 'zod';
import type { NoiseComponentsSpec, NoiseSourceSpec, TimingSpec } from '../types.ts';
import { kindedQuantity, name, number, oneOf, quantity, section, type KindedValue } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { KeyPath } from '../issues.ts';
import type { SignalUse } from './states.ts';
import { formatQuantity, type DimensionName } from '../units.ts';
import { NOISE_KINDS } from '../../signal/noise/registry.ts';
import type { ConfigContext, ConfigField, ConfigPath, NoiseSourceKind } from '../../signal/noise/contract.ts';

const positive = { min: 0, minExclusive: true } as const;

/** The schema of one declared key of a noise kind (signal/noise/contract.ts ConfigField). */
function fieldSchema(f: ConfigField): z.ZodType {
  switch (f.type) {
    case 'name': return (f.optional ? name().optional() : name()).meta({ description: f.description });
    case 'choice': return (f.optional ? oneOf(f.words).optional() : oneOf(f.words)).meta({ description: f.description });
    case 'number': return (f.optional ? number(f.range).optional() : number(f.range)).meta({ description: f.description });
    case 'quantity': {
      const q = quantity(f.dimension as DimensionName, f.range, f.description);
      return f.optional ? q.optional() : q;
    }
    case 'kinded': {
      const q = kindedQuantity(f.dimension as DimensionName, f.range, f.description);
      return f.optional ? q.optional() : q;
    }
  }
}

/** `signal.noise.<kind>`: one entry or a list of them. */
function kindSchema(kind: NoiseSourceKind) {
  const entry = section(Object.fromEntries(Object.entries(kind.config.fields).map(([key, f]) => [key, fieldSchema(f)])));
  return z
    .union([entry, z.array(entry)], { error: () => kind.config.expected })
    .optional()
    .meta({ description: kind.config.description });
}

const componentsSchema = section({
  senseResistor: quantity('resistance', positive, 'Sense resistor R: Johnson noise 4kT/R; refers e_n to current').optional(),
  temperature: quantity('temperature', positive, 'Temperature of the sense resistor').optional(),
  sensorCurrent: z
    .union([z.literal('sensor'), quantity('current', {}, 'Current carrying shot noise 2eIF', '"sensor"')], {
      error: () => '"sensor" or a current (e.g. "1 nA")',
    })
    .optional()
    .meta({ description: 'Shot noise 2eIF of this current, or "sensor" (the sensor section\'s current)' }),
  fano: number({ min: 0 }).optional().meta({ description: 'Fano factor F of the shot noise (default 1)' }),
  amplifierVoltage: quantity('voltageDensity', { min: 0 }, 'Amplifier input voltage noise e_n, referred to current as e_n/R').optional(),
  amplifierCurrent: quantity('currentDensity', { min: 0 }, 'Amplifier input current noise i_n').optional(),
}).meta({ description: 'White noise from the parts of a current readout (adds to white)' });

/** The keys this file adds to `signal.noise` (next to `white`). */
export const noiseKeys: Record<string, z.ZodType> = {
  components: componentsSchema.optional(),
  ...Object.fromEntries(NOISE_KINDS.map((k) => [k.kind, kindSchema(k)])),
};

/** Validated extra noise keys: the components, and per kind its entry or entries. */
export interface NoiseExtrasDoc {
  components?: z.output<typeof componentsSchema>;
  [kind: string]: unknown;
}

/** What the noise resolver reads from other sections. */
export interface NoiseInputs {
  timing: TimingSpec;
  shots: number;
  /** Whether a sensor section exists (detuning units and sensorCurrent: sensor need one). */
  hasSensor: boolean;
}

/** The resolved extra noise. */
export interface ResolvedNoise {
  components: NoiseComponentsSpec | null;
  /** Every kind's sources, in registry order. */
  sources: NoiseSourceSpec[];
}

const list = <T>(x: T | T[] | undefined): T[] => (x === undefined ? [] : Array.isArray(x) ? x : [x]);

/** Reads a signal-or-energy value: pushes its unit use, fails on energy without a sensor. */
function signalOrDetuning(v: KindedValue, path: KeyPath, inputs: NoiseInputs, uses: SignalUse[], ctx: ResolveContext): boolean {
  if (v.index === 2) {
    if (!inputs.hasSensor) ctx.fail(path, 'a signal quantity (detuning units need a sensor section)');
    return true;
  }
  uses.push({ path, unit: v.plain ? null : v.index === 0 ? 'A' : 'V' });
  return false;
}

/**
 * Resolves the components and every kind's sources under `signal.noise`; pushes where signal
 * units were written into `uses` (for the one-unit check).
 */
export function resolveNoiseExtras(
  doc: NoiseExtrasDoc | undefined, ctx: ResolveContext, inputs: NoiseInputs, uses: SignalUse[],
): ResolvedNoise {
  const at: KeyPath = ['signal', 'noise'];
  const single = (key: string) => (doc && !Array.isArray((doc as Record<string, unknown>)[key]));
  const names = new Set<string>();
  const uniqueName = (given: string | undefined, base: string, i: number, path: KeyPath): string => {
    const n = given ?? (i === 0 ? base : `${base}${i + 1}`);
    if (names.has(n)) ctx.fail(path, `a name not already used in the noise budget ("${n}" is taken)`);
    names.add(n);
    return n;
  };
  for (const w of ['white', 'johnson', 'shot', 'amplifierVoltage', 'amplifierCurrent', 'quantisation']) names.add(w);

  const context: ConfigContext = {
    fail: (path, expected, found) => ctx.fail(path, expected, found),
    warn: (path, text) => ctx.warn(path, text),
    signalOrDetuning: (v, path) => signalOrDetuning(v, path, inputs, uses, ctx),
    uniqueName, format: formatQuantity, timing: inputs.timing, shots: inputs.shots,
  };
  // every kind's count is checked before any entry is resolved
  const entries = NOISE_KINDS.map((kind) => {
    const docs = list((doc as Record<string, unknown> | undefined)?.[kind.kind] as Record<string, unknown> | Record<string, unknown>[] | undefined);
    if (docs.length > kind.config.maxEntries) ctx.fail([...at, kind.kind], `at most ${kind.config.maxEntries} ${kind.config.plural}`, `${docs.length}`);
    return { kind, docs };
  });
  const sources: NoiseSourceSpec[] = entries.flatMap(({ kind, docs }) => docs.map((entry, i) => {
    const p: ConfigPath = single(kind.kind) ? ['signal', 'noise', kind.kind] : ['signal', 'noise', kind.kind, i];
    return kind.resolve(entry, p, i, context);
  }));

  let components: NoiseComponentsSpec | null = null;
  const c = doc?.components;
  if (c) {
    const p: KeyPath = [...at, 'components'];
    if (c.senseResistor !== undefined && c.temperature === undefined) ctx.fail([...p, 'temperature'], 'the sense resistor\'s temperature (for its Johnson noise)', 'nothing');
    if (c.temperature !== undefined && c.senseResistor === undefined) ctx.fail([...p, 'senseResistor'], 'a sense resistor (temperature is its temperature)', 'nothing');
    if (c.amplifierVoltage !== undefined && c.senseResistor === undefined) {
      ctx.fail([...p, 'senseResistor'], 'a sense resistor (amplifierVoltage is referred to current as e_n/R)', 'nothing');
    }
    if (c.sensorCurrent === 'sensor' && !inputs.hasSensor) ctx.fail([...p, 'sensorCurrent'], 'a current (or a sensor section for "sensor")');
    if (c.fano !== undefined && c.sensorCurrent === undefined) ctx.warn([...p, 'fano'], 'has no effect without sensorCurrent');
    components = {
      resistance: c.senseResistor ?? null, temperature: c.temperature ?? 0,
      current: c.sensorCurrent ?? null, fano: c.fano ?? 1,
      amplifierVoltage: c.amplifierVoltage ?? null, amplifierCurrent: c.amplifierCurrent ?? null,
    };
    // the components are current noise: the signal unit must be amperes
    uses.push({ path: p, unit: 'A' });
  }
  return { components, sources };
}
