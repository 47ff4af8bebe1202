/**
 * Noise beyond a given white density, under `signal.noise`: white noise from the parts of the
 * chain (`components`), 1/f sources (`flicker`) and two-level fluctuators (`telegraph`).
 * A 1/f source is written as its amplitude density at a reference frequency, so that
 * S(f) = density²·(at/f)^α: "5 pA/rtHz at 1 Hz" means S(1 Hz) = 25 pA²/Hz. With a sensor section,
 * 1/f densities and fluctuator amplitudes may be given as detuning (charge) noise in energy units
 * ("1 ueV/rtHz", "3 ueV"); the sensor's slope turns them into current (physics/sensor-scenario.ts).
 */
import { z } from 'zod';
import type { FlickerNoiseSpec, NoiseComponentsSpec, NoiseInjection, TelegraphNoiseSpec, TimingSpec } from '../types.ts';
import { kindedQuantity, name, number, oneOf, quantity, section, type KindedValue } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { KeyPath } from '../issues.ts';
import type { SignalUse } from './states.ts';
import { formatQuantity } from '../units.ts';
import { planFlickerTimeline, BASE_OVERSAMPLING } from '../../signal/flicker-timeline.ts';
import { MAX_FLICKER_SOURCES } from '../../signal/noise-plan.ts';

/** Most fluctuators per point. */
export const MAX_FLUCTUATORS = 16;

const positive = { min: 0, minExclusive: true } as const;

const injectionSchema = oneOf(['sensor', 'amplifier']).meta({
  description: 'sensor: moves the operating point (modulated by the carrier like the signal); amplifier: added after the modulation',
});

const flickerSourceSchema = section({
  name: name().optional().meta({ description: 'Name in the noise budget (default flicker, flicker2, …)' }),
  density: kindedQuantity('densityOrEnergyDensity', { min: 0 }, 'Amplitude density √S at the reference frequency'),
  at: quantity('frequency', positive, 'Reference frequency of the density (default 1 Hz)').optional(),
  exponent: number({ min: 0, minExclusive: true, max: 3 }).optional().meta({ description: 'α in S ∝ 1/f^α (default 1)' }),
  low: quantity('frequency', positive, 'Lower band edge (below it S = 0)'),
  high: quantity('frequency', positive, 'Upper band edge (above it S = 0)'),
  injection: injectionSchema,
});

const telegraphSourceSchema = section({
  name: name().optional().meta({ description: 'Name in the noise budget (default telegraph, telegraph2, …)' }),
  amplitude: kindedQuantity('signalOrEnergy', {}, 'Level added in the upper state'),
  rateUp: quantity('rate', { min: 0 }, 'Rate of lower → upper switches').optional(),
  rateDown: quantity('rate', { min: 0 }, 'Rate of upper → lower switches').optional(),
  dwellLow: quantity('time', positive, 'Mean time in the lower state (1/rateUp)').optional(),
  dwellHigh: quantity('time', positive, 'Mean time in the upper state (1/rateDown)').optional(),
  injection: injectionSchema,
});

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
export const noiseKeys = {
  components: componentsSchema.optional(),
  flicker: z
    .union([flickerSourceSchema, z.array(flickerSourceSchema)], { error: () => 'a 1/f source {density, low, high, injection, …} or a list of them' })
    .optional()
    .meta({ description: '1/f noise: one source or a list' }),
  telegraph: z
    .union([telegraphSourceSchema, z.array(telegraphSourceSchema)], { error: () => 'a fluctuator {amplitude, rates, injection} or a list of them' })
    .optional()
    .meta({ description: 'Random telegraph noise: one two-level fluctuator or a list' }),
};

/** Validated extra noise keys. */
export interface NoiseExtrasDoc {
  components?: z.output<typeof componentsSchema>;
  flicker?: z.output<typeof flickerSourceSchema> | z.output<typeof flickerSourceSchema>[];
  telegraph?: z.output<typeof telegraphSourceSchema> | z.output<typeof telegraphSourceSchema>[];
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
  flicker: FlickerNoiseSpec[];
  telegraph: TelegraphNoiseSpec[];
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
 * Resolves components, 1/f sources and fluctuators under `signal.noise`; pushes where signal
 * units were written into `uses` (for the one-unit check).
 */
export function resolveNoiseExtras(
  doc: NoiseExtrasDoc | undefined, ctx: ResolveContext, inputs: NoiseInputs, uses: SignalUse[],
): ResolvedNoise {
  const at: KeyPath = ['signal', 'noise'];
  const fs = inputs.timing.sampleRate;
  const flickerDocs = list(doc?.flicker);
  const single = (key: string) => (doc && !Array.isArray((doc as Record<string, unknown>)[key]));
  const names = new Set<string>();
  const uniqueName = (given: string | undefined, base: string, i: number, path: KeyPath): string => {
    const n = given ?? (i === 0 ? base : `${base}${i + 1}`);
    if (names.has(n)) ctx.fail(path, `a name not already used in the noise budget ("${n}" is taken)`);
    names.add(n);
    return n;
  };
  for (const w of ['white', 'johnson', 'shot', 'amplifierVoltage', 'amplifierCurrent', 'quantisation']) names.add(w);

  if (flickerDocs.length > MAX_FLICKER_SOURCES) ctx.fail([...at, 'flicker'], `at most ${MAX_FLICKER_SOURCES} 1/f sources`, `${flickerDocs.length}`);
  const telegraphDocs = list(doc?.telegraph);
  if (telegraphDocs.length > MAX_FLUCTUATORS) ctx.fail([...at, 'telegraph'], `at most ${MAX_FLUCTUATORS} fluctuators`, `${telegraphDocs.length}`);
  const flicker: FlickerNoiseSpec[] = flickerDocs.map((f, i) => {
    const p: KeyPath = single('flicker') ? [...at, 'flicker'] : [...at, 'flicker', i];
    const inDetuning = signalOrDetuning(f.density, [...p, 'density'], inputs, uses, ctx);
    if (!(f.high > f.low)) ctx.fail([...p, 'high'], `a frequency above low (${formatQuantity(f.low, 'Hz')})`);
    if (f.high > fs / 2) ctx.fail([...p, 'high'], `a frequency at most half the sample rate (${formatQuantity(fs / 2, 'Hz')})`);
    const exponent = f.exponent ?? 1;
    const reference = f.at ?? 1;
    const amplitude = f.density.value * f.density.value * reference ** exponent;
    const period = inputs.timing.shotPeriod;
    const step = Math.max(1, Math.ceil(BASE_OVERSAMPLING * f.high * period));
    try {
      planFlickerTimeline({ amplitude, exponent, fLo: f.low, fHi: f.high, baseRate: step / period, span: (inputs.shots + 1) * step });
    } catch (e) {
      if (!(e instanceof RangeError)) throw e;
      ctx.fail([...p, 'low'], `a band the 1/f generator can cover (${e.message.replace(/^flicker: /, '')})`);
    }
    if (f.high > fs / 16) {
      ctx.warn([...p, 'high'], `1/f up to ${formatQuantity(f.high, 'Hz')} is generated at ${BASE_OVERSAMPLING}× that rate, above the sample rate / 2: slow`);
    }
    return {
      name: uniqueName(f.name, 'flicker', i, [...p, 'name']), amplitude, exponent, low: f.low, high: f.high,
      injection: f.injection as NoiseInjection, inDetuning,
    };
  });

  const telegraph: TelegraphNoiseSpec[] = telegraphDocs.map((t, i) => {
    const p: KeyPath = single('telegraph') ? [...at, 'telegraph'] : [...at, 'telegraph', i];
    const inDetuning = signalOrDetuning(t.amplitude, [...p, 'amplitude'], inputs, uses, ctx);
    const rate = (r: number | undefined, dwell: number | undefined, rk: string, dk: string): number => {
      if ((r === undefined) === (dwell === undefined)) ctx.fail(p, `either ${rk} or ${dk}`, r === undefined ? 'neither' : 'both');
      return r ?? 1 / dwell!;
    };
    return {
      name: uniqueName(t.name, 'telegraph', i, [...p, 'name']), amplitude: t.amplitude.value,
      rateUp: rate(t.rateUp, t.dwellLow, 'rateUp', 'dwellLow'), rateDown: rate(t.rateDown, t.dwellHigh, 'rateDown', 'dwellHigh'),
      injection: t.injection as NoiseInjection, inDetuning,
    };
  });

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
  return { components, flicker, telegraph };
}
