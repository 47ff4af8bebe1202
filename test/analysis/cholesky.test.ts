/**
 * Cholesky factor (Golub & Van Loan, "Matrix Computations", 4th ed. (2013), Alg. 4.2.1) against
 * numpy.linalg.cholesky (fixture test/fixtures/cholesky.json, made by make-cholesky.py), and on
 * semi-definite matrices, which numpy refuses, by the defining property L·Lᵀ = A and the rank.
 */
import { describe, expect, it } from 'vitest';
import { choleskyLower } from '../../src/analysis/cholesky.ts';
import { loadFixture } from './load-fixture.ts';

interface Case { name: string; n: number; a: number[]; factor: number[] | null; rank: number }
const { cases } = loadFixture<{ cases: Case[] }>('cholesky');

describe('choleskyLower', () => {
  it.each(cases.map((c) => [c.name, c] as const))('%s', (_name, c) => {
    const a = Float64Array.from(c.a);
    const { factor, rank } = choleskyLower(a, c.n);
    expect(rank).toBe(c.rank);
    const scale = Math.max(1e-300, ...c.a.map(Math.abs));
    // tolerance: rounding of an n-term recursion (common practice, no source)
    const tol = 1e-13 * scale;
    for (let i = 0; i < c.n; i++) {
      for (let j = 0; j < c.n; j++) {
        if (j > i) expect(factor[i * c.n + j], `upper entry (${i}, ${j})`).toBe(0);
        let s = 0;
        for (let k = 0; k < c.n; k++) s += factor[i * c.n + k]! * factor[j * c.n + k]!;
        expect(Math.abs(s - a[i * c.n + j]!), `(L·Lᵀ)[${i}][${j}] = ${s}, A = ${a[i * c.n + j]}, tol ${tol}`).toBeLessThanOrEqual(tol);
        if (c.factor) {
          const want = c.factor[i * c.n + j]!;
          expect(Math.abs(factor[i * c.n + j]! - want), `L[${i}][${j}] = ${factor[i * c.n + j]}, numpy ${want}`).toBeLessThanOrEqual(1e-12 * Math.sqrt(scale));
        }
      }
    }
  });

  it('leaves its input unchanged', () => {
    const a = Float64Array.from(cases[2]!.a);
    const copy = a.slice();
    choleskyLower(a, cases[2]!.n);
    expect(Array.from(a)).toEqual(Array.from(copy));
  });
});
