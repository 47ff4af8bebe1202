/**
 * The exact engine's WebAssembly kernel (wasm/source/four-lane.ts tallyFour, through
 * tallyFourBlocks): simulation, scoring and tallying of four seeding blocks side by side in SIMD
 * lanes, for the common point — two states, two outcomes, one pipeline (I, or I and Q), at most
 * two nonzero Cholesky columns, no 1/f noise, no analog response, and every jump the last of
 * its chain. Each block's tally is, to the bit, the one the TypeScript path of fused.ts
 * (sampleHistories, blockValues, tallyBlock) makes, which stays the reference
 * (test/engine/exact-fused.test.ts).
 *
 * One instance per exact tables: their prefix sums are copied once into its memory; the
 * point's and pipeline's scalars are written once per batch into their slots (setScoring,
 * wasm/layout.ts).
 */
import { CAUSE_NONE, CAUSES } from '../../analysis/causes.ts';
import { momentsFromShiftedSums } from '../../analysis/moments.ts';
import type { Tally } from '../../analysis/tally.ts';
import { RandomStream } from '../../random/stream.ts';
import { factorEntry, type ExactTables } from './batch.ts';
import type { CompiledPoint } from '../compile-point.ts';
import type { FusedPipeline } from './fused-scoring.ts';
import type { HistoryTables } from '../../physics/history.ts';
import { f64Slot, i32Slot, LAYOUT, SlotWriter, type SlotName } from '../wasm/layout.ts';
import { instantiateKernels, kernelsAvailable, MAX_KERNEL_BYTES } from '../wasm/memory.ts';

/**
 * Whether the WebAssembly kernel handles a point (see the file comment): its shape, no noise
 * with a timeline (1/f), every jump the last (singleJumpChain), no analog response, prefix sums
 * that fit in a WebAssembly memory,
 * and WebAssembly with SIMD available on this thread.
 */
export function exactKernelApplies(point: CompiledPoint, t: ExactTables, h: HistoryTables, pipelines: number, outcomes: number): boolean {
  // noise beyond white only of the kinds drawn per shot: their covariance is in the Cholesky factor
  return point.noise.kinds.every((k) => k.compiled.perShot !== undefined) && h.states === 2 && outcomes === 2 && pipelines === 1
    && t.outputs >= 1 && t.outputs <= 2 && t.columns.length <= 2
    && t.response === null && singleJumpChain(h) && prefixBytes(t) <= MAX_KERNEL_BYTES && kernelsAvailable();
}

/**
 * Whether, in a two-state chain, every jump is the last: each state that can leave goes to the
 * other with certainty (the row's cumulative probabilities), and that one cannot leave.
 */
export function singleJumpChain(h: HistoryTables): boolean {
  for (let s = 0; s < 2; s++) {
    if (!(h.exitRate[s]! > 0)) continue;
    const other = 1 - s;
    if (h.exitRate[other]! > 0) return false;
    // walkChain's destination search: next = 0 when the uniform ≤ cumulative[row], else 1
    const toFirst = h.cumulative[s * 2]!;
    if (other === 0 ? toFirst < 1 : toFirst !== 0) return false;
  }
  return true;
}

/** Bytes of the prefix sums the kernel holds: prefix[d·2 + s] for I and Q (d < outputs), s = 0, 1. */
function prefixBytes(t: ExactTables): number {
  return t.prefix.slice(0, 2 * t.outputs).reduce((n, p) => n + 8 * p.length, 0);
}

/**
 * The assignments of a two-state, two-outcome block from three sums (intended = 1, outcome = 1,
 * both), and the correct shots per state (all shots less the wrong ones by cause).
 */
export function finishTwoByTwo(leaf: Tally, len: number, sumState: number, sumOutcome: number, sumBoth: number): void {
  const a = leaf.assignments, causes = leaf.causes, nCauses = CAUSES.length;
  a[3] = sumBoth; a[2] = sumState - sumBoth; a[1] = sumOutcome - sumBoth;
  a[0] = len - sumState - sumOutcome + sumBoth;
  for (let st = 0; st < 2; st++) {
    let wrong = 0;
    for (let k = 1; k < nCauses; k++) wrong += causes[st * nCauses + k]!;
    causes[st * nCauses + CAUSE_NONE] = a[st * 2]! + a[st * 2 + 1]! - wrong;
  }
}

/** 2^-32: the scale of RandomStream.nextDouble's uniform (r + 0.5)·2^-32. */
const INV_TWO_POW_32 = 1 / 4294967296;

/**
 * A decision on a uniform u = (r + 0.5)·2^-32 of a 32-bit output r, as the kernel makes it on r
 * itself: the decision holds exactly when (r ≥ cut, unsigned) XOR flip (flip 0 or −1).
 */
export interface UniformCut {
  cut: number;
  flip: number;
}

/**
 * The integer cut of a decision `holds(u)` that is false then true as u grows (for example
 * u > c, or not u < p): its first r, found by bisection over every r (u is exact for each, so
 * the cut gives the same decision for all 2^32 outputs). `negate` asks for the opposite decision.
 */
export function uniformCut(holds: (u: number) => boolean, negate = false): UniformCut {
  const at = (r: number): boolean => holds((r + 0.5) * INV_TWO_POW_32);
  let lo = 0, hi = 2 ** 32; // the first r that holds lies in [lo, hi] (hi: none does)
  while (lo < hi) {
    const mid = Math.floor((lo + hi) / 2);
    if (at(mid)) hi = mid;
    else lo = mid + 1;
  }
  // no output holds: "r ≥ 0" (always) flipped
  const base = lo === 2 ** 32 ? { cut: 0, flip: -1 } : { cut: lo | 0, flip: 0 };
  return negate ? { cut: base.cut, flip: ~base.flip } : base;
}

/**
 * The four blocks' results as the kernel leaves them, one view per result slot: field i of
 * block k at [4i + k] (the f64 slots hold a state's four lanes one after the other).
 */
interface Results {
  sumState: Int32Array;
  sumOutcome: Int32Array;
  sumBoth: Int32Array;
  cleanCount: Int32Array;
  causes: Int32Array;
  discarded: Int32Array;
  discardedWrong: Int32Array;
  cleanSum1: Float64Array;
  cleanSum2: Float64Array;
  cleanShift: Float64Array;
}

export class ExactKernel {
  /** The tables whose prefix sums the instance holds. */
  readonly tables: ExactTables;
  /** Streams for tallyFourBlocks' caller to position (one history stream and one normals lane per block). */
  readonly fourStreams: { streams: RandomStream[]; lanes: RandomStream[] };
  private readonly buffer: ArrayBuffer;
  private readonly slots: SlotWriter;
  private readonly tallyFourWasm: (len: number) => void;
  /** The four blocks' states (word-major: word j of block k at 4j + k) and results. */
  private readonly quadStreams: Int32Array;
  private readonly quadLanes: Int32Array;
  private readonly results: Results;
  /** The numbers the four-lane decisions were last made from (NaN: never). */
  private readonly fourLaneKey = new Float64Array(13).fill(NaN);

  constructor(t: ExactTables) {
    this.tables = t;
    const placeholder = (): RandomStream => new RandomStream(Uint32Array.of(1, 0, 0, 0));
    this.fourStreams = { streams: [0, 1, 2, 3].map(placeholder), lanes: [0, 1, 2, 3].map(placeholder) };
    const { buffer, exports } = instantiateKernels(prefixBytes(t));
    this.buffer = buffer;
    this.slots = new SlotWriter(buffer);
    this.tallyFourWasm = exports.tallyFour as (len: number) => void;
    this.quadStreams = i32Slot(buffer, 'fourStreams');
    this.quadLanes = i32Slot(buffer, 'fourLanes');
    this.results = {
      sumState: i32Slot(buffer, 'fourSumState'), sumOutcome: i32Slot(buffer, 'fourSumOutcome'), sumBoth: i32Slot(buffer, 'fourSumBoth'),
      cleanCount: i32Slot(buffer, 'fourCleanCount'), causes: i32Slot(buffer, 'fourCauses'),
      discarded: i32Slot(buffer, 'fourDiscarded'), discardedWrong: i32Slot(buffer, 'fourDiscardedWrong'),
      cleanSum1: f64Slot(buffer, 'fourCleanSum1'), cleanSum2: f64Slot(buffer, 'fourCleanSum2'), cleanShift: f64Slot(buffer, 'fourCleanShift'),
    };
    let at: number = LAYOUT.arrays;
    // prefix[d·2 + s] for d = I (0) and Q (1), s = 0, 1, one after another (prefixBytes)
    const offsets = [0, 0, 0, 0];
    for (let j = 0; j < 2 * t.outputs; j++) {
      const sums = t.prefix[j]!;
      new Float64Array(buffer, at, sums.length).set(sums);
      offsets[j] = at;
      at += 8 * sums.length;
    }
    this.slots.set('prefixI', offsets[0]!, offsets[1]!);
    this.slots.set('prefixQ', offsets[2]!, offsets[3]!);
  }

  /** Writes the point's and pipeline's scalars into their slots; the blocks that follow use them. */
  setScoring(h: HistoryTables, s: FusedPipeline, outcomeOf: Uint8Array): void {
    const t = this.tables, b = this.slots;
    const hasQ = t.outputs === 2;
    const factorQ1 = hasQ ? factorEntry(t, 1, 1) : 0;
    b.set('exitRate', h.exitRate[0]!, h.exitRate[1]!);
    b.set('recordLength', h.recordLength);
    b.set('lastWindowSample', h.lastWindowSample);
    // (lastSample null: the pipeline reads to the window's end, so no jump is after its last sample)
    b.set('lastSample', s.lastSample ?? Infinity);
    b.set('sampleRate', t.sampleRate);
    b.set('fullI', t.full[0]!, t.full[1]!);
    b.set('fullQ', hasQ ? t.full[2]! : 0, hasQ ? t.full[3]! : 0);
    b.set('factorI0', factorEntry(t, 0, 0));
    b.set('factorQ0', hasQ ? factorEntry(t, 1, 0) : 0);
    b.set('factorQ1', factorQ1);
    b.set('cos', s.cos);
    b.set('sin', s.sin);
    b.set('threshold', s.threshold);
    b.set('band', s.band);
    b.set('jumpCause', h.jumpCause[0]!, h.jumpCause[1]!, h.jumpCause[2]!, h.jumpCause[3]!);
    b.set('anyPrep', +h.anyPrep);
    b.set('anyMap', +h.anyMap);
    b.set('hasQ', +hasQ);
    b.set('qTwoTerms', +(factorQ1 !== 0));
    b.set('columns', t.columns.length);
    b.set('flip', s.highIsOne ? 0 : 1);
    b.set('windowI', t.lo[0]!, t.hi[0]!);
    b.set('windowQ', hasQ ? t.lo[1]! : 0, hasQ ? t.hi[1]! : 0);
    this.setFourLaneParams(h, outcomeOf);
  }

  /**
   * The history's decisions: the integer cuts of its uniforms (uniformCut), the expected
   * outcomes and the destinations as masks, each in all four lanes. Made again only when the
   * probabilities change (the bisections cost more than a batch's other set-up).
   */
  private setFourLaneParams(h: HistoryTables, outcomeOf: Uint8Array): void {
    const key = this.fourLaneKey;
    const now = [h.prepareCumulative[0]!, h.prepProbability[0]!, h.prepProbability[1]!, h.mapProbability[0]!, h.mapProbability[1]!,
      h.noJumpCut[0]!, h.noJumpCut[1]!, outcomeOf[0]!, outcomeOf[1]!, h.prepInto[0]!, h.prepInto[1]!, h.mapInto[0]!, h.mapInto[1]!];
    if (now.every((x, i) => Object.is(x, key[i]))) return;
    key.set(now);
    // per state s, vector s of the slot with x in its four lanes
    const put = (name: SlotName, perState: readonly number[]): void => {
      const v = i32Slot(this.buffer, name);
      perState.forEach((x, st) => v.fill(x, 4 * st, 4 * st + 4));
    };
    const putCuts = (cutName: SlotName, flipName: SlotName, cuts: readonly UniformCut[]): void => {
      put(cutName, cuts.map((c) => c.cut));
      put(flipName, cuts.map((c) => c.flip));
    };
    const [firstCut, prep0, prep1, map0, map1, jump0, jump1] = now as [number, number, number, number, number, number, number];
    putCuts('fourFirstCut', 'fourFirstFlip', [uniformCut((u) => u > firstCut)]);
    putCuts('fourPrepCut', 'fourPrepFlip', [prep0, prep1].map((p) => uniformCut((u) => !(u < p), true)));
    putCuts('fourMapCut', 'fourMapFlip', [map0, map1].map((p) => uniformCut((u) => !(u < p), true)));
    putCuts('fourJumpCut', 'fourJumpFlip', [jump0, jump1].map((cut) => uniformCut((u) => u >= cut)));
    put('fourOutcomeMask', [-outcomeOf[0]!, -outcomeOf[1]!]);
    put('fourPrepIntoMask', [-h.prepInto[0]!, -h.prepInto[1]!]);
    put('fourMapIntoMask', [-h.mapInto[0]!, -h.mapInto[1]!]);
  }

  /**
   * Four seeding blocks of `len` shots each, with the scalars of the last setScoring: block k's
   * histories from `streams[k]` (at its start), its normals from `lanes[k]` (at its second
   * lane), its tally into `leaves[k]` (every field is written, so they may be reused). Each
   * tally is the one the TypeScript path makes of that block alone. Only the first `used`
   * lanes' streams are written back and tallied: the others (any valid states) are dummies.
   */
  tallyFourBlocks(streams: readonly RandomStream[], lanes: readonly RandomStream[], len: number, leaves: readonly Tally[], used = 4): void {
    const st = this.quadStreams, ln = this.quadLanes, r = this.results;
    for (let k = 0; k < 4; k++) {
      for (let j = 0; j < 4; j++) {
        st[4 * j + k] = streams[k]!.s[j]!;
        ln[4 * j + k] = lanes[k]!.s[j]!;
      }
    }
    // the counts the kernel adds to in memory (it writes the others at the end)
    r.causes.fill(0);
    r.discarded.fill(0);
    r.discardedWrong.fill(0);
    this.tallyFourWasm(len);
    for (let k = 0; k < used; k++) {
      for (let j = 0; j < 4; j++) {
        streams[k]!.s[j] = st[4 * j + k]!;
        lanes[k]!.s[j] = ln[4 * j + k]!;
      }
      writeLeaf(leaves[k]!, len, r, k);
    }
  }
}

/** Block k's tally from the kernel's results (see Results). */
function writeLeaf(leaf: Tally, len: number, r: Results, k: number): void {
  // (indexing inline: a closure per block costs a __name call under tsx, DEVELOPERS.md)
  for (let c = 0; c < 2 * CAUSES.length; c++) leaf.causes[c] = r.causes[4 * c + k]!;
  for (let st = 0; st < 2; st++) {
    leaf.discarded[st] = r.discarded[4 * st + k]!;
    leaf.discardedWrong[st] = r.discardedWrong[4 * st + k]!;
  }
  finishTwoByTwo(leaf, len, r.sumState[k]!, r.sumOutcome[k]!, r.sumBoth[k]!);
  for (let st = 0; st < 2; st++) {
    const i = 4 * st + k;
    leaf.clean[st] = momentsFromShiftedSums(r.cleanCount[i]!, r.cleanShift[i]!, r.cleanSum1[i]!, r.cleanSum2[i]!);
  }
}
