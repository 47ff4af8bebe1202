/**
 * The tally tree (analysis/tally-tree.ts): pushing the blocks one by one, or any split of them
 * into contiguous shards whose stacks are pushed in order, gives bit-identical totals; the
 * total is the fixed binary-tree merge of the definition (merge(left, right) at every node over
 * [0, 2^⌈log₂B⌉), empty blocks beyond B). Merging moments is not associative in floating point
 * (Chan, Golub & LeVeque, Am. Stat. 37, 242 (1983) give the pairwise formula), which is why the
 * order must be fixed: the test also shows a plain left-to-right fold differs in the last bits.
 */
import { describe, expect, it } from 'vitest';
import { foldStack, pushNode, type TallyNode } from '../../src/analysis/tally-tree.ts';
import { emptyTally, mergeTallies, type Tally } from '../../src/analysis/tally.ts';

/** A deterministic pseudo-random leaf tally (no RNG needed: a fixed irrational sequence). */
function leaf(b: number): Tally {
  const t = emptyTally(2, 2);
  const x = (k: number) => ((Math.sin(1000 * b + k) * 43758.5453) % 1 + 1) % 1;
  t.assignments.set([Math.floor(500 * x(1)), Math.floor(20 * x(2)), Math.floor(20 * x(3)), Math.floor(500 * x(4))]);
  t.causes[1] = Math.floor(10 * x(5));
  t.clean = [0, 1].map((s) => ({ n: 300 + Math.floor(200 * x(6 + s)), mean: s + 0.1 * x(8 + s), m2: 30 + 10 * x(10 + s) }));
  return t;
}

const key = (t: Tally) => JSON.stringify({ a: Array.from(t.assignments), c: Array.from(t.causes), m: t.clean });

/** The definition: merge over the perfect binary tree on [lo, hi) ∩ [0, B). */
function treeTotal(lo: number, size: number, blocks: number): Tally | null {
  if (lo >= blocks) return null;
  if (size === 1) return leaf(lo);
  const a = treeTotal(lo, size / 2, blocks), b = treeTotal(lo + size / 2, size / 2, blocks);
  return b ? mergeTallies(a!, b) : a;
}

function pushRange(stack: TallyNode[], from: number, to: number): TallyNode[] {
  for (let b = from; b < to; b++) pushNode(stack, { level: 0, index: b, tally: leaf(b) });
  return stack;
}

describe('tally tree', () => {
  it.each([1, 2, 5, 13, 64, 100])('%i blocks: sequential pushes give the tree of the definition', (blocks) => {
    const total = foldStack(pushRange([], 0, blocks), 2, 2);
    const size = 2 ** Math.ceil(Math.log2(blocks));
    expect(key(total)).toBe(key(treeTotal(0, size, blocks)!));
  });

  it.each([[100, 3], [100, 7], [13, 13], [13, 20], [64, 5]])('%i blocks in %i shards: identical bits', (blocks, shards) => {
    const whole = key(foldStack(pushRange([], 0, blocks), 2, 2));
    const merged: TallyNode[] = [];
    for (let k = 0; k < shards; k++) {
      const part = pushRange([], Math.floor((k * blocks) / shards), Math.floor(((k + 1) * blocks) / shards));
      expect(part.length, 'a shard keeps O(log B) nodes').toBeLessThanOrEqual(2 * Math.ceil(Math.log2(blocks + 1)) + 1);
      for (const node of part) pushNode(merged, node);
    }
    expect(key(foldStack(merged, 2, 2))).toBe(whole);
  });

  it('the fixed order matters: a left-to-right fold gives other bits (so the test above can fail)', () => {
    let left = leaf(0);
    for (let b = 1; b < 100; b++) left = mergeTallies(left, leaf(b));
    const tree = foldStack(pushRange([], 0, 100), 2, 2);
    expect(Array.from(left.assignments)).toEqual(Array.from(tree.assignments)); // integers add exactly
    expect(key(left)).not.toBe(key(tree));
  });

  it('refuses a node that does not follow the stack', () => {
    const stack = pushRange([], 0, 3);
    expect(() => pushNode(stack, { level: 0, index: 4, tally: leaf(4) })).toThrow(/does not follow/);
  });

  it('an empty stack folds to the empty tally', () => {
    expect(key(foldStack([], 2, 2))).toBe(key(emptyTally(2, 2)));
  });
});
