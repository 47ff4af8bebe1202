/**
 * The analog chain around the noise, under `signal`: the first-order response on the level path
 * (`response`) and the digitizer after the gain (`digitizer`).
 */
import { z } from 'zod';
import type { DigitizerSpec, ResponseSpec } from '../types.ts';
import { integer, oneOf, quantity, section, signalQuantity } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { KeyPath } from '../issues.ts';
import type { SignalUse } from './states.ts';
import { formatQuantity } from '../units.ts';

const positive = { min: 0, minExclusive: true } as const;

/** Keys this file adds to `signal`. */
export const chainKeys = {
  response: section({
    bandwidth: quantity('frequency', positive, 'Bandwidth (−3 dB) f_c; τ = 1/(2π·f_c)').optional(),
    timeConstant: quantity('time', positive, 'Time constant τ (give this or bandwidth)').optional(),
    from: oneOf(['settled', 'zero']).optional().meta({
      description: 'settled: the response starts at the initial level (default); zero: it rings up from 0 at the record start',
    }),
  })
    .optional()
    .meta({ description: 'First-order analog response on the level path (sensor bandwidth, resonator ring-up)' }),
  digitizer: section({
    low: signalQuantity('signal', {}, 'Lowest input the digitizer represents (after the gain)'),
    high: signalQuantity('signal', {}, 'Highest input the digitizer represents (after the gain)'),
    bits: integer(1, 24, 'an integer from 1 to 24').optional().meta({ description: 'ADC bits (default: no quantisation, clipping only)' }),
  })
    .optional()
    .meta({ description: 'Digitizer: clipping range and ADC resolution, after the gain' }),
};

/** Validated keys of this file. */
export interface ChainDoc {
  response?: z.output<typeof chainKeys.response>;
  digitizer?: z.output<typeof chainKeys.digitizer>;
}

/** Resolves the response (τ from the bandwidth if needed) and the digitizer range. */
export function resolveChain(doc: ChainDoc, ctx: ResolveContext, sampleRate: number, uses: SignalUse[]): { response: ResponseSpec | null; digitizer: DigitizerSpec | null } {
  let response: ResponseSpec | null = null;
  const r = doc.response;
  if (r) {
    const at: KeyPath = ['signal', 'response'];
    if ((r.bandwidth === undefined) === (r.timeConstant === undefined)) {
      ctx.fail(at, 'either bandwidth or timeConstant', r.bandwidth === undefined ? 'neither' : 'both');
    }
    const timeConstant = r.timeConstant ?? 1 / (2 * Math.PI * r.bandwidth!);
    if (timeConstant * sampleRate < 0.1) {
      ctx.warn([...at, r.bandwidth === undefined ? 'timeConstant' : 'bandwidth'], `τ = ${formatQuantity(timeConstant, 's')} is far below one sample: the response has no visible effect`);
    }
    response = { timeConstant, from: r.from ?? 'settled' };
  }
  let digitizer: DigitizerSpec | null = null;
  const d = doc.digitizer;
  if (d) {
    const at: KeyPath = ['signal', 'digitizer'];
    uses.push({ path: [...at, 'low'], unit: d.low.unit }, { path: [...at, 'high'], unit: d.high.unit });
    if (!(d.high.value > d.low.value)) ctx.fail([...at, 'high'], 'a value above low');
    digitizer = { low: d.low.value, high: d.high.value, bits: d.bits ?? null };
  }
  return { response, digitizer };
}
