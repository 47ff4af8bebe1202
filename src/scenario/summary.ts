/**
 * A one-line description of a resolved scenario, for `check`, logs and the report's header.
 * What a sweep varies is described by its range, never by the base value the sweep replaces.
 */
import type { Scenario, SweepAxis } from './types.ts';
import { formatQuantity } from './units.ts';

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

/** "1 µs to 16 µs (9 values)" for a swept value. */
function sweptRange(a: SweepAxis): string {
  const lo = Math.min(...a.values), hi = Math.max(...a.values);
  const f = (x: number) => formatQuantity(x, a.unit);
  return lo === hi ? f(lo) : `${f(lo)} to ${f(hi)} (${a.values.length} values)`;
}

/**
 * E.g. `2 states, outcomes "0"/"1", 1 transition, 1 pipeline, 100000 shots, 10 µs window of a 20 µs record at 10 MHz, baseband`;
 * on a sweep of the window, `… window swept over 1 µs to 16 µs (9 values) of an 18 µs record …`.
 */
export function describeScenario(s: Scenario): string {
  const t = s.timing;
  const swept = (key: string) => s.sweep?.axes.find((a) => a.key === key);
  /** "at 50 MHz", or "at a sample rate swept over …" when swept. */
  const at = (key: string, what: string, x: number, unit: string) => {
    const a = swept(key);
    return a ? `${what} swept over ${sweptRange(a)}` : `at ${formatQuantity(x, unit)}`;
  };
  const length = swept('timing.window.length');
  const start = swept('timing.window.start');
  const window = `${length ? `window swept over ${sweptRange(length)}` : `${formatQuantity(t.windowLength, 's')} window`}${start ? ` starting ${sweptRange(start)} into the record` : ''}`;
  const recordSwept = swept('timing.recordLength');
  const record = recordSwept ? `a record swept over ${sweptRange(recordSwept)}` : `a ${formatQuantity(t.recordLength, 's')} record`;
  const shape = s.signal.carrier.shape;
  const carrier =
    shape === 'none' ? 'baseband'
      : shape === 'baseband-iq' ? 'baseband I and Q'
        : `${shape} carrier ${at('signal.carrier.frequency', 'with its frequency', s.signal.carrier.frequency, 'Hz')}`;
  return [
    plural(s.states.length, 'state'),
    `outcomes ${s.outcomes.map((o) => JSON.stringify(o)).join('/')}`,
    plural(s.transitions.length, 'transition'),
    plural(s.pipelines.length, 'pipeline'),
    swept('shots') ? `shots swept over ${sweptRange(swept('shots')!)}` : `${s.shots} shots`,
    `${window} of ${record} ${at('timing.sampleRate', 'with the sample rate', t.sampleRate, 'Hz')}`,
    carrier,
  ].join(', ');
}
