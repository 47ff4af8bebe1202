/**
 * The fused exact path: simulation, scoring and tallying of scored shots in one pass per
 * seeding block, for runs that keep no per-shot table (`run --no-shots-table`). Per block it
 * draws the histories (history.ts) and the values (exact-batch.ts `blockValues`) exactly as
 * `simulateExactBatch` does, then projects, thresholds, attributes the cause and adds the shot
 * to the block's tally leaf, in the same arithmetic order as score.ts and analysis/tally.ts.
 * The leaves are therefore bit for bit those that `tallyBatch` builds from a scored ShotBatch,
 * and the run's tables do not change (test/plan/exact-fused.test.ts); only the per-shot arrays
 * are never made, and a worker sends back a few hundred bytes per batch instead of ~60 per shot.
 */
import { CAUSE_MAPPING, CAUSE_NOISE, CAUSE_NONE, CAUSE_PREPARATION, CAUSES } from '../analysis/causes.ts';
import { emptyTally, type Tally } from '../analysis/tally.ts';
import { SEED_BLOCK, BlockStreams, type StreamPurpose } from '../random/streams.ts';
import type { CompiledPoint } from './compile.ts';
import type { PipelineCalibration } from './calibrate.ts';
import { blockValues, exactTables, makeExactScratch, type ExactScratch } from './exact-batch.ts';
import { sampleHistories, type HistoryColumns } from './history.ts';
import { scratchHistory } from './batch.ts';

/** How one pipeline scores in the fused path (plain data: it crosses to worker threads). */
export interface FusedPipeline {
  cos: number;
  sin: number;
  threshold: number;
  highIsOne: boolean;
  /** Half-width of the ambiguous band, or −1 when the pipeline has no band. */
  band: number;
  /** Time of the pipeline's last sample when it ends before the timing window, else null. */
  lastSample: number | null;
}

/** The scoring of every pipeline of a point, for `simulateTalliedBatch`. */
export interface FusedScoring {
  pipelines: FusedPipeline[];
}

/** A scored batch as tallies only: the leaves of the tally tree and the paired counts. */
export interface TalliedBatch {
  kind: 'tallied';
  point: number;
  purpose: StreamPurpose;
  batch: number;
  firstShot: number;
  count: number;
  /** leaves[pipeline][k]: the tally of the batch's k-th seeding block. */
  leaves: Tally[][];
  /** Per pipeline pair (emptyPairTallies order): both wrong, only A wrong, only B wrong. */
  pairs: Float64Array;
}

/**
 * The fused scoring of a calibrated point, or null when a pipeline decides other than by a
 * threshold on its projected value (likelihood classifier, calibrated weights).
 */
export function fusedScoring(point: CompiledPoint, calibrations: readonly PipelineCalibration[]): FusedScoring | null {
  if (calibrations.some((c) => c.likelihood !== null || c.weights !== null)) return null;
  const fs = point.grid.sampleRate;
  return {
    pipelines: calibrations.map((c, p) => {
      const chain = point.pipelines[p]!.chain;
      return {
        cos: c.axis.cos, sin: c.axis.sin, threshold: c.rule.threshold, highIsOne: c.rule.highIsOne,
        band: chain.band !== null ? c.bandHalfWidth : -1,
        lastSample: chain.processHi !== point.grid.windowHi ? (chain.processHi - 1) / fs : null,
      };
    }),
  };
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
}

const fusedScratches = new WeakMap<ExactScratch, FusedScratch>();

function fusedScratch(scratch: ExactScratch, outputs: number, pipelines: number): FusedScratch {
  let f = fusedScratches.get(scratch);
  if (!f || f.values.length !== outputs || f.wrong.length !== pipelines) {
    const u8 = () => new Uint8Array(SEED_BLOCK);
    f = {
      columns: {
        intended: u8(), prepared: u8(), initial: u8(), atWindowStart: u8(), atWindowEnd: u8(),
        firstJump: new Float64Array(SEED_BLOCK), jumpCause: u8(),
      },
      values: Array.from({ length: outputs }, () => new Float64Array(SEED_BLOCK)),
      wrong: Array.from({ length: pipelines }, u8),
      jumpCause: u8(),
    };
    fusedScratches.set(scratch, f);
  }
  return f;
}

/**
 * Shots [batch·batchSize, batch·batchSize + count) through the exact engine, scored and tallied
 * per seeding block: the same leaves and paired counts as simulateExactBatch → scoreBatch →
 * tallyBatch, without the per-shot arrays.
 */
export function simulateTalliedBatch(
  point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, batch: number, count: number,
  scoring: FusedScoring, scratch: ExactScratch = makeExactScratch(point),
): TalliedBatch {
  if (scratch.exactPoint !== point) {
    scratch.exact = exactTables(point);
    scratch.exactPoint = point;
    scratch.normals = new Float64Array(Math.max(1, scratch.exact.columns.length) * SEED_BLOCK);
  }
  const history = scratchHistory(point, scratch);
  const t = scratch.exact;
  const sc = point.scenario;
  const states = sc.states.length, outcomes = sc.outcomes.length;
  const outcomeOf = Uint8Array.from(sc.states, (s) => s.outcome);
  const nPipes = scoring.pipelines.length;
  const f = fusedScratch(scratch, t.outputs, nPipes);
  const { columns, values } = f;
  // output index of each pipeline's I and Q (−1: no Q, the value is 0)
  const iOut = new Int32Array(nPipes).fill(-1), qOut = new Int32Array(nPipes).fill(-1);
  for (let d = 0; d < t.outputs; d++) (t.isQuadrature[d] ? qOut : iOut)[t.pipeline[d]!] = d;
  const firstShot = batch * sc.batchSize;
  const leaves: Tally[][] = scoring.pipelines.map(() => []);
  const pairs = new Float64Array(3 * (nPipes * (nPipes - 1)) / 2);
  const zeros = new Float64Array(SEED_BLOCK);
  const blocks = new BlockStreams(sc.seed, pointIndex, purpose, firstShot / SEED_BLOCK);
  const stream = blocks.current();
  for (let from = 0; from < count; from += SEED_BLOCK) {
    if (from > 0) blocks.advanceInto(stream);
    const len = Math.min(count, from + SEED_BLOCK) - from;
    sampleHistories(history, stream, columns, 0, len, scratch.store);
    blockValues(t, stream, scratch.normals, values, columns.initial, 0, len, scratch.store);
    for (let p = 0; p < nPipes; p++) {
      const s = scoring.pipelines[p]!;
      const leaf = emptyTally(states, outcomes);
      const jumpCause = s.lastSample === null ? columns.jumpCause : windowedJumpCause(columns, s.lastSample, len, f.jumpCause);
      tallyBlock(
        leaf, s, values[iOut[p]!]!, qOut[p]! >= 0 ? values[qOut[p]!]! : zeros, columns, jumpCause, outcomeOf, len, f.wrong[p]!,
      );
      leaves[p]!.push(leaf);
    }
    if (nPipes > 1) addPairCounts(pairs, f.wrong, len);
  }
  return { kind: 'tallied', point: pointIndex, purpose, batch, firstShot, count, leaves, pairs };
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
 */
function tallyBlock(
  leaf: Tally, s: FusedPipeline, inPhase: Float64Array, quadrature: Float64Array, c: HistoryColumns,
  jumpCause: Uint8Array, outcomeOf: Uint8Array, len: number, wrong: Uint8Array,
): void {
  const nCauses = CAUSES.length, outcomes = leaf.outcomes, states = leaf.states;
  const { assignments, causes, discarded, discardedWrong } = leaf;
  const cos = s.cos, sin = s.sin, threshold = s.threshold, highIsOne = s.highIsOne, band = s.band;
  const intendedCol = c.intended, preparedCol = c.prepared, initialCol = c.initial;
  const n = new Float64Array(states), mean = new Float64Array(states), m2 = new Float64Array(states);
  for (let i = 0; i < len; i++) {
    const x = inPhase[i]! * cos + quadrature[i]! * sin;
    const outcome = highIsOne ? (x > threshold ? 1 : 0) : (x < threshold ? 1 : 0);
    const intended = intendedCol[i]!, prepared = preparedCol[i]!, initial = initialCol[i]!, jc = jumpCause[i]!;
    let cause = CAUSE_NONE;
    if (outcome !== outcomeOf[intended]) {
      cause = prepared !== intended ? CAUSE_PREPARATION : initial !== prepared ? CAUSE_MAPPING : jc !== 0 ? jc : CAUSE_NOISE;
    }
    wrong[i] = cause;
    assignments[intended * outcomes + outcome]!++;
    causes[intended * nCauses + cause]!++;
    if (band >= 0 && Math.abs(x - threshold) < band) {
      discarded[intended]!++;
      if (cause !== 0) discardedWrong[intended]!++;
    }
    if (prepared === intended && initial === intended && jc === 0) {
      n[intended]!++;
      const delta = x - mean[intended]!;
      mean[intended]! += delta / n[intended]!;
      m2[intended]! += delta * (x - mean[intended]!);
    }
  }
  for (let k = 0; k < states; k++) leaf.clean[k] = { n: n[k]!, mean: mean[k]!, m2: m2[k]! };
}

/** Adds a block's paired counts: for each pair a < b, both wrong, only a, only b. */
function addPairCounts(pairs: Float64Array, wrong: readonly Uint8Array[], len: number): void {
  let k = 0;
  for (let a = 0; a < wrong.length; a++) {
    for (let b = a + 1; b < wrong.length; b++, k += 3) {
      const wa = wrong[a]!, wb = wrong[b]!;
      let both = 0, onlyA = 0, onlyB = 0;
      for (let i = 0; i < len; i++) {
        const x = wa[i] !== 0, y = wb[i] !== 0;
        if (x && y) both++;
        else if (x) onlyA++;
        else if (y) onlyB++;
      }
      pairs[k]! += both;
      pairs[k + 1]! += onlyA;
      pairs[k + 2]! += onlyB;
    }
  }
}
