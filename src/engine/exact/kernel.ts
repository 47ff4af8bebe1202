/**
 * exact-fast.ts fastTallyBlock as WebAssembly, for the points it suits: those of fastTallyBlock
 * whose every jump ends the chain and whose signal has no analog response (the general chain
 * walk and the response's closed form stay in TypeScript). Two loops: one block (kernels.wat
 * tallyBlock), and four blocks side by side in SIMD lanes (tallyFour, through
 * tallyFourBlocks). Each block's tally is the same to the bit (test/plan/exact-fused.test.ts).
 *
 * One instance per exact tables: their prefix sums are copied once into its memory; the
 * point's and pipeline's scalars are written once per batch (setScoring).
 */
import { CAUSES } from '../../analysis/causes.ts';
import { momentsFromShiftedSums } from '../../analysis/moments.ts';
import type { Tally } from '../../analysis/tally.ts';
import { RandomStream } from '../../random/stream.ts';
import { factorEntry, type ExactTables } from './batch.ts';
import { finishTwoByTwo, singleJumpChain } from './fast.ts';
import type { FusedPipeline } from './fused-scoring.ts';
import type { HistoryTables } from '../../physics/history.ts';
import { instantiateKernels, kernelsAvailable, LAYOUT, MAX_KERNEL_BYTES } from '../wasm/memory.ts';

/** i32 results: sumState, sumOutcome, sumBoth, n0, n1, then causes[2·C], discarded[2], discardedWrong[2]. */
const CAUSES_AT = 5, DISCARDED_AT = CAUSES_AT + 2 * CAUSES.length, DISCARDED_WRONG_AT = DISCARDED_AT + 2;

/**
 * Whether the WebAssembly kernel handles a point fastTallyBlock handles (exact-fast.ts
 * fastKernelApplies): no analog response, every jump the last, prefix sums that fit, and
 * WebAssembly available.
 */
export function exactKernelApplies(t: ExactTables, h: HistoryTables): boolean {
  return kernelsAvailable() && t.response === null && singleJumpChain(h) && prefixBytes(t) <= MAX_KERNEL_BYTES;
}

/** Bytes of the prefix sums the kernel holds: prefix[d·2 + s] for I and Q (d < outputs), s = 0, 1. */
function prefixBytes(t: ExactTables): number {
  return t.prefix.slice(0, 2 * t.outputs).reduce((n, p) => n + 8 * p.length, 0);
}

/** 2^-32: the scale of RandomStream.nextDouble's uniform (r + 0.5)·2^-32. */
const INV_TWO_POW_32 = 1 / 4294967296;

/**
 * A decision on a uniform u = (r + 0.5)·2^-32 of a 32-bit output r, as tallyFour makes it on r
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

export class ExactKernel {
  /** The tables whose prefix sums the instance holds. */
  readonly tables: ExactTables;
  /** Streams for tallyFourBlocks' caller to position (one history stream and one normals lane per block). */
  readonly fourStreams: { streams: RandomStream[]; lanes: RandomStream[] };
  private readonly tallyBlockWasm: (len: number) => void;
  private readonly stream: Int32Array;
  private readonly lane: Int32Array;
  private readonly f64: Float64Array;
  private readonly i32: Int32Array;
  private readonly f64Out: Float64Array;
  private readonly i32Out: Int32Array;
  /** tallyFour's states (word-major: word j of block k at 4j + k) and results. */
  private readonly quadStates: Int32Array;
  private readonly quadI32: Int32Array;
  private readonly quadF64: Float64Array;
  private readonly quadParams: Int32Array;
  private readonly tallyFourWasm: (len: number) => void;
  /** The numbers tallyFour's parameters were last made from (NaN: never). */
  private readonly fourLaneKey = new Float64Array(13).fill(NaN);

  constructor(t: ExactTables) {
    this.tables = t;
    const placeholder = (): RandomStream => new RandomStream(Uint32Array.of(1, 0, 0, 0));
    this.fourStreams = { streams: [0, 1, 2, 3].map(placeholder), lanes: [0, 1, 2, 3].map(placeholder) };
    const { buffer, exports } = instantiateKernels(prefixBytes(t));
    this.tallyBlockWasm = exports.tallyBlock as (len: number) => void;
    this.stream = new Int32Array(buffer, LAYOUT.stream, 4);
    this.lane = new Int32Array(buffer, LAYOUT.lane, 4);
    this.f64 = new Float64Array(buffer, LAYOUT.f64Params, 24);
    this.i32 = new Int32Array(buffer, LAYOUT.i32Params, 24);
    this.f64Out = new Float64Array(buffer, LAYOUT.f64Results, 6);
    this.i32Out = new Int32Array(buffer, LAYOUT.i32Results, DISCARDED_WRONG_AT + 2);
    this.tallyFourWasm = exports.tallyFour as (len: number) => void;
    this.quadStates = new Int32Array(buffer, LAYOUT.quad, 32);
    this.quadI32 = new Int32Array(buffer, LAYOUT.quad + 128, 4 * (DISCARDED_WRONG_AT + 2));
    this.quadF64 = new Float64Array(buffer, LAYOUT.quad + 128 + 16 * (DISCARDED_WRONG_AT + 2), 4 * 6);
    this.quadParams = new Int32Array(buffer, LAYOUT.quadParams, 4 * 20);
    let at: number = LAYOUT.arrays;
    // prefix[d·2 + s] for d = I (0) and Q (1), s = 0, 1, one after another (prefixBytes)
    for (let j = 0; j < 2 * t.outputs; j++) {
      const sums = t.prefix[j]!;
      new Float64Array(buffer, at, sums.length).set(sums);
      this.i32[20 + j] = at;
      at += 8 * sums.length;
    }
  }

  /**
   * Writes the point's and pipeline's scalars into the instance's parameters (fastTallyBlock's
   * arguments less the streams); the blocks that follow use them.
   */
  setScoring(h: HistoryTables, s: FusedPipeline, outcomeOf: Uint8Array): void {
    const t = this.tables, p = this.f64, q = this.i32;
    const hasQ = t.outputs === 2;
    p[0] = h.prepareCumulative[0]!;
    p[1] = h.prepProbability[0]!; p[2] = h.prepProbability[1]!;
    p[3] = h.mapProbability[0]!; p[4] = h.mapProbability[1]!;
    p[5] = h.noJumpCut[0]!; p[6] = h.noJumpCut[1]!;
    p[7] = h.exitRate[0]!; p[8] = h.exitRate[1]!;
    p[9] = h.recordLength; p[10] = h.lastWindowSample;
    // (lastSample null: the pipeline reads to the window's end, so no jump is after its last sample)
    p[11] = s.lastSample ?? Infinity;
    p[12] = t.sampleRate;
    p[13] = t.full[0]!; p[14] = t.full[1]!;
    p[15] = hasQ ? t.full[2]! : 0; p[16] = hasQ ? t.full[3]! : 0;
    p[17] = factorEntry(t, 0, 0); p[18] = hasQ ? factorEntry(t, 1, 0) : 0; p[19] = hasQ ? factorEntry(t, 1, 1) : 0;
    p[20] = s.cos; p[21] = s.sin; p[22] = s.threshold; p[23] = s.band;
    q[0] = h.prepInto[0]!; q[1] = h.prepInto[1]!;
    q[2] = h.mapInto[0]!; q[3] = h.mapInto[1]!;
    for (let k = 0; k < 4; k++) q[4 + k] = h.jumpCause[k]!;
    q[8] = outcomeOf[0]!; q[9] = outcomeOf[1]!;
    q[10] = +h.anyPrep; q[11] = +h.anyMap; q[12] = +hasQ; q[13] = +(p[19] !== 0);
    q[14] = t.columns.length; q[15] = s.highIsOne ? 0 : 1;
    q[16] = t.lo[0]!; q[17] = t.hi[0]!; q[18] = hasQ ? t.lo[1]! : 0; q[19] = hasQ ? t.hi[1]! : 0;
    this.setFourLaneParams(h, outcomeOf);
  }

  /**
   * tallyFour's parameters: the integer cuts of the history's decisions (uniformCut), the
   * expected outcomes and the destinations as masks, each in all four lanes. Made again only
   * when the probabilities change (the bisections cost more than a batch's other set-up).
   */
  private setFourLaneParams(h: HistoryTables, outcomeOf: Uint8Array): void {
    const key = this.fourLaneKey;
    const now = [h.prepareCumulative[0]!, h.prepProbability[0]!, h.prepProbability[1]!, h.mapProbability[0]!, h.mapProbability[1]!,
      h.noJumpCut[0]!, h.noJumpCut[1]!, outcomeOf[0]!, outcomeOf[1]!, h.prepInto[0]!, h.prepInto[1]!, h.mapInto[0]!, h.mapInto[1]!];
    if (now.every((x, i) => Object.is(x, key[i]))) return;
    key.set(now);
    const c = this.quadParams;
    const put = (at: number, x: number): void => { c.fill(x, 4 * at, 4 * at + 4); };
    const putCuts = (at: number, cuts: readonly UniformCut[]): void => {
      for (let st = 0; st < cuts.length; st++) { put(at + st, cuts[st]!.cut); put(at + cuts.length + st, cuts[st]!.flip); }
    };
    const [firstCut, prep0, prep1, map0, map1, jump0, jump1] = now as [number, number, number, number, number, number, number];
    putCuts(0, [uniformCut((u) => u > firstCut)]);
    putCuts(2, [prep0, prep1].map((p) => uniformCut((u) => !(u < p), true)));
    putCuts(6, [map0, map1].map((p) => uniformCut((u) => !(u < p), true)));
    putCuts(10, [jump0, jump1].map((cut) => uniformCut((u) => u >= cut)));
    for (let st = 0; st < 2; st++) {
      put(14 + st, -outcomeOf[st]!);
      put(16 + st, -h.prepInto[st]!);
      put(18 + st, -h.mapInto[st]!);
    }
  }

  /**
   * fastTallyBlock's work on one seeding block of `len` shots into `leaf` (a fresh tally), with
   * the scalars of the last setScoring: histories from `stream`, normals from `lane`.
   */
  tallyBlock(stream: RandomStream, lane: RandomStream, len: number, leaf: Tally): void {
    this.i32Out.fill(0);
    this.stream.set(stream.s);
    this.lane.set(lane.s);
    this.tallyBlockWasm(len);
    stream.s.set(this.stream);
    lane.s.set(this.lane);
    writeLeaf(leaf, len, this.i32Out, this.f64Out, 1, 0);
  }

  /**
   * tallyBlock on four blocks of `len` shots each at once (their tallies are those of four
   * tallyBlock calls, to the bit): block k's histories from `streams[k]`, its normals from
   * `lanes[k]`, its tally into `leaves[k]` (every field is written, so they may be reused).
   */
  tallyFourBlocks(streams: readonly RandomStream[], lanes: readonly RandomStream[], len: number, leaves: readonly Tally[]): void {
    const st = this.quadStates, r = this.quadI32, m = this.quadF64;
    for (let k = 0; k < 4; k++) {
      for (let j = 0; j < 4; j++) {
        st[4 * j + k] = streams[k]!.s[j]!;
        st[16 + 4 * j + k] = lanes[k]!.s[j]!;
      }
    }
    r.fill(0);
    this.tallyFourWasm(len);
    for (let k = 0; k < 4; k++) {
      for (let j = 0; j < 4; j++) {
        streams[k]!.s[j] = st[4 * j + k]!;
        lanes[k]!.s[j] = st[16 + 4 * j + k]!;
      }
      writeLeaf(leaves[k]!, len, r, m, 4, k);
    }
  }
}

/**
 * A block's tally from the kernel's results: field f of the i32 results (sumState, sumOutcome,
 * sumBoth, n0, n1, causes, discarded, discardedWrong) at ints[stride·f + k], and of the f64
 * results (s10, s11, s20, s21, shift0, shift1) at floats[stride·f + k] — stride 1 for
 * tallyBlock's, 4 and the block's lane k for tallyFour's.
 */
function writeLeaf(leaf: Tally, len: number, ints: Int32Array, floats: Float64Array, stride: number, k: number): void {
  // (indexing inline: a closure per block costs a __name call under tsx, DEVELOPERS.md)
  for (let c = 0; c < 2 * CAUSES.length; c++) leaf.causes[c] = ints[stride * (CAUSES_AT + c) + k]!;
  for (let st = 0; st < 2; st++) {
    leaf.discarded[st] = ints[stride * (DISCARDED_AT + st) + k]!;
    leaf.discardedWrong[st] = ints[stride * (DISCARDED_WRONG_AT + st) + k]!;
  }
  finishTwoByTwo(leaf, len, ints[k]!, ints[stride + k]!, ints[2 * stride + k]!);
  leaf.clean[0] = momentsFromShiftedSums(ints[3 * stride + k]!, floats[4 * stride + k]!, floats[k]!, floats[2 * stride + k]!);
  leaf.clean[1] = momentsFromShiftedSums(ints[4 * stride + k]!, floats[5 * stride + k]!, floats[stride + k]!, floats[3 * stride + k]!);
}
