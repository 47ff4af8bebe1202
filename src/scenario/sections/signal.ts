/**
 * Signal section: the signal unit, carrier, gain and white noise; also checks that every
 * level, noise figure and threshold is written in the same unit.
 */
import { z } from 'zod';
import type { CarrierSpec, SignalSpec, StateSpec, TimingSpec } from '../types.ts';
import { number, oneOf, quantity, section, signalQuantity } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { SignalUse } from './states.ts';
import { formatPath } from '../issues.ts';
import { formatQuantity } from '../units.ts';
import { noiseKeys, resolveNoiseExtras } from './noise.ts';
import { chainKeys, resolveChain } from './response.ts';

const positive = { min: 0, minExclusive: true } as const;

const carrierSchema = z
  .union(
    [
      z.literal('none'),
      z.literal('baseband-iq'),
      section({
        // baseband I and Q has no carrier: say how it is written when it turns up here
        shape: z.enum(['sine', 'square'], { error: () => 'one of "sine", "square" (baseband I and Q has no carrier: write carrier: baseband-iq, without frequency or phase)' }),
        frequency: quantity('frequency', positive, 'Carrier frequency'),
        phase: quantity('angle', {}, 'Carrier phase (default 0)').optional(),
      }),
    ],
    { error: () => '"none", "baseband-iq" or a mapping {shape, frequency, phase}' },
  )
  .meta({ description: '"none" (one baseband channel), "baseband-iq" (I and Q recorded as two baseband channels) or a sine or square carrier' });

const whiteSchema = section({
  density: signalQuantity('noiseDensity', { min: 0 }, 'One-sided amplitude density').optional(),
  perSample: signalQuantity('signal', { min: 0 }, 'Standard deviation per sample (density·√(fs/2))').optional(),
}).meta({ description: 'White noise: give density or perSample' });

const signalSchema = section({
  unit: oneOf(['A', 'V', 'none']).optional().meta({ description: 'Signal unit (default: inferred from the levels)' }),
  carrier: carrierSchema.optional(),
  gain: number(positive).optional().meta({ description: 'Gain applied before digitisation (default 1)' }),
  noise: section({ white: whiteSchema.optional(), ...noiseKeys }).optional().meta({ description: 'Additive noise' }),
  ...chainKeys,
})
  .optional()
  .meta({ description: 'Signal chain: unit, carrier, gain, noise' });

/** Top-level keys of the signal section. */
export const signalShape = { signal: signalSchema };

/** Validated signal keys. */
export type SignalDoc = z.output<typeof signalSchema>;

/** What the signal resolver reads from other sections. */
export interface SignalInputs {
  states: StateSpec[];
  /** Where levels (and thresholds) were written, with their units. */
  uses: SignalUse[];
  timing: TimingSpec;
  /** Scored shots per point (sizes the 1/f timeline). */
  shots?: number;
  /** Whether a sensor section exists (noise in detuning units). */
  hasSensor?: boolean;
}

/** Resolves the carrier, noise and unit; makes levels real on one baseband channel; warns on aliasing. */
export function resolveSignal(doc: SignalDoc, ctx: ResolveContext, inputs: SignalInputs): SignalSpec {
  const s = doc ?? {};
  const at = ['signal'];
  const carrier: CarrierSpec =
    s.carrier === undefined || s.carrier === 'none' || s.carrier === 'baseband-iq'
      ? { shape: s.carrier ?? 'none', frequency: 0, phase: 0 }
      : { shape: s.carrier.shape, frequency: s.carrier.frequency, phase: s.carrier.phase ?? 0 };

  const uses = [...inputs.uses];
  let density: number | null = null;
  const white = s.noise?.white;
  if (white !== undefined) {
    const whiteAt = [...at, 'noise', 'white'];
    if (white.density !== undefined && white.perSample === undefined) {
      density = white.density.value;
      uses.push({ path: [...whiteAt, 'density'], unit: white.density.unit });
    } else if (white.perSample !== undefined && white.density === undefined) {
      density = white.perSample.value / Math.sqrt(inputs.timing.sampleRate / 2);
      uses.push({ path: [...whiteAt, 'perSample'], unit: white.perSample.unit });
    } else {
      ctx.fail(whiteAt, 'either density or perSample', white.density === undefined ? 'neither' : 'both');
    }
  }
  const extras = resolveNoiseExtras(s.noise, ctx, { timing: inputs.timing, shots: inputs.shots ?? 0, hasSensor: inputs.hasSensor ?? false }, uses);
  const chain = resolveChain(s, ctx, inputs.timing.sampleRate, uses);
  const unit = agreeUnit(s.unit, uses, ctx);

  if (carrier.shape === 'none') {
    inputs.states.forEach((st, i) => {
      const scale = Math.max(Math.abs(st.level.re), Math.abs(st.level.im));
      if (Math.abs(st.level.im) > 1e-12 * scale) {
        ctx.fail(['states', i, 'level'], 'a real level (complex levels need a carrier, or signal.carrier: baseband-iq for I and Q recorded as two baseband channels)');
      }
      st.level.im = 0;
    });
  } else if (carrier.shape !== 'baseband-iq') {
    const { sampleRate, windowLength } = inputs.timing;
    const f = carrier.frequency;
    const key = [...at, 'carrier', 'frequency'];
    if (sampleRate < 2 * f) {
      ctx.warn(key, `${formatQuantity(f, 'Hz')} is above half the sample rate (${formatQuantity(sampleRate, 'Hz')}): the carrier aliases`);
    }
    if (1 / f > windowLength) {
      ctx.warn(key, `one carrier period (${formatQuantity(1 / f, 's')}) is longer than the window (${formatQuantity(windowLength, 's')})`);
    }
  }
  return {
    carrier, gain: s.gain ?? 1, white: density === null ? null : { density }, unit,
    ...(extras.components ? { components: extras.components } : {}),
    ...(extras.sources.length ? { sources: extras.sources } : {}),
    ...(chain.response ? { response: chain.response } : {}),
    ...(chain.digitizer ? { digitizer: chain.digitizer } : {}),
  };
}

/** The one signal unit: the declared one, else the first written; every written unit must agree. */
function agreeUnit(declared: 'A' | 'V' | 'none' | undefined, uses: SignalUse[], ctx: ResolveContext): string {
  const written = uses.filter((u) => u.unit !== null);
  if (declared === 'none') {
    const bad = written[0];
    if (bad) ctx.fail(bad.path, 'a plain number (signal.unit is none)');
    return '';
  }
  const unit = declared ?? written[0]?.unit;
  if (unit === undefined || unit === null) return '';
  const bad = written.find((u) => u.unit !== unit);
  if (bad) {
    const like = declared ? 'as signal.unit says' : `like ${formatPath(written[0]!.path)}`;
    ctx.fail(bad.path, `a value in ${unit === 'A' ? 'amperes' : 'volts'} (${unit}) ${like}`);
  }
  return unit;
}
