/**
 * The fused exact path: simulation, scoring and tallying of scored shots in one pass per
 * seeding block, for runs that keep no per-shot table (`run --no-shots-table`). Per block it
 * draws the histories (history.ts) and the values (exact-batch.ts `blockValues`) exactly as
 * `simulateExactBatch` does, then projects, thresholds, attributes the cause and adds the shot
 * to the block's tally leaf, in the same arithmetic order as score.ts and analysis/tally.ts.
 * That TypeScript path is the reference; the common point (two states, one pipeline, every jump
 * the last, no analog response) runs instead through the WebAssembly kernel, four blocks at a
 * time (kernel.ts), with the same numbers. The leaves are therefore bit for bit those that
 * `tallyBatch` builds from a scored ShotBatch, and the run's tables do not change
 * (test/engine/exact-fused.test.ts); only the per-shot arrays are never made, and a worker sends
 * back a few hundred bytes per batch instead of ~60 per shot.
 */
import { attributeCause, CAUSE_NONE, CAUSES } from '../../analysis/causes.ts';
import { emptyTally, type Tally } from '../../analysis/tally.ts';
import { pushNode, type TallyNode } from '../../analysis/tally-tree.ts';
import { addDisagreements } from '../../analysis/compare.ts';
import { momentsFromShiftedSums } from '../../analysis/moments.ts';
import { ExactKernel, exactKernelApplies, finishTwoByTwo } from './kernel.ts';
import { SEED_BLOCK, BlockStreams, type StreamPurpose } from '../../random/streams.ts';
import type { RandomStream } from '../../random/stream.ts';
import type { CompiledPoint } from '../compile-point.ts';
import type { FusedPipeline, FusedScoring } from './fused-scoring.ts';
import { addLinearNoiseValues, blockValues, makeExactScratch, refreshExactScratch, type ExactScratch } from './batch.ts';
import { sampleHistories, type HistoryColumns } from '../../physics/history.ts';
import { scratchHistory } from '../trace/batch.ts';

/** A scored batch as tallies only: its nodes of the tally tree and the paired counts. */
export interface TalliedBatch {
  kind: 'tallied';
  point: number;
  purpose: StreamPurpose;
  batch: number;
  firstShot: number;
  count: number;
  /**
   * nodes[pipeline]: the batch's seeding-block tallies as tally-tree nodes, siblings within the
   * batch already merged (analysis/tally-tree.ts pushNode: the same nodes the run would build).
   */
  nodes: TallyNode[][];
  /** Per pipeline pair (emptyPairTallies order): both wrong, only A wrong, only B wrong. */
  pairs: Float64Array;
}

/** Per-block scratch of the fused path. */
interface FusedScratch {
  columns: HistoryColumns;
  /** values[d]: output d of the block's shots. */
  values: Float64Array[];
  /** wrong[p]: cause of pipeline p per shot of the block (for the paired counts). */
  wrong: Uint8Array[];
  /** The pipeline's own first-jump cause per shot. */
  jumpCause: Uint8Array;
  /** tallyBlock: shots per (state, outcome); per state the clean count, shift and shifted sums. */
  counts: Int32Array;
  /** Zero quadrature values (pipelines without Q). */
  zeros: Float64Array;
  cleanCount: Float64Array;
  shift: Float64Array;
  sum1: Float64Array;
  sum2: Float64Array;
  /** The WebAssembly kernel of the scratch's current exact tables (made on first use). */
  kernel?: ExactKernel;
  /** Tallies the kernel may fill again: those of blocks merged into a left sibling. */
  spareLeaves: Tally[];
}

const fusedScratches = new WeakMap<ExactScratch, FusedScratch>();

function fusedScratch(scratch: ExactScratch, outputs: number, pipelines: number, states: number, outcomes: number): FusedScratch {
  let f = fusedScratches.get(scratch);
  if (!f || f.values.length !== outputs || f.wrong.length !== pipelines || f.cleanCount.length < states || f.counts.length < states * outcomes) {
    const u8 = () => new Uint8Array(SEED_BLOCK);
    const perState = () => new Float64Array(states);
    f = {
      columns: {
        intended: u8(), prepared: u8(), initial: u8(), atWindowStart: u8(), atWindowEnd: u8(),
        firstJump: new Float64Array(SEED_BLOCK), jumpCause: u8(),
      },
      values: Array.from({ length: outputs }, () => new Float64Array(SEED_BLOCK)),
      wrong: Array.from({ length: pipelines }, u8),
      jumpCause: u8(),
      counts: new Int32Array(states * outcomes), zeros: new Float64Array(SEED_BLOCK), cleanCount: perState(), shift: perState(), sum1: perState(), sum2: perState(),
      spareLeaves: [],
    };
    fusedScratches.set(scratch, f);
  }
  return f;
}

/**
 * Shots [batch·batchSize, batch·batchSize + count) through the exact engine, scored and tallied
 * per seeding block: the same tally-tree nodes and paired counts as simulateExactBatch → scoreBatch →
 * tallyBatch, without the per-shot arrays. `webAssembly` false runs the TypeScript path even
 * where the kernel applies (the reference, for tests and benchmarks).
 */
export function simulateTalliedBatch(
  point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, batch: number, count: number,
  scoring: FusedScoring, scratch: ExactScratch = makeExactScratch(point), webAssembly = true,
): TalliedBatch {
  refreshExactScratch(point, scratch);
  const history = scratchHistory(point, scratch);
  const t = scratch.exact;
  const sc = point.scenario;
  const states = sc.states.length, outcomes = sc.outcomes.length;
  const outcomeOf = Uint8Array.from(sc.states, (s) => s.outcome);
  const nPipes = scoring.pipelines.length;
  const f = fusedScratch(scratch, t.outputs, nPipes, states, outcomes);
  const firstShot = batch * sc.batchSize;
  const firstBlock = firstShot / SEED_BLOCK;
  const nodes: TallyNode[][] = [];
  for (let p = 0; p < nPipes; p++) nodes.push([]);
  const pairs = new Float64Array(3 * (nPipes * (nPipes - 1)) / 2);
  const blocks = new BlockStreams(sc.seed, pointIndex, purpose, firstBlock);
  const stream = blocks.current();
  if (webAssembly && exactKernelApplies(point, t, history, nPipes, outcomes)) {
    if (f.kernel?.tables !== t) f.kernel = new ExactKernel(t);
    f.kernel.setScoring(history, scoring.pipelines[0]!, outcomeOf);
    tallyThroughKernel(f.kernel, blocks, stream, count, firstBlock, nodes[0]!, f.spareLeaves);
    return { kind: 'tallied', point: pointIndex, purpose, batch, firstShot, count, nodes, pairs };
  }
  const { columns, values } = f;
  // output index of each pipeline's I and Q (−1: no Q, the value is 0)
  const iOut = new Int32Array(nPipes).fill(-1), qOut = new Int32Array(nPipes).fill(-1);
  for (let d = 0; d < t.outputs; d++) (t.isQuadrature[d] ? qOut : iOut)[t.pipeline[d]!] = d;
  const lane = blocks.current();
  for (let from = 0; from < count; from += SEED_BLOCK) {
    if (from > 0) blocks.advanceInto(stream);
    blocks.laneInto(lane);
    const len = Math.min(count, from + SEED_BLOCK) - from;
    sampleHistories(history, stream, columns, 0, len, scratch.store);
    blockValues(t, lane, scratch.normals, values, columns.initial, 0, len, scratch.store);
    addLinearNoiseValues(point, pointIndex, purpose, scratch, t, values, firstShot + from, 0, len);
    for (let p = 0; p < nPipes; p++) {
      const s = scoring.pipelines[p]!;
      const leaf = emptyTally(states, outcomes);
      const jumpCause = s.lastSample === null ? columns.jumpCause : windowedJumpCause(columns, s.lastSample, len, f.jumpCause);
      tallyBlock(
        leaf, s, values[iOut[p]!]!, qOut[p]! >= 0 ? values[qOut[p]!]! : f.zeros, columns, jumpCause, outcomeOf, len, f.wrong[p]!, f,
      );
      pushNode(nodes[p]!, { level: 0, index: firstBlock + from / SEED_BLOCK, tally: leaf });
    }
    if (nPipes > 1) addPairCounts(pairs, f.wrong, len);
  }
  return { kind: 'tallied', point: pointIndex, purpose, batch, firstShot, count, nodes, pairs };
}

/**
 * Every block of the batch through the kernel (one pipeline, so no paired counts): the whole
 * blocks in groups of four (the last group may hold fewer), then a short last block in a call
 * of its own. A group's unused lanes run copies of its first block's streams, and their results
 * are dropped. `first` is at the batch's first block.
 */
function tallyThroughKernel(
  kernel: ExactKernel, blocks: BlockStreams, first: RandomStream, count: number, firstBlock: number, stack: TallyNode[], spare: Tally[],
): void {
  const { streams, lanes } = kernel.fourStreams;
  const whole = Math.floor(count / SEED_BLOCK), total = Math.ceil(count / SEED_BLOCK);
  for (let b = 0; b < total;) {
    const used = b < whole ? Math.min(4, whole - b) : 1;
    const len = b < whole ? SEED_BLOCK : count - whole * SEED_BLOCK;
    for (let k = 0; k < 4; k++) {
      if (k >= used) {
        streams[k]!.s.set(streams[0]!.s);
        lanes[k]!.s.set(lanes[0]!.s);
        continue;
      }
      if (b + k > 0) blocks.advanceInto(streams[k]!);
      else streams[k]!.s.set(first.s);
      blocks.laneInto(lanes[k]!);
    }
    // (loops, not closures: a closure per call costs a __name call under tsx, DEVELOPERS.md)
    const leaves: Tally[] = [];
    for (let k = 0; k < used; k++) leaves.push(spare.pop() ?? emptyTally(2, 2));
    kernel.tallyFourBlocks(streams, lanes, len, leaves, used);
    for (let k = 0; k < used; k++) pushNode(stack, { level: 0, index: firstBlock + b + k, tally: leaves[k]! });
    // a tally merged into its left sibling is free again
    for (let k = 0; k < used; k++) if (!holds(stack, leaves[k]!)) spare.push(leaves[k]!);
    b += used;
  }
}

/** Whether a node of the stack holds the tally. */
function holds(stack: readonly TallyNode[], tally: Tally): boolean {
  for (let i = 0; i < stack.length; i++) if (stack[i]!.tally === tally) return true;
  return false;
}

/** The first-jump cause as a pipeline that stops reading at `last` sees it (score.ts). */
function windowedJumpCause(c: HistoryColumns, last: number, len: number, out: Uint8Array): Uint8Array {
  for (let i = 0; i < len; i++) out[i] = c.jumpCause[i] !== 0 && c.firstJump[i]! <= last ? c.jumpCause[i]! : 0;
  return out;
}

/**
 * Scores one pipeline on a block's shots and adds them to `leaf` (a fresh tally): the
 * arithmetic of project(), classifyAllByThreshold(), attributeCause() and addToTally() with
 * one chunk, in the same order. Writes each shot's cause to `wrong`.
 *
 * Written for speed, without changing a bit: one pass projects and decides without
 * data-dependent branches (outcomes are near 50/50), counts shots per (state, outcome) in
 * integers, takes a branch only for the rare wrong shot, and adds each clean shot to its
 * state's shifted sums in shot order, as addToTally does.
 */
function tallyBlock(
  leaf: Tally, s: FusedPipeline, inPhase: Float64Array, quadrature: Float64Array, c: HistoryColumns,
  jumpCause: Uint8Array, outcomeOf: Uint8Array, len: number, wrong: Uint8Array, f: FusedScratch,
): void {
  const nCauses = CAUSES.length, outcomes = leaf.outcomes, states = leaf.states;
  const { assignments, causes, discarded, discardedWrong } = leaf;
  const cos = s.cos, sin = s.sin, threshold = s.threshold, band = s.band;
  const flip = s.highIsOne ? 0 : 1;
  const intendedCol = c.intended, preparedCol = c.prepared, initialCol = c.initial;
  const { counts, cleanCount, shift, sum1, sum2 } = f;
  counts.fill(0, 0, states * outcomes);
  cleanCount.fill(0); sum1.fill(0); sum2.fill(0);
  const twoByTwo = states === 2 && outcomes === 2;
  let sumState = 0, sumOutcome = 0, sumBoth = 0;
  for (let i = 0; i < len; i++) {
    const x = inPhase[i]! * cos + quadrature[i]! * sin;
    // highIsOne: x > threshold; else x < threshold (classifyAllByThreshold)
    const outcome = flip === 0 ? +(x > threshold) : +(x < threshold);
    const intended = intendedCol[i]!, prepared = preparedCol[i]!, initial = initialCol[i]!, jc = jumpCause[i]!;
    // two states, two outcomes: three sums instead of a memory count (see finishTwoByTwo)
    if (twoByTwo) {
      sumState += intended; sumOutcome += outcome; sumBoth += intended & outcome;
    } else {
      counts[intended * outcomes + outcome]!++;
    }
    let cause = CAUSE_NONE;
    if (outcome !== outcomeOf[intended]) {
      cause = attributeCause(intended, prepared, initial, jc !== 0, jc);
      causes[intended * nCauses + cause]!++;
    }
    wrong[i] = cause;
    if (band >= 0 && Math.abs(x - threshold) < band) {
      discarded[intended]!++;
      if (cause !== 0) discardedWrong[intended]!++;
    }
    // clean shots (no preparation, mapping or pipeline-window jump): shifted sums of their state
    if (prepared === intended && initial === intended && jc === 0) {
      if (cleanCount[intended] === 0) shift[intended] = x;
      cleanCount[intended]!++;
      const d = x - shift[intended]!;
      sum1[intended]! += d;
      sum2[intended]! += d * d;
    }
  }
  if (twoByTwo) finishTwoByTwo(leaf, len, sumState, sumOutcome, sumBoth);
  else {
    for (let st = 0; st < states; st++) {
      let shots = 0;
      for (let o = 0; o < outcomes; o++) {
        const m = counts[st * outcomes + o]!;
        assignments[st * outcomes + o] = m;
        shots += m;
      }
      let wrongShots = 0;
      for (let k = 1; k < nCauses; k++) wrongShots += causes[st * nCauses + k]!;
      causes[st * nCauses + CAUSE_NONE] = shots - wrongShots;
    }
  }
  for (let st = 0; st < states; st++) leaf.clean[st] = momentsFromShiftedSums(cleanCount[st]!, shift[st]!, sum1[st]!, sum2[st]!);
}

/** Adds a block's paired counts: for each pair a < b, both wrong, only a, only b. */
function addPairCounts(pairs: Float64Array, wrong: readonly Uint8Array[], len: number): void {
  let k = 0;
  for (let a = 0; a < wrong.length; a++) {
    for (let b = a + 1; b < wrong.length; b++, k += 3) addDisagreements(wrong[a]!, wrong[b]!, len, pairs, k);
  }
}
