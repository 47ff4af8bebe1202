/**
 * Paired tallies of pipelines on the same shots (analysis/compare.ts): counts of the 2×2 table
 * for every pair, merging, and the comparison built on mcnemar.ts (McNemar, Psychometrika 12,
 * 153 (1947); Newcombe, Stat. Med. 17, 2635 (1998)).
 */
import { describe, expect, it } from 'vitest';
import { addPairs, comparePipelines, emptyPairTallies, mergePairTallies } from '../../src/analysis/compare.ts';
import { mcnemarExact, pairedDifference } from '../../src/analysis/mcnemar.ts';

describe('paired tallies', () => {
  // shots:        0  1  2  3  4  5  6  7
  const a = Uint8Array.of(1, 1, 0, 0, 1, 0, 0, 1);
  const b = Uint8Array.of(1, 0, 1, 0, 0, 0, 0, 1);
  const c = Uint8Array.of(0, 0, 0, 0, 0, 0, 0, 0);

  it('counts both wrong, only A wrong and only B wrong for every pair in order', () => {
    const pairs = addPairs(emptyPairTallies(3), [a, b, c], 8);
    expect(pairs.map((p) => [p.a, p.b])).toEqual([[0, 1], [0, 2], [1, 2]]);
    expect(pairs[0]!.counts).toEqual({ bothWrong: 2, onlyAWrong: 2, onlyBWrong: 1, n: 8 });
    expect(pairs[1]!.counts).toEqual({ bothWrong: 0, onlyAWrong: 4, onlyBWrong: 0, n: 8 });
    expect(pairs[2]!.counts).toEqual({ bothWrong: 0, onlyAWrong: 3, onlyBWrong: 0, n: 8 });
  });

  it('adding in two halves or merging gives the same counts', () => {
    const whole = addPairs(emptyPairTallies(3), [a, b, c], 8);
    const first = addPairs(emptyPairTallies(3), [a.subarray(0, 3), b.subarray(0, 3), c.subarray(0, 3)], 3);
    const second = addPairs(emptyPairTallies(3), [a.subarray(3), b.subarray(3), c.subarray(3)], 5);
    expect(mergePairTallies(first, second)).toEqual(whole);
  });

  it('compares with the exact McNemar p and the Newcombe interval', () => {
    const pairs = addPairs(emptyPairTallies(3), [a, b, c], 8);
    const [ab] = comparePipelines(['x', 'y', 'z'], pairs, 0.95);
    expect(ab).toMatchObject({ a: 'x', b: 'y', shots: 8, errorA: 4 / 8, errorB: 3 / 8, difference: 1 / 8 });
    expect(ab!.pValue).toBe(mcnemarExact(2, 1));
    const d = pairedDifference({ bothWrong: 2, onlyAWrong: 2, onlyBWrong: 1, n: 8 }, 0.95);
    expect([ab!.low, ab!.high]).toEqual([d.low, d.high]);
  });
});
