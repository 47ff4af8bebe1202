/**
 * A one-line description of a resolved scenario, for `check` and logs.
 */
import type { Scenario } from './types.ts';
import { formatQuantity } from './units.ts';

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

/** E.g. `2 states, outcomes "0"/"1", 1 transition, 1 pipeline, 100000 shots, 10 µs window of a 20 µs record at 10 MHz, baseband`. */
export function describeScenario(s: Scenario): string {
  const t = s.timing;
  const shape = s.signal.carrier.shape;
  const carrier =
    shape === 'none' ? 'baseband'
      : shape === 'baseband-iq' ? 'baseband I and Q'
        : `${shape} carrier at ${formatQuantity(s.signal.carrier.frequency, 'Hz')}`;
  return [
    plural(s.states.length, 'state'),
    `outcomes ${s.outcomes.map((o) => JSON.stringify(o)).join('/')}`,
    plural(s.transitions.length, 'transition'),
    plural(s.pipelines.length, 'pipeline'),
    `${s.shots} shots`,
    `${formatQuantity(t.windowLength, 's')} window of a ${formatQuantity(t.recordLength, 's')} record at ${formatQuantity(t.sampleRate, 'Hz')}`,
    carrier,
  ].join(', ');
}
