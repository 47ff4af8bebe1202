/**
 * fillNormals writes the same numbers from the same draws as zeroing and adding with σ = 1
 * (addNormals), including the ziggurat's rejected draws, and leaves the stream in the same
 * state; the exact engine relies on it (plan/exact-batch.ts). Exactness: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { makeStream } from '../../src/random/streams.ts';

describe('fillNormals', () => {
  it.each([[1, 256], [2, 1000], [3, 4096]])('seed %i, %i normals over stale contents: equal to fill(0) + addNormals(…, 1)', (seed, count) => {
    const a = makeStream(seed, 0, 'score', 0), b = makeStream(seed, 0, 'score', 0);
    const x = new Float64Array(count + 2).fill(7), y = new Float64Array(count + 2).fill(7);
    a.fillNormals(x, 1, count);
    y.fill(0, 1, count + 1);
    b.addNormals(y, 1, count, 1);
    for (let i = 0; i < count + 2; i++) expect(Object.is(x[i], y[i]), `index ${i}: ${x[i]} vs ${y[i]}`).toBe(true);
    expect(Array.from(a.state())).toEqual(Array.from(b.state()));
  });
});
