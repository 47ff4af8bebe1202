/** The one-line description of a scenario (check, the report's header): a sweep is described by what it sweeps. */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadScenarioText } from '../../src/scenario/load.ts';
import { describeScenario } from '../../src/scenario/summary.ts';

const sweep = readFileSync('scenarios/demo-sweep.yaml', 'utf8');

describe('describeScenario', () => {
  it('on a sweep of the window names the swept range, not the base window', () => {
    const line = describeScenario(loadScenarioText(sweep, 'demo-sweep.yaml').scenario);
    expect(line).toContain('window swept over 1 µs to 16 µs (9 values) of a 18 µs record at 20 MHz');
    expect(line).not.toContain('8 µs window');
  });

  it('names every swept quantity it shows (start, record, sample rate, carrier)', () => {
    const text = sweep.replace(/vary:[\s\S]*$/, `vary:
    - key: timing.window.start
      values: ["0.5 us", "1 us"]
    - key: timing.sampleRate
      values: ["20 MS/s", "40 MS/s"]
    - key: signal.carrier.frequency
      values: ["1 MHz", "2 MHz", "3 MHz"]
`);
    const line = describeScenario(loadScenarioText(text, 'x.yaml').scenario);
    expect(line).toContain('8 µs window starting 500 ns to 1 µs (2 values) into the record of a 18 µs record with the sample rate swept over 20 MHz to 40 MHz (2 values)');
    expect(line).toContain('sine carrier with its frequency swept over 1 MHz to 3 MHz (3 values)');
  });

  it('without a sweep gives the values', () => {
    const line = describeScenario(loadScenarioText(readFileSync('scenarios/demo.yaml', 'utf8'), 'demo.yaml').scenario);
    expect(line).toBe('2 states, outcomes "0"/"1", 1 transition, 1 pipeline, 200000 shots, 8 µs window of a 12 µs record at 50 MHz, sine carrier at 1 MHz');
  });
});
