/**
 * Timing section: sample rate, record length, integration window and shot period.
 */
import type { z } from 'zod';
import type { TimingSpec } from '../types.ts';
import { quantity, section } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import { formatQuantity } from '../units.ts';
import { firstSampleAtOrAfter } from '../../signal/grid.ts';

/** Relative slack when comparing times computed from different units (e.g. 20 us vs 0.02 ms). */
const SLACK = 1e-9;

const positive = { min: 0, minExclusive: true } as const;

const timingSchema = section({
  sampleRate: quantity('frequency', positive, 'Digitiser sample rate'),
  recordLength: quantity('time', positive, 'Length of one record'),
  window: section({
    start: quantity('time', { min: 0 }, 'Window start from the record start (default 0)').optional(),
    length: quantity('time', positive, 'Window length (default: to the record end)').optional(),
  })
    .optional()
    .meta({ description: 'Integration window inside the record (default: the whole record)' }),
  shotPeriod: quantity(
    'time',
    positive,
    'Time between successive shot starts, at least the record length (default: the record length)',
  ).optional(),
}).meta({ description: 'Sampling and timing of each shot' });

/** Top-level keys of the timing section. */
export const timingShape = { timing: timingSchema };

/** Validated timing keys. */
export type TimingDoc = z.output<typeof timingSchema>;

/** Fills the timing defaults and checks the window against the record. */
export function resolveTiming(doc: TimingDoc, ctx: ResolveContext): TimingSpec {
  const { sampleRate, recordLength } = doc;
  const samplePeriod = 1 / sampleRate;
  const t = (x: number) => formatQuantity(x, 's');
  const recordSamples = firstSampleAtOrAfter(recordLength, sampleRate);
  if (recordSamples < 1) {
    ctx.fail(['timing', 'recordLength'], `a record of at least one sample (${t(samplePeriod)} at ${formatQuantity(sampleRate, 'Hz')})`);
  }
  const windowStart = doc.window?.start ?? 0;
  if (windowStart >= recordLength * (1 - SLACK)) {
    ctx.fail(['timing', 'window', 'start'], `a time inside the record (before ${t(recordLength)})`);
  }
  const room = recordLength - windowStart;
  const windowLength = doc.window?.length ?? room;
  if (windowLength > room * (1 + SLACK)) {
    ctx.fail(
      ['timing', 'window', 'length'],
      `a length that ends inside the record (at most ${t(room)} after a start of ${t(windowStart)})`,
    );
  }
  // Sample k sits at k/fs; the window [start, start + length) must hold at least one.
  const windowSamples =
    Math.min(recordSamples, firstSampleAtOrAfter(windowStart + windowLength, sampleRate)) -
    Math.min(recordSamples, firstSampleAtOrAfter(windowStart, sampleRate));
  if (windowSamples < 1) {
    ctx.fail(
      ['timing', 'window', doc.window?.length === undefined ? 'start' : 'length'],
      `a window that holds at least one sample (samples are ${t(samplePeriod)} apart at ${formatQuantity(sampleRate, 'Hz')})`,
    );
  }
  const shotPeriod = doc.shotPeriod ?? recordLength;
  if (shotPeriod < recordLength * (1 - SLACK)) {
    ctx.fail(['timing', 'shotPeriod'], `a time at least the record length (${t(recordLength)})`);
  }
  return { sampleRate, recordLength, windowStart, windowLength: Math.min(windowLength, room), shotPeriod };
}
