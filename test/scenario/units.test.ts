import { describe, expect, it } from 'vitest';
import {
  DIMENSIONS,
  formatQuantity,
  matchDimension,
  parseQuantity,
  UnitSyntaxError,
  type DimensionName,
} from '../../src/scenario/units.ts';

// Unit factors are definitions (SI Brochure, 9th ed., 2019: prefixes, 1 eV = 1.602176634e-19 J).
const e = 1.602176634e-19;

describe('parseQuantity', () => {
  it.each<[string | number, number, DimensionName | 'plain']>([
    ['20 us', 2e-5, 'time'],
    ['20us', 2e-5, 'time'],
    ['20 µs', 2e-5, 'time'],
    ['20 μs', 2e-5, 'time'],
    ['0.02 ms', 2e-5, 'time'],
    ['5 ns', 5e-9, 'time'],
    ['1.5 s', 1.5, 'time'],
    ['100 MHz', 1e8, 'frequency'],
    ['5 kHz', 5e3, 'rate'],
    ['5 /s', 5, 'rate'],
    ['5 1/s', 5, 'rate'],
    ['2 s^-1', 2, 'rate'],
    ['120 pA', 1.2e-10, 'signal'],
    ['1.5 mV', 1.5e-3, 'signal'],
    ['2 fA/rtHz', 2e-15, 'noiseDensity'],
    ['2 fA/sqrt(Hz)', 2e-15, 'noiseDensity'],
    ['2 fA/√Hz', 2e-15, 'noiseDensity'],
    ['3 nV/rtHz', 3e-9, 'noiseDensity'],
    ['150 ueV', 150e-6 * e, 'energy'],
    ['1 eV', e, 'energy'],
    ['2e-23 J', 2e-23, 'energy'],
    ['120 mK', 0.12, 'temperature'],
    ['4 K', 4, 'temperature'],
    ['1 MOhm', 1e6, 'resistance'],
    ['10 kΩ', 1e4, 'resistance'],
    ['2 meV/ns', (2e-3 * e) / 1e-9, 'sweepRate'],
    ['7 eV/s', 7 * e, 'sweepRate'],
    ['3 J/s', 3, 'sweepRate'],
    ['180 deg', Math.PI, 'angle'],
    ['90°', Math.PI / 2, 'angle'],
    ['0.5 rad', 0.5, 'angle'],
    ['250 mrad', 0.25, 'angle'],
    ['-3.5e-2 V', -3.5e-2, 'signal'],
    [' 7 ', 7, 'plain'],
    [42, 42, 'plain'],
  ])('%j → %d (%s)', (input, expected, kind) => {
    const q = parseQuantity(input);
    const tol = 1e-15 * Math.abs(expected);
    expect(Math.abs(q.value - expected), `${input}: actual ${q.value}, expected ${expected}, tol ${tol}`).toBeLessThanOrEqual(tol);
    if (kind === 'plain') expect(q.plain).toBe(true);
    else {
      expect(q.plain).toBe(false);
      expect(matchDimension(q, kind), `${input} should be ${kind}`).toBeGreaterThanOrEqual(0);
    }
  });

  it.each([
    ['20 us', 'frequency'],
    ['100 MHz', 'time'],
    ['120 pA', 'noiseDensity'],
    ['2 fA/rtHz', 'signal'],
    ['150 ueV', 'temperature'],
    ['2 meV', 'sweepRate'],
    ['30 deg', 'time'],
  ] as const)('%s is not %s', (input, kind) => {
    expect(matchDimension(parseQuantity(input), kind)).toBe(-1);
  });

  it.each([
    ['20 us', 2e-5],
    ['0.3 ns', 0.3e-9],
    ['7 fA', 7e-15],
    ['12.5 mK', 12.5e-3],
    ['3 GHz', 3e9],
  ])('%s is the same double as the literal %d (prefixes applied by one exact scaling)', (input, literal) => {
    // 20 · 1e-6 would give 1.9999999999999998e-5; 20 / 1e6 rounds correctly to 2e-5.
    expect(parseQuantity(input).value).toBe(literal);
  });

  it('accepts plain numbers as SI for every dimension', () => {
    for (const kind of Object.keys(DIMENSIONS) as DimensionName[]) {
      expect(matchDimension(parseQuantity(3), kind)).toBe(0);
    }
  });

  it.each([
    ['100 MHZ', /unknown unit "MHZ" \(did you mean "MHz"\?\)/],
    ['5 parsecs', /unknown unit "parsecs"/],
    ['fast', /not a number followed by a unit/],
    ['', /not a number/],
    ['5 A/', /missing unit/],
    ['5 A/(Hz', /missing "\)"/],
    ['1e400 s', /not a finite number/],
    ['5 kdeg', /unknown unit "kdeg"/],
    ['3 s s', /unexpected/],
  ])('%j is refused: %s', (input, message) => {
    expect(() => parseQuantity(input)).toThrow(UnitSyntaxError);
    expect(() => parseQuantity(input)).toThrow(message);
  });

  it('refuses non-finite numbers', () => {
    expect(() => parseQuantity(Number.POSITIVE_INFINITY)).toThrow(UnitSyntaxError);
    expect(() => parseQuantity(Number.NaN)).toThrow(UnitSyntaxError);
  });
});

describe('formatQuantity', () => {
  it.each<[number, string, string]>([
    [2e-5, 's', '20 µs'],
    [1e8, 'Hz', '100 MHz'],
    [1.2e-10, 'A', '120 pA'],
    [5e-14, 'A/√Hz', '50 fA/√Hz'],
    [-3e-3, 'V', '-3 mV'],
    [0, 's', '0 s'],
    [1, 's', '1 s'],
    [1500, 'Hz', '1.5 kHz'],
    [999.99, 's', '1 ks'],
    [0.123456, 'K', '123.5 mK'],
    [30, 'deg', '30 deg'],
    [0.5, '', '0.5'],
    [1e-20, 'A', '1e-20 A'],
    [Number.POSITIVE_INFINITY, 's', 'Infinity s'],
  ])('%d %s → %s', (value, unit, expected) => {
    expect(formatQuantity(value, unit)).toBe(expected);
  });

  it('shows energies in eV and angles in degrees, as scenario files write them', () => {
    expect(formatQuantity(150e-6 * e, 'J')).toBe('150 µeV');
    expect(formatQuantity(Math.PI / 6, 'rad')).toBe('30 deg');
    expect(formatQuantity(-2e-3 * e, 'J')).toBe('-2 meV');
  });

  it('takes the number of significant digits', () => {
    expect(formatQuantity(0.123456, 'K', 2)).toBe('120 mK');
  });
});
