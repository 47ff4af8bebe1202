/**
 * Tallies merged along a fixed binary tree over seeding-block indices, so that the floating-point
 * result depends only on the blocks, never on how they were split into batches, workers or shards.
 *
 * Merging moments (Chan et al., see moments.ts) is exact in real arithmetic but not associative
 * in floating point, so the merge order must be fixed. Leaf b is the tally of block b; the node
 * (level L, index j) covers blocks [j·2^L, (j+1)·2^L) and is merge(left child, right child).
 * The total is the root of the tree over [0, 2^⌈log₂B⌉), missing blocks being empty (merging
 * with an empty tally is exact), i.e. the fold from the right of the stack below.
 *
 * A stack of nodes in block order, where two neighbours on top are merged whenever they are
 * siblings, holds the maximal aligned pieces of the blocks pushed so far: O(log B) nodes. A
 * shard saves its stack; pushing the shards' stacks in order rebuilds, node by node, the same
 * tree as one process that pushed every block — hence identical bits.
 */
import { emptyTally, mergeInto, mergeTallies, type Tally, type TallyInput } from './tally.ts';

/** One aligned piece of the tree. */
export interface TallyNode {
  level: number;
  index: number;
  tally: Tally;
}

/** First block after the node. */
export function nodeEnd(n: TallyNode): number {
  return (n.index + 1) * 2 ** n.level;
}

/** First block of the node. */
export function nodeStart(n: TallyNode): number {
  return n.index * 2 ** n.level;
}

/**
 * Pushes a node that starts where the stack ends (throws otherwise) and merges siblings.
 * The stack is modified in place, and it owns the pushed tallies: a merge adds the right
 * sibling into the left one's tally (mergeInto) rather than allocating a third.
 */
export function pushNode(stack: TallyNode[], node: TallyNode): void {
  const top = stack[stack.length - 1];
  if (top && nodeEnd(top) !== nodeStart(node)) {
    throw new Error(`tally tree: node at blocks [${nodeStart(node)}, ${nodeEnd(node)}) does not follow [${nodeStart(top)}, ${nodeEnd(top)})`);
  }
  stack.push(node);
  for (;;) {
    const n = stack.length;
    if (n < 2) return;
    const a = stack[n - 2]!, b = stack[n - 1]!;
    if (a.level !== b.level || a.index % 2 !== 0 || b.index !== a.index + 1) return;
    stack.length = n - 2;
    stack.push({ level: a.level + 1, index: a.index / 2, tally: mergeInto(a.tally, b.tally) });
  }
}

/** The tally of everything in the stack: the fold from the right (see the file comment). */
export function foldStack(stack: readonly TallyNode[], states: number, outcomes: number): Tally {
  if (stack.length === 0) return emptyTally(states, outcomes);
  let t = stack[stack.length - 1]!.tally;
  for (let i = stack.length - 2; i >= 0; i--) t = mergeTallies(stack[i]!.tally, t);
  return t;
}

/** Shots [from, to) of a tally input (per-shot typed arrays are viewed, not copied). */
export function sliceTallyInput(b: TallyInput, from: number, to: number): TallyInput {
  const cut = <T extends Uint8Array | Float64Array>(v: T): T => v.subarray(from, to) as T;
  // a literal with TallyInput's fields first, so the tally loop reads a fast object
  const out: TallyInput = {
    count: to - from, intended: cut(b.intended), prepared: cut(b.prepared), initial: cut(b.initial),
    jumpCause: cut(b.jumpCause), projected: cut(b.projected), outcome: cut(b.outcome), cause: cut(b.cause),
    discarded: b.discarded ? cut(b.discarded) : b.discarded,
  };
  // any field added to TallyInput later: per-shot arrays are cut too
  const extra = out as unknown as Record<string, unknown>;
  for (const [k, v] of Object.entries(b)) {
    if (k in extra) continue;
    extra[k] = ArrayBuffer.isView(v) && (v as Uint8Array).length === b.count ? (v as Uint8Array).subarray(from, to) : v;
  }
  return out;
}
