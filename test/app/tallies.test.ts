/**
 * tallies.json keeps every number bit for bit (−0, NaN, ±∞, typed arrays of every kind) and
 * turns functions into stubs that refuse to run.
 */
import { describe, expect, it } from 'vitest';
import { decodeData, encodeData } from '../../src/io/plain-data.ts';

describe('tallies codec', () => {
  it('round-trips doubles exactly, special values included', () => {
    const values = [0, -0, 1 / 3, Math.PI * 1e300, 5e-324, -1e-310, NaN, Infinity, -Infinity, 2 ** 53 + 2];
    const back = decodeData(JSON.parse(JSON.stringify(encodeData(values)))) as number[];
    values.forEach((v, i) => expect(Object.is(back[i], v), `${v} came back as ${back[i]}`).toBe(true));
  });

  it('round-trips typed arrays and nested data', () => {
    const data = { a: Float64Array.from([1.5, -0, NaN]), b: [new Uint8Array([1, 2]), new Int32Array([-7])], c: { d: 'x', e: null, f: true } };
    const back = decodeData(JSON.parse(JSON.stringify(encodeData(data)))) as typeof data;
    expect(back.a).toBeInstanceOf(Float64Array);
    expect(Object.is(back.a[1], -0)).toBe(true);
    expect(Number.isNaN(back.a[2])).toBe(true);
    expect(back.b[0]).toBeInstanceOf(Uint8Array);
    expect(Array.from(back.b[1]!)).toEqual([-7]);
    expect(back.c).toEqual({ d: 'x', e: null, f: true });
  });

  it('functions come back as stubs that throw', () => {
    const back = decodeData(JSON.parse(JSON.stringify(encodeData({ run: function logOdds() { return 1; } })))) as { run: () => number };
    expect(() => back.run()).toThrow(/logOdds is not available in merged results/);
  });
});
