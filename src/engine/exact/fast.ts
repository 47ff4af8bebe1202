/**
 * The fused exact path's kernel for the common point: two states, two outcomes, one pipeline
 * (I, or I and Q) and at most two nonzero Cholesky columns. One loop per seeding block draws each
 * shot's history from the block's stream and its normals from the block's second lane, forms
 * the values, projects, decides, attributes the cause and adds the shot to the block's tally —
 * with no per-shot arrays, and the two generators interleaved (independent dependency chains).
 *
 * It does the arithmetic of the general path (history.ts sampleHistories, exact-batch.ts
 * blockValues, exact-fused.ts tallyBlock) in the same order, so the block's tally is the same to
 * the bit (test/plan/exact-fused.test.ts); only the order of work between the two streams
 * differs, which no number depends on.
 */
import { attributeCause, CAUSE_NONE, CAUSES } from '../../analysis/causes.ts';
import { momentsFromShiftedSums } from '../../analysis/moments.ts';
import type { Tally } from '../../analysis/tally.ts';
import { normalSlowPath, type RandomStream } from '../../random/stream.ts';
import { ZIGGURAT } from '../../random/ziggurat.ts';
import { factorEntry, signalValue, type ExactTables } from './batch.ts';
import type { CompiledPoint } from '../compile-point.ts';
import type { FusedPipeline } from './fused-scoring.ts';
import { walkChain, type HistoryColumns, type HistoryTables, type PathStore } from '../../physics/history.ts';

const INV_TWO_POW_32 = 1 / 4294967296;
const LAYER_K = ZIGGURAT.k;
const LAYER_W = ZIGGURAT.w;

/**
 * Whether `fastTallyBlock` handles a point: 2 states, 2 outcomes, 1 pipeline, ≤ 2 outputs and
 * columns, and no 1/f noise (its per-shot timeline draw runs in the separate passes).
 */
export function fastKernelApplies(point: CompiledPoint, t: ExactTables, h: HistoryTables, pipelines: number, outcomes: number): boolean {
  return point.noise.flicker === null && h.states === 2 && outcomes === 2 && pipelines === 1
    && t.outputs >= 1 && t.outputs <= 2 && t.columns.length <= 2;
}

/**
 * Simulates, scores and tallies `len` shots of one seeding block into `leaf` (a fresh tally):
 * histories from `stream` (at the block's start), normals from `lane` (at its second lane).
 * `columns` (index 0) and `store` are scratch for the rare shot with jumps.
 */
export function fastTallyBlock(
  h: HistoryTables, t: ExactTables, s: FusedPipeline, outcomeOf: Uint8Array, stream: RandomStream, lane: RandomStream,
  len: number, leaf: Tally, columns: HistoryColumns, store: PathStore,
): void {
  const { prepareCumulative, prepProbability, prepInto, mapProbability, mapInto, anyPrep, anyMap, noJumpCut, exitRate } = h;
  const nCauses = CAUSES.length;
  const { causes, discarded, discardedWrong } = leaf;
  const cos = s.cos, sin = s.sin, threshold = s.threshold, band = s.band;
  // (lastSample null: the pipeline reads to the window's end, so no jump is after its last sample)
  const lastSample = s.lastSample ?? Infinity;
  const { recordLength, lastWindowSample } = h;
  const fs = t.sampleRate;
  const flip = s.highIsOne ? 0 : 1;
  const firstCut = prepareCumulative[0]!;
  const nCols = t.columns.length, hasQ = t.outputs === 2;
  // the no-jump values per state and the factor entries, as blockValues forms them
  const fullI = Float64Array.of(t.full[0]!, t.full[1]!);
  const fullQ = hasQ ? Float64Array.of(t.full[2]!, t.full[3]!) : new Float64Array(2);
  const cI0 = factorEntry(t, 0, 0), cQ0 = hasQ ? factorEntry(t, 1, 0) : 0, cQ1 = hasQ ? factorEntry(t, 1, 1) : 0;
  const qTwoTerms = cQ1 !== 0;
  // every jump ends the chain: a leaving state's one destination is the other state, which cannot leave
  const oneJump = singleJumpChain(h);
  const jumpCause = h.jumpCause;
  const prefix = t.prefix;
  const loI = t.lo[0]!, hiI = t.hi[0]!, loQ = hasQ ? t.lo[1]! : 0, hiQ = hasQ ? t.hi[1]! : 0;
  const st = stream.s, ls = lane.s;
  let a0 = st[0]!, a1 = st[1]!, a2 = st[2]!, a3 = st[3]!;
  let b0 = ls[0]!, b1 = ls[1]!, b2 = ls[2]!, b3 = ls[3]!;
  let m = 0, r = 0, x = 0, n2 = 0, n3 = 0;
  let sumState = 0, sumOutcome = 0, sumBoth = 0;
  // shifted sums of the clean values per state (moments.ts momentsFromShiftedSums)
  let n0 = 0, n1 = 0, shift0 = 0, shift1 = 0, s10 = 0, s11 = 0, s20 = 0, s21 = 0;
  for (let i = 0; i < len; i++) {
    // history (sampleHistories, draw for draw): xoshiro128** steps on the block's stream, inline
    m = Math.imul(a1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
    x = a1 << 9; n2 = a2 ^ a0; n3 = a3 ^ a1; a1 ^= n2; a0 ^= n3; a2 = n2 ^ x; a3 = (n3 << 11) | (n3 >>> 21);
    let u = ((r >>> 0) + 0.5) * INV_TWO_POW_32;
    const intended = +(u > firstCut);
    let prepared = intended;
    if (anyPrep) {
      m = Math.imul(a1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
      x = a1 << 9; n2 = a2 ^ a0; n3 = a3 ^ a1; a1 ^= n2; a0 ^= n3; a2 = n2 ^ x; a3 = (n3 << 11) | (n3 >>> 21);
      u = ((r >>> 0) + 0.5) * INV_TWO_POW_32;
      prepared = intended + +(u < prepProbability[intended]!) * (prepInto[intended]! - intended);
    }
    let initial = prepared;
    if (anyMap) {
      m = Math.imul(a1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
      x = a1 << 9; n2 = a2 ^ a0; n3 = a3 ^ a1; a1 ^= n2; a0 ^= n3; a2 = n2 ^ x; a3 = (n3 << 11) | (n3 >>> 21);
      u = ((r >>> 0) + 0.5) * INV_TWO_POW_32;
      initial = prepared + +(u < mapProbability[prepared]!) * (mapInto[prepared]! - prepared);
    }
    m = Math.imul(a1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
    x = a1 << 9; n2 = a2 ^ a0; n3 = a3 ^ a1; a1 ^= n2; a0 ^= n3; a2 = n2 ^ x; a3 = (n3 << 11) | (n3 >>> 21);
    u = ((r >>> 0) + 0.5) * INV_TWO_POW_32;
    let jc = 0, jumped = false, pathI = 0, pathQ = 0;
    if (u >= noJumpCut[initial]!) {
      const time = -Math.log(u) / exitRate[initial]!;
      if (time < recordLength) {
        jumped = true;
        if (oneJump) {
          // the chain's one jump, inline (walkChain draw for draw: the destination's uniform,
          // whose outcome is certain here, and no holding time in the absorbing state)
          x = a1 << 9; n2 = a2 ^ a0; n3 = a3 ^ a1; a1 ^= n2; a0 ^= n3; a2 = n2 ^ x; a3 = (n3 << 11) | (n3 >>> 21);
          const next = 1 - initial;
          jc = time <= lastWindowSample ? jumpCause[initial * 2 + next]! : 0;
          if (!(time <= lastSample)) jc = 0;
          if (t.response === null) {
            const switchAt = Math.ceil(time * fs);
            pathI = oneJumpValue(prefix[initial]!, prefix[next]!, loI, hiI, switchAt);
            if (hasQ) pathQ = oneJumpValue(prefix[2 + initial]!, prefix[2 + next]!, loQ, hiQ, switchAt);
          } else {
            store.times[0] = time; store.entered[0] = next;
            pathI = signalValue(t, 0, initial, store.times, store.entered, 0, 1);
            if (hasQ) pathQ = signalValue(t, 1, initial, store.times, store.entered, 0, 1);
          }
        } else {
          // rare: the jump chain and the path's signal, outside the common path's registers
          st[0] = a0; st[1] = a1; st[2] = a2; st[3] = a3;
          columns.jumpCause[0] = 0;
          const nj = walkChain(h, stream, columns, 0, initial, time, store, 0);
          a0 = st[0]!; a1 = st[1]!; a2 = st[2]!; a3 = st[3]!;
          jc = columns.jumpCause[0]!;
          // the first jump as a pipeline that stops reading at lastSample sees it (score.ts)
          if (!(columns.firstJump[0]! <= lastSample)) jc = 0;
          pathI = signalValue(t, 0, initial, store.times, store.entered, 0, nj);
          if (hasQ) pathQ = signalValue(t, 1, initial, store.times, store.entered, 0, nj);
        }
      }
    }
    // the shot's normals from the lane (RandomStream.fillNormals, draw for draw)
    let z0 = 0, z1 = 0;
    if (nCols > 0) {
      m = Math.imul(b1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
      x = b1 << 9; n2 = b2 ^ b0; n3 = b3 ^ b1; b1 ^= n2; b0 ^= n3; b2 = n2 ^ x; b3 = (n3 << 11) | (n3 >>> 21);
      const layer = r & 127, pos = r >> 7;
      if (Math.abs(pos) < LAYER_K[layer]!) z0 = pos * LAYER_W[layer]!;
      else {
        ls[0] = b0; ls[1] = b1; ls[2] = b2; ls[3] = b3;
        z0 = normalSlowPath(ls, pos, layer);
        b0 = ls[0]!; b1 = ls[1]!; b2 = ls[2]!; b3 = ls[3]!;
      }
      if (nCols > 1) {
        m = Math.imul(b1, 5); r = Math.imul((m << 7) | (m >>> 25), 9);
        x = b1 << 9; n2 = b2 ^ b0; n3 = b3 ^ b1; b1 ^= n2; b0 ^= n3; b2 = n2 ^ x; b3 = (n3 << 11) | (n3 >>> 21);
        const layer1 = r & 127, pos1 = r >> 7;
        if (Math.abs(pos1) < LAYER_K[layer1]!) z1 = pos1 * LAYER_W[layer1]!;
        else {
          ls[0] = b0; ls[1] = b1; ls[2] = b2; ls[3] = b3;
          z1 = normalSlowPath(ls, pos1, layer1);
          b0 = ls[0]!; b1 = ls[1]!; b2 = ls[2]!; b3 = ls[3]!;
        }
      }
    }
    // the values (blockValues' noJumpPart, then the path's signal for a shot with jumps)
    let valueI = fullI[initial]! + cI0 * z0;
    let valueQ = hasQ ? (qTwoTerms ? fullQ[initial]! + cQ0 * z0 + cQ1 * z1 : fullQ[initial]! + cQ0 * z0) : 0;
    if (jumped) {
      valueI += pathI - fullI[initial]!;
      if (hasQ) valueQ += pathQ - fullQ[initial]!;
    }
    // scoring and tallying (tallyBlock)
    const v = valueI * cos + valueQ * sin;
    const outcome = flip === 0 ? +(v > threshold) : +(v < threshold);
    sumState += intended; sumOutcome += outcome; sumBoth += intended & outcome;
    let cause = CAUSE_NONE;
    if (outcome !== outcomeOf[intended]) {
      cause = attributeCause(intended, prepared, initial, jc !== 0, jc);
      causes[intended * nCauses + cause]!++;
    }
    if (band >= 0 && Math.abs(v - threshold) < band) {
      discarded[intended]!++;
      if (cause !== 0) discardedWrong[intended]!++;
    }
    const clean = +(prepared === intended) & +(initial === intended) & +(jc === 0);
    const w1 = clean & intended, w0 = clean & (intended ^ 1);
    if (n0 === 0 && w0 !== 0) shift0 = v;
    if (n1 === 0 && w1 !== 0) shift1 = v;
    const d0 = v - shift0, d1 = v - shift1;
    const e0 = w0 * d0, e1 = w1 * d1;
    s10 += e0; s20 += e0 * d0; n0 += w0;
    s11 += e1; s21 += e1 * d1; n1 += w1;
  }
  st[0] = a0; st[1] = a1; st[2] = a2; st[3] = a3;
  ls[0] = b0; ls[1] = b1; ls[2] = b2; ls[3] = b3;
  finishTwoByTwo(leaf, len, sumState, sumOutcome, sumBoth);
  leaf.clean[0] = momentsFromShiftedSums(n0, shift0, s10, s20);
  leaf.clean[1] = momentsFromShiftedSums(n1, shift1, s11, s21);
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

/**
 * exact-batch.ts pathValue for one jump switching at sample ⌈t·fs⌉ = `switchAt` from the state
 * with prefix sums `from` to the one with `to`, in the same operations.
 */
function oneJumpValue(from: Float64Array, to: Float64Array, lo: number, hi: number, switchAt: number): number {
  const u = Math.min(hi, Math.max(lo, switchAt));
  let v = 0, k = lo;
  if (u > k) {
    v += from[u - lo]! - from[k - lo]!;
    k = u;
  }
  return v + (to[hi - lo]! - to[k - lo]!);
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
