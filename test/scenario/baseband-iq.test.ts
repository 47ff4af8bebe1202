/**
 * The scenario side of baseband I and Q (`signal.carrier: baseband-iq`): complex levels are kept,
 * the messages about complex levels and carriers name the choice, and the summary says what the
 * record is. Expected texts are this program's own (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { loadScenarioDocument } from '../../src/scenario/load.ts';
import { describeScenario } from '../../src/scenario/summary.ts';
import { InputError } from '../../src/errors.ts';

const doc = (carrier: unknown, referencePhase?: string) => ({
  name: 'iq',
  timing: { sampleRate: '100 MHz', recordLength: '4 us' },
  states: [
    { name: 'ground', level: { magnitude: '2 mV', phase: '40 deg' }, outcome: '0' },
    { name: 'excited', level: { re: '1 mV', im: '-0.5 mV' }, outcome: '1' },
  ],
  signal: { carrier, noise: { white: { perSample: '1 mV' } } },
  ...(referencePhase ? { processing: { referencePhase } } : {}),
});

function refusal(d: unknown): InputError {
  try {
    loadScenarioDocument(d, 's.yaml');
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('the scenario was accepted');
}

describe('carrier: baseband-iq', () => {
  it('keeps complex levels and records no carrier frequency or phase', () => {
    const { scenario, warnings } = loadScenarioDocument(doc('baseband-iq'), 's.yaml');
    expect(scenario.signal.carrier).toEqual({ shape: 'baseband-iq', frequency: 0, phase: 0 });
    expect(scenario.states[0]!.level.re).toBeCloseTo(2e-3 * Math.cos((40 * Math.PI) / 180), 15);
    expect(scenario.states[0]!.level.im).toBeCloseTo(2e-3 * Math.sin((40 * Math.PI) / 180), 15);
    expect(scenario.states[1]!.level).toEqual({ re: 1e-3, im: -0.5e-3 });
    expect(warnings).toEqual([]);
    expect(describeScenario(scenario)).toMatch(/, baseband I and Q$/);
  });

  it('complex levels under carrier: none are refused in one line that names both ways out', () => {
    const e = refusal(doc('none'));
    expect(e.path).toBe('states[0].level');
    expect(e.message).not.toMatch(/\n/);
    expect(e.message).toMatch(/expected a real level \(complex levels need a carrier, or signal\.carrier: baseband-iq for I and Q recorded as two baseband channels\), found /);
  });

  it('baseband-iq written as a carrier mapping says how to write it', () => {
    const e = refusal(doc({ shape: 'baseband-iq', frequency: '1 MHz' }));
    expect(e.path).toBe('signal.carrier.shape');
    expect(e.message).toMatch(/write carrier: baseband-iq, without frequency or phase\), found "baseband-iq"$/);
  });

  it('an unknown carrier word lists the three choices', () => {
    const e = refusal(doc('iq'));
    expect(e.path).toBe('signal.carrier');
    expect(e.message).toMatch(/expected "none", "baseband-iq" or a mapping \{shape, frequency, phase\}, found "iq"$/);
  });

  it('a reference phase is meaningful on I and Q (no warning) and has no meaning on one real channel (a warning)', () => {
    expect(loadScenarioDocument(doc('baseband-iq', '30 deg'), 's.yaml').warnings).toEqual([]);
    const real = { ...doc('none', '30 deg'), states: [{ name: 'ground', level: '1 mV', outcome: '0' }, { name: 'excited', level: '-1 mV', outcome: '1' }] };
    const w = loadScenarioDocument(real, 's.yaml').warnings;
    expect(w).toHaveLength(1);
    expect(w[0]).toMatch(/^s\.yaml: processing\.referencePhase: an angle has no meaning on one baseband channel/);
  });
});
