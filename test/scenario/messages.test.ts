/**
 * Messages about scenario files: every problem of a file at once (one line each, up to
 * MAX_REPORTED_ERRORS, in the order of the document), sample rates in S/s, energies written as
 * frequencies (h·f), and suggestions that point to the key or unit meant.
 */
import { describe, expect, it } from 'vitest';
import { stringify } from 'yaml';
import { InputError, InputErrors, MAX_REPORTED_ERRORS } from '../../src/errors.ts';
import { loadScenarioText } from '../../src/scenario/load.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import { parseQuantity } from '../../src/scenario/units.ts';
import { editDistance } from '../../src/scenario/suggest.ts';
import { section } from '../../src/scenario/fields.ts';
import { z } from 'zod';
import { runCli } from '../support/cli.ts';

// CODATA 2018 exact values (SI Brochure, 9th ed., 2019)
const h = 6.62607015e-34;
const e = 1.602176634e-19;

const FILE = 'test.yaml';

/** A small valid document to break. */
function base(): Record<string, any> {
  return {
    name: 'messages', shots: 2048, calibrationShots: 2048,
    timing: { sampleRate: '20 MHz', recordLength: '4 us', window: { start: '0.5 us', length: '3 us' } },
    states: [{ name: 'low', level: '0 pA', outcome: '0' }, { name: 'high', level: '80 pA', outcome: '1' }],
    preparationError: { low: { thermal: { splitting: '90 ueV', temperature: '140 mK' }, into: 'high' } },
    mappingError: { high: { landauZener: { coupling: '2 ueV', sweepRate: '5 meV/us' }, into: 'low' } },
    transitions: [{ from: 'high', to: 'low', lifetime: '60 us' }],
    signal: { carrier: { shape: 'sine', frequency: '2 MHz' }, noise: { white: { density: '30 fA/rtHz' } } },
  };
}

/** The InputError a document gives (fails the test when it is accepted). */
function refusal(doc: unknown): InputError {
  try {
    resolveScenario(doc, FILE);
  } catch (err) {
    if (err instanceof InputError) return err;
    throw err;
  }
  throw new Error('the document was accepted');
}

const lines = (err: InputError) => err.message.split('\n');

describe('every problem of a file at once', () => {
  it('a file with three mistakes in three sections reports all three through the CLI, one line each, exit 2', async () => {
    const file = 'test/fixtures/messages/three-mistakes.yaml';
    for (const args of [['check', file], ['run', file, '--out', 'unused-out', '--quiet']]) {
      const r = await runCli(args);
      expect(r.code).toBe(2);
      const out = r.stderr.trimEnd().split('\n');
      expect(out, r.stderr).toEqual([
        `singleshot: ${file}: timing.window.length: expected a length that ends inside the record (at most 11 µs after a start of 1 µs), found "20 us"`,
        `singleshot: ${file}: states[1].level: expected a signal level (e.g. "120 pA"), found "120 pX" (unknown unit "pX" (did you mean "pA"?))`,
        `singleshot: ${file}: transitions[0].T1: expected a known key (did you mean "lifetime"?), found an unknown key`,
      ]);
    }
  });

  it('complex levels without a carrier beside a bad lifetime: both, in the order of the file', async () => {
    const file = 'test/fixtures/messages/complex-levels-and-a-bad-lifetime.yaml';
    const r = await runCli(['check', file]);
    expect(r.code).toBe(2);
    expect(r.stderr.trimEnd().split('\n'), r.stderr).toEqual([
      `singleshot: ${file}: states[0].level: expected a real level (complex levels need a carrier, or signal.carrier: baseband-iq for I and Q recorded as two baseband channels), found a mapping`,
      `singleshot: ${file}: transitions[0].lifetime: expected a time > 0, found "-3 us"`,
    ]);
  });

  it('schema problems and section problems together, in the order of the document', () => {
    const doc = base();
    doc.shots = 'many';                                     // schema: not an integer
    doc.transitions[0].to = 'lo';                           // section: no such state
    doc.timing.window.length = '10 us';                     // section: past the record
    doc.signal.noise.white.density = '30 fA/rtHZ';          // schema: unknown unit
    const err = refusal(doc);
    expect(err).toBeInstanceOf(InputErrors);
    expect(lines(err).map((l) => l.split(': ')[1])).toEqual(['shots', 'timing.window.length', 'transitions[0].to', 'signal.noise.white.density']);
    for (const l of lines(err)) expect(l).toMatch(/^test\.yaml: [^:]+: expected .+, found .+$/);
    expect(err.path).toBe('shots');
    expect(lines(err)[2]).toContain('(did you mean "low"?)');
  });

  it('a section that reads a key with a problem is not checked again (no follow-on errors)', () => {
    const doc = base();
    doc.states[1].outcome = ['1'];                          // the states section fails the schema
    const err = refusal(doc);
    // prepare, flips and transitions name states; with the states broken they report nothing
    expect(lines(err)).toHaveLength(1);
    expect(err.path).toBe('states[1].outcome');
  });

  it(`at most ${MAX_REPORTED_ERRORS} lines, then one counting the rest`, () => {
    const doc = base();
    for (let i = 0; i < 25; i++) doc.timing[`extra${i}`] = i;
    const err = refusal(doc) as InputErrors;
    expect(err.errors).toHaveLength(25);
    expect(lines(err)).toHaveLength(MAX_REPORTED_ERRORS + 1);
    expect(lines(err)[MAX_REPORTED_ERRORS]).toBe('test.yaml: 5 more problems not shown');
    expect(lines(err)[0]).toBe('test.yaml: timing.extra0: expected one of the keys sampleRate, recordLength, window, shotPeriod, found an unknown key');
  });

  it('a misspelt key is not also reported as a missing required key', () => {
    const doc = base();
    doc.states[0] = { nmae: 'low', level: '0 pA', outcome: '0' };
    expect(lines(refusal(doc))).toEqual(['test.yaml: states[0].nmae: expected a known key (did you mean "name"?), found an unknown key']);
  });
});

describe('suggestions point to the key meant', () => {
  it.each([
    ['nmae', 'name', 1], ['name', 'name', 0], ['', 'abc', 3], ['kitten', 'sitting', 3], ['ab', 'ba', 1], ['abc', 'ca', 3], ['lifetme', 'lifetime', 1],
  ])('edit distance %j → %j is %d (a swap of neighbours is one edit)', (a, b, d) => {
    expect(editDistance(a, b)).toBe(d);
    expect(editDistance(b, a)).toBe(d);
  });

  it.each([
    ['T1', 'lifetime'], ['t1', 'lifetime'], ['tau', 'lifetime'], ['gamma', 'rate'], ['lifetme', 'lifetime'],
  ])('%s in a transition suggests %s', (key, meant) => {
    const doc = base();
    doc.transitions[0] = { from: 'high', to: 'low', [key]: '60 us' };
    expect(lines(refusal(doc))).toEqual([`test.yaml: transitions[0].${key}: expected a known key (did you mean "${meant}"?), found an unknown key`]);
  });

  it('a key the mapping does not have yet before one it has', () => {
    const shape = section({ gate1: z.number().optional(), gate2: z.number().optional() });
    const unknown = (r: { error?: z.ZodError }) => r.error!.issues.find((i) => i.code === 'unrecognized_keys')!.message;
    // "gate3" is one edit from both; gate1 is written, so gate2 is the one meant
    const r = shape.safeParse({ gate1: 1, gate3: 2 }, { reportInput: true });
    expect(r.success).toBe(false);
    expect(unknown(r)).toBe('a known key (did you mean "gate2"?)');
    // with no free key close, a written one is still suggested (a misspelt duplicate)
    const again = shape.safeParse({ gate1: 1, gate2: 2, gate3: 3 }, { reportInput: true });
    expect(unknown(again)).toBe('a known key (did you mean "gate1"?)');
  });

  it('one line per unknown key of a mapping, each with its own suggestion', () => {
    const doc = base();
    doc.transitions[0] = { form: 'high', to: 'low', T1: '60 us' };
    expect(lines(refusal(doc))).toEqual([
      'test.yaml: transitions[0].form: expected a known key (did you mean "from"?), found an unknown key',
      'test.yaml: transitions[0].T1: expected a known key (did you mean "lifetime"?), found an unknown key',
    ]);
  });

  it('T for a temperature, fs for a sample rate', () => {
    const doc = base();
    doc.preparationError.low.thermal = { splitting: '90 ueV', T: '140 mK' };
    doc.timing = { fs: '20 MHz', recordLength: '4 us' };
    expect(lines(refusal(doc))).toEqual([
      'test.yaml: timing.fs: expected a known key (did you mean "sampleRate"?), found an unknown key',
      'test.yaml: preparationError.low.thermal.T: expected a known key (did you mean "temperature"?), found an unknown key',
    ]);
  });

  it('an unknown unit is compared with the units the key takes first', () => {
    const doc = base();
    doc.states[1].level = '80 pX';
    doc.transitions[0].lifetime = '60 uz';
    expect(lines(refusal(doc))).toEqual([
      'test.yaml: states[1].level: expected a signal level (e.g. "120 pA"), found "80 pX" (unknown unit "pX" (did you mean "pA"?))',
      'test.yaml: transitions[0].lifetime: expected a time (e.g. "20 us"), found "60 uz" (unknown unit "uz" (did you mean "us"?))',
    ]);
  });
});

describe('sample rates in samples per second', () => {
  it.each([
    ['50 MS/s', 50e6], ['1 GS/s', 1e9], ['250 kS/s', 250e3], ['2.5 GSa/s', 2.5e9], ['100 MSPS', 100e6], ['20 Msps', 20e6],
  ])('%s is %d Hz', (text, hz) => {
    expect(parseQuantity(text).value).toBeCloseTo(hz, 6);
    const doc = base();
    doc.timing.sampleRate = text;
    if (hz < 1e6) doc.timing = { sampleRate: text, recordLength: '400 us', window: { start: '50 us', length: '300 us' } };
    expect(resolveScenario(doc, FILE).scenario.timing.sampleRate).toBeCloseTo(hz, 6);
  });

  it('"50 MS" (no /s) suggests MS/s, never megaseconds', () => {
    const doc = base();
    doc.timing.sampleRate = '50 MS';
    const [line] = lines(refusal(doc));
    expect(line).toContain('did you mean "MS/s", samples per second?');
    expect(line).not.toMatch(/"Ms"|megasecond/);
  });
});

describe('energies written as frequencies: E = h·f', () => {
  it.each([
    ['thermal splitting', (d: Record<string, any>, v: string) => { d.preparationError.low.thermal.splitting = v; }, (s: any) => s.preparationError[0].origin as string],
  ])('%s: "21.76 GHz" and "21.76 GHz*h" equal h·21.76 GHz', (_what, put, origin) => {
    const joules = h * 21.76e9;
    const asEv = `${Number((joules / e * 1e6).toPrecision(4))} µeV`;
    for (const v of ['21.76 GHz', '21.76 GHz*h', '21.76 h·GHz']) {
      const doc = base();
      put(doc, v);
      expect(origin(resolveScenario(doc, FILE).scenario), v).toContain(asEv);
    }
  });

  it('a Landau–Zener coupling as a frequency gives the same probability as the energy h·f', () => {
    const inEnergy = base(), inFrequency = base();
    inEnergy.mappingError.high.landauZener.coupling = `${(h * 480e6) / e} eV`;
    inFrequency.mappingError.high.landauZener.coupling = '480 MHz';
    const p = (d: unknown) => resolveScenario(d, FILE).scenario.mappingError[1]!.probability;
    expect(p(inFrequency)).toBeCloseTo(p(inEnergy), 14);
  });

  it('a frequency is still refused where no energy is meant', () => {
    const doc = base();
    doc.states[1].level = '5 GHz';
    expect(lines(refusal(doc))).toEqual(['test.yaml: states[1].level: expected a signal level (e.g. "120 pA"), found "5 GHz"']);
  });

  it('a sweep over an energy may list frequencies', () => {
    const text = stringify({ ...base(), sweep: { vary: [{ key: 'preparationError.low.thermal.splitting', values: ['20 GHz', '90 ueV'] }] } });
    const axis = loadScenarioText(text, FILE).scenario.sweep!.axes[0]!;
    expect(axis.unit).toBe('J');
    expect(axis.values[0]).toBeCloseTo(h * 20e9, 30);
    expect(axis.values[1]).toBeCloseTo(90e-6 * e, 30);
  });
});
