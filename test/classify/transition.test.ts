import { describe, expect, it } from 'vitest';
import { generatorMatrix, transitionMatrix } from '../../src/classify/transition.ts';

describe('generatorMatrix', () => {
  it('puts rates off the diagonal and makes rows sum to zero', () => {
    const q = generatorMatrix(3, [
      { from: 1, to: 0, rate: 5e5 },
      { from: 1, to: 2, rate: 1e4 },
      { from: 1, to: 0, rate: 1e5 },
    ]);
    expect(Array.from(q)).toEqual([0, 0, 0, 6e5, -6e5 - 1e4, 1e4, 0, 0, 0]);
  });

  it.each([
    ['self transition', { from: 0, to: 0, rate: 1 }],
    ['state out of range', { from: 0, to: 2, rate: 1 }],
    ['negative rate', { from: 0, to: 1, rate: -1 }],
    ['NaN rate', { from: 0, to: 1, rate: NaN }],
  ])('rejects %s', (_name, rate) => {
    expect(() => generatorMatrix(2, [rate])).toThrow(RangeError);
  });
});

describe('transitionMatrix', () => {
  // Two-state relaxation 1 → 0 at rate γ = 1/T1: Q = [[0, 0], [γ, −γ]] has Q² = −γ·Q, so
  // e^(Q·dt) = I + (1 − e^(−γ·dt))/γ · Q = [[1, 0], [1 − e^(−dt/T1), e^(−dt/T1)]]
  // (derived here; common practice, no source).
  it.each([
    [2e-6, 1e-9],
    [2e-6, 5e-7],
    [1e-6, 1e-5],
    [1e-3, 2e-8],
  ])('T1 = %s s, dt = %s s: closed form within 1e-14', (t1, dt) => {
    const t = transitionMatrix(generatorMatrix(2, [{ from: 1, to: 0, rate: 1 / t1 }]), 2, dt);
    const stay = Math.exp(-dt / t1);
    const expected = [1, 0, 1 - stay, stay];
    for (let k = 0; k < 4; k++) {
      const delta = Math.abs(t[k]! - expected[k]!);
      if (!(delta <= 1e-14)) throw new Error(`T1 ${t1} dt ${dt} entry ${k}: actual ${t[k]} expected ${expected[k]} Δ ${delta} tol 1e-14`);
    }
  });

  it('gives a stochastic matrix (non-negative, rows sum to one) for a stiff 4-state chain', () => {
    const q = generatorMatrix(4, [
      { from: 1, to: 0, rate: 1e7 },
      { from: 2, to: 1, rate: 3e3 },
      { from: 3, to: 0, rate: 1 },
      { from: 0, to: 3, rate: 2e6 },
    ]);
    const t = transitionMatrix(q, 4, 1e-5);
    for (let i = 0; i < 4; i++) {
      let sum = 0;
      for (let j = 0; j < 4; j++) {
        expect(t[i * 4 + j]!).toBeGreaterThanOrEqual(0);
        sum += t[i * 4 + j]!;
      }
      expect(Math.abs(sum - 1)).toBeLessThan(1e-12);
    }
  });

  it('zero rates give exactly the identity', () => {
    expect(Array.from(transitionMatrix(generatorMatrix(3, []), 3, 1e-6))).toEqual([1, 0, 0, 0, 1, 0, 0, 0, 1]);
  });
});
