/**
 * fillNormals writes the same numbers from the same draws as zeroing and adding with σ = 1
 * (addNormals), including the ziggurat's rejected draws, and leaves the stream in the same
 * state; and both equal a sequence of nextNormal() calls, rejections included, which the exact
 * engine relies on (its WebAssembly kernel draws its normals that way, one after another).
 * Exactness: common practice, no source.
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

  it.each([[4, 1000], [5, 4096]])('seed %i, %i normals: equal to that many nextNormal() calls, and the same state after', (seed, count) => {
    const a = makeStream(seed, 0, 'score', 0), b = makeStream(seed, 0, 'score', 0);
    const x = new Float64Array(count);
    a.fillNormals(x, 0, count);
    for (let i = 0; i < count; i++) {
      const y = b.nextNormal();
      expect(Object.is(x[i], y), `index ${i}: ${x[i]} vs ${y}`).toBe(true);
    }
    expect(Array.from(a.state())).toEqual(Array.from(b.state()));
    // the comparison covers the rejection branch: the draws used more words than normals
    const c = makeStream(seed, 0, 'score', 0);
    const target = Array.from(b.state()).join();
    let words = 0;
    while (Array.from(c.state()).join() !== target && words < 10 * count) { c.nextInt32(); words++; }
    expect(words, 'words drawn for the normals').toBeGreaterThan(count);
  });
});
