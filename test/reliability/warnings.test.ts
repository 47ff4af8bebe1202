/**
 * Plausibility warnings: legal but probably unintended scenarios resolve with a one-line warning
 * naming the key ("FILE: key.path: text"), and `check` and `run` print each on stderr as
 * "warning: …". A window outside the record stays an error, as does a filter cutoff at or above
 * half the sample rate (no digital design can place it there).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { stringify } from 'yaml';
import { loadScenarioDocument } from '../../src/scenario/load.ts';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { starterScenario } from '../../src/scenario/starter.ts';
import { runMain } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const FILE = 'w.yaml';
const base = mkdtempSync(join(tmpdir(), 'singleshot-warnings-'));
afterAll(() => rmSync(base, { recursive: true, force: true }));

type Doc = Record<string, unknown>;
const starter = () => parseScenarioText(starterScenario(), 'starter.yaml') as Doc;
const demo = () => parseScenarioText(readFileSync(join(ROOT, 'scenarios', 'demo.yaml'), 'utf8'), 'demo.yaml') as Doc;

function warningsOf(doc: Doc): string[] {
  return loadScenarioDocument(doc, FILE).warnings;
}

const WARNINGS: [string, () => Doc, string, RegExp][] = [
  ['sample rate below twice the carrier', () => ({ ...demo(), signal: { ...(demo().signal as Doc), carrier: { shape: 'sine', frequency: '30 MHz' } } }),
    'signal.carrier.frequency', /30 MHz is above half the sample rate \(50 MHz\): the carrier aliases/],
  ['a carrier period longer than the window', () => ({ ...demo(), signal: { ...(demo().signal as Doc), carrier: { shape: 'sine', frequency: '100 kHz' } } }),
    'signal.carrier.frequency', /one carrier period \(10 µs\) is longer than the window \(8 µs\)/],
  ['T1 shorter than a sample', () => ({ ...starter(), transitions: [{ from: 'loaded', to: 'empty', lifetime: '50 ns' }] }),
    'transitions[0].lifetime', /lifetime 50 ns is shorter than one sample \(100 ns\)/],
  ['a threshold outside the levels', () => ({ ...starter(), processing: { threshold: { fixed: '150 pA' } } }),
    'processing.threshold.fixed', /150 pA is outside the span of the levels \(0 A to 100 pA\)/],
  ['two states of one outcome on both sides of the other outcome', () => ({
    ...starter(), prepare: undefined, preparationError: undefined, mappingError: undefined, transitions: undefined,
    states: [{ name: 'a', level: '0 pA', outcome: '0' }, { name: 'b', level: '100 pA', outcome: '1' }, { name: 'c', level: '200 pA', outcome: '0' }],
  }), 'states', /states "a" and "c" \(outcome "0"\) lie on both sides of "b" \(outcome "1"\) along the decision axis: no threshold separates the outcomes/],
  ['two outcomes at the same level', () => ({ ...starter(), states: [{ name: 'empty', level: '50 pA', outcome: '0' }, { name: 'loaded', level: '50 pA', outcome: '1' }] }),
    'states', /states "empty" \(outcome "0"\) and "loaded" \(outcome "1"\) have the same level/],
  ['an outcome with almost no calibration shots', () => ({ ...starter(), prepare: { empty: 1, loaded: 1e-5 } }),
    'prepare', /about 0\.2 of 20000 calibration shots are prepared with outcome "1"/],
  ['a preparation error flipping most shots', () => ({ ...starter(), preparationError: { empty: { probability: 0.7 } } }),
    'preparationError.empty', /probability 0\.7 \(given probability\): at least half of these shots end up in "loaded"/],
  ['a filter cutoff above the Nyquist frequency after decimation', () => ({ ...starter(), processing: { filter: { butterworth: { order: 4, cutoff: '2 MHz' } }, decimate: 5 } }),
    'processing.filter.butterworth.cutoff', /2 MHz is above the Nyquist frequency after decimating by 5 \(1 MHz\)/],
  ['a reference phase on one baseband channel', () => ({ ...starter(), processing: { referencePhase: '30 deg' } }),
    'processing.referencePhase', /an angle has no meaning on one baseband channel \(carrier: none\).*carrier: baseband-iq for I and Q/],
];

describe('plausibility warnings', () => {
  it.each([['starter', starter], ['demo', demo]])('the %s scenario has none', (_name, doc) => {
    expect(warningsOf(doc())).toEqual([]);
  });

  it('a reference phase on baseband I and Q draws no warning (it rotates the IQ plane)', () => {
    const doc = { ...starter(), signal: { ...(starter().signal as Doc), carrier: 'baseband-iq' }, processing: { referencePhase: '30 deg' } };
    expect(warningsOf(doc)).toEqual([]);
  });

  it.each(WARNINGS)('%s → a warning at %s', (_what, make, path, text) => {
    const warnings = warningsOf(make());
    const mine = warnings.filter((w) => w.startsWith(`${FILE}: ${path}: `));
    expect(mine, warnings.join('\n')).toHaveLength(1);
    expect(mine[0]).toMatch(text);
    expect(mine[0]).not.toMatch(/\n/);
  });

  it.each([
    ['a window longer than the record', () => ({ ...starter(), timing: { sampleRate: '10 MHz', recordLength: '20 us', window: { start: '5 us', length: '20 us' } } }),
      /timing\.window\.length: expected a length that ends inside the record/],
    ['a filter cutoff above half the sample rate', () => ({ ...starter(), processing: { filter: { butterworth: { order: 2, cutoff: '6 MHz' } } } }),
      /processing\.filter\.butterworth\.cutoff: expected a cutoff below half the sample rate/],
  ])('%s stays an error', (_what, make, message) => {
    expect(() => loadScenarioDocument(make(), FILE)).toThrow(message);
  });
});

describe('warnings on stderr', () => {
  const file = join(base, 'warned.yaml');
  writeFileSync(file, stringify({ ...starter(), shots: 2048, calibrationShots: 1024, transitions: [{ from: 'loaded', to: 'empty', lifetime: '50 ns' }], processing: { threshold: { fixed: '150 pA' } } }));


  it.each([
    ['check', [file]],
    ['run', [file, '--out', join(base, 'out'), '--no-report', '--workers', '1']],
  ])('%s prints each warning as one "warning: FILE: key: text" line and still succeeds', async (command, args) => {
    const r = await runMain([command, ...args]);
    expect(r.code, r.err).toBe(0);
    const lines = r.err.split('\n').filter((l) => l.startsWith('warning: '));
    expect(lines.some((l) => l.startsWith(`warning: ${file}: transitions[0].lifetime: `)), r.err).toBe(true);
    expect(lines.some((l) => l.startsWith(`warning: ${file}: processing.threshold.fixed: `)), r.err).toBe(true);
  });
});
