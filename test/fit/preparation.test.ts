/**
 * Labels and preparation errors (src/fit/preparation.ts): which level each label means, the
 * fraction of a label's records that start elsewhere with its Wilson interval (Wilson, J. Am.
 * Stat. Assoc. 22, 209 (1927): 10 in 100 000 gives 95 % [5.43e−5, 1.84e−4], docs CHECKS), and
 * the correction for records that leave their state before their first bin shows it.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { preparationErrors, statesOfLabels } from '../../src/fit/preparation.ts';

/** Starts and labels: `n` records per label, label ℓ starting at level `state[ℓ]` except `elsewhere[ℓ]` of them. */
function records(n: number, state: [number, number], elsewhere: [number, number]) {
  const starts = new Uint8Array(2 * n), labels = new Uint8Array(2 * n);
  for (let l = 0; l < 2; l++) {
    for (let i = 0; i < n; i++) {
      labels[l * n + i] = l;
      starts[l * n + i] = i < elsewhere[l]! ? 1 - state[l]! : state[l]!;
    }
  }
  return { starts, labels };
}

describe('preparation errors from labels', () => {
  it('maps each label to the level most of its records start at', () => {
    const r = records(100, [1, 0], [5, 0]);
    expect(statesOfLabels(r.starts, r.labels, 'x', ['0', '1'])).toEqual([1, 0]);
  });

  it('refuses labels that do not tell the levels apart, in one line', () => {
    const r = records(100, [0, 0], [0, 0]);
    expect(() => statesOfLabels(r.starts, r.labels, 'records.npy', ['a', 'b'])).toThrow(InputError);
    expect(() => statesOfLabels(r.starts, r.labels, 'records.npy', ['a', 'b'])).toThrow(/^records\.npy: expected labels that tell the two levels apart, found records labelled "a" and "b" mostly starting at the same level/);
  });

  it('counts the records that start elsewhere, with the Wilson interval (10 in 100 000)', () => {
    const r = records(100000, [0, 1], [10, 0]);
    const [a, b] = preparationErrors(r.starts, r.labels, [0, 1], [0, 0]);
    expect(a!.startedElsewhere).toBe(10);
    expect(a!.probability).toBe(1e-4);
    // Wilson (1927), as listed in CHECKS: [5.43e−5, 1.84e−4]
    expect(a!.low).toBeCloseTo(5.43e-5, 6);
    expect(a!.high).toBeCloseTo(1.84e-4, 6);
    expect(b!.probability).toBe(0);
    expect(b!.low).toBe(0);
  });

  it('corrects for records that leave their state before the first bin: p = (P − q_s)/(1 − q_s − q_o)', () => {
    const r = records(1000, [0, 1], [100, 30]);
    const q: [number, number] = [0.01, 0.02];
    const [a, b] = preparationErrors(r.starts, r.labels, [0, 1], q);
    // label 0 (state 0): P = 0.1, q_s = 0.01, q_o = 0.02 → 0.09/0.97; label 1 (state 1): P = 0.03 → 0.01/0.97 (algebra of the file comment)
    expect(a!.probability).toBeCloseTo(0.09 / 0.97, 12);
    expect(b!.probability).toBeCloseTo(0.01 / 0.97, 12);
    expect(a!.low).toBeLessThan(a!.probability);
    expect(a!.high).toBeGreaterThan(a!.probability);
  });
});
