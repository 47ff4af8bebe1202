import { describe, expect, it } from 'vitest';
import { butterworthSections } from '../../src/dsp/butterworth.ts';
import { applySections, makeSectionState } from '../../src/dsp/sosfilt.ts';
import { expectAllClose, filterInChunks, loadFixture, xorshiftRecord } from './helpers.ts';

interface SosfiltCase {
  order: number;
  cutoff: number;
  sampleRate: number;
  sos: number[];
  filtered: number[];
}
// reference library: scipy.signal.sosfilt, test/fixtures/make-butterworth.py
const fixture = loadFixture<{ record: number[]; cases: SosfiltCase[] }>('butterworth');
const cases = fixture.cases.map((c) => ({ ...c, name: `order ${c.order}, fc ${c.cutoff} Hz, fs ${c.sampleRate} Hz` }));

describe('applySections against scipy.signal.sosfilt', () => {
  it.each(cases)('scipy sos on the seeded record: $name', ({ sos, filtered }) => {
    const coefficients = Float64Array.from(sos);
    const out = applySections(coefficients, Float64Array.from(fixture.record), new Float64Array(filtered.length), makeSectionState(sos.length / 6));
    // Same DF-II-transposed recurrence and operation order: rounding-level agreement.
    const scale = Math.max(...filtered.map(Math.abs));
    expectAllClose('y', out, filtered, () => 1e-13 * scale);
  });
});

describe('state in, state out', () => {
  const record = xorshiftRecord(0x5eed_0001, 20_000);
  const designs = [
    { name: 'order 4 at fs/20', design: butterworthSections(4, 50e3, 1e6) },
    { name: 'order 7 at fs/100', design: butterworthSections(7, 1e6, 100e6) },
    { name: 'order 3 near Nyquist', design: butterworthSections(3, 8e6, 20e6) },
  ];

  it.each(designs)('chunked filtering with carried state equals one call exactly: $name', ({ design }) => {
    const wholeState = makeSectionState(design.sections);
    const whole = applySections(design.sos, record, new Float64Array(record.length), wholeState);
    const chunkState = makeSectionState(design.sections);
    const chunked = filterInChunks((i, o, s) => applySections(design.sos, i, o, s), record, chunkState, [1, 7, 100, 1023, 2, 4096]);
    expectAllClose('chunked y', chunked, whole, () => 0);
    expectAllClose('final state', chunkState, wholeState, () => 0);
  });

  it.each(designs)('in place (output = input) equals a separate output: $name', ({ design }) => {
    const separate = applySections(design.sos, record, new Float64Array(record.length), makeSectionState(design.sections));
    const buffer = record.slice();
    const returned = applySections(design.sos, buffer, buffer, makeSectionState(design.sections));
    expect(returned).toBe(buffer);
    expectAllClose('in-place y', buffer, separate, () => 0);
  });

  it('an empty input leaves the state unchanged', () => {
    const { sos, sections } = butterworthSections(4, 50e3, 1e6);
    const state = makeSectionState(sections);
    applySections(sos, record.subarray(0, 50), new Float64Array(50), state);
    const before = state.slice();
    applySections(sos, new Float64Array(0), new Float64Array(0), state);
    expectAllClose('state', state, before, () => 0);
  });

  it('makeSectionState gives 2 × sections zeros', () => {
    const state = makeSectionState(4);
    expect(state.length).toBe(8);
    expect(state.every((v) => v === 0)).toBe(true);
  });
});
