/**
 * The exact-statistic engine: when every pipeline is a linear functional of the record
 * (value = Σ_k K[k]·record[k], CompiledPipeline.kernels) and the noise is Gaussian, the
 * integrated values of a shot are its noise-free signal part plus Gaussian noise drawn directly.
 * No record is synthesised:
 * - signal: from the shot's path, by prefix sums of K·waveform per state (O(1) per jump);
 * - noise: the outputs of ALL pipelines (I and Q each) share one record, so their white parts
 *   are jointly Gaussian with covariance σ²·Σ_k K_a[k]·K_b[k]; they are drawn together through
 *   the Cholesky factor of that matrix, which keeps paired comparisons between pipelines valid.
 * - baseband I and Q (two channels, channel-major kernels): the prefix sums fold each sample's
 *   terms over the channels (a jump switches both at once), the white covariance sums over both
 *   channels, and noise drawn per shot adds the covariance of each independent realisation
 *   (signal/injection.ts); everything after the tables is the same for one channel or two.
 * Histories come from the same code and the same block streams as the trace engine
 * (history.ts), so both engines see identical histories; the distributions of the values agree
 * exactly (tests: test/engine/exact-engine.test.ts).
 *
 * - 1/f noise (correlated across samples and shots): its part of each value is Σ_j G_j·w_j, w the
 *   shot's stretch of the point's 1/f timeline (signal/flicker-timeline.ts, drawn from the point's
 *   'slow-noise' streams, never the per-shot ones) and G the output's kernel carried onto that
 *   timeline's grid (compile-noise.ts) — the very numbers the trace engine adds to its values
 *   when no digitizer needs the 1/f noise in the record, so both engines see the same 1/f part
 *   shot for shot, with the timeline's covariance across successive shots.
 */
import { choleskyLower } from '../../analysis/cholesky.ts';
import { kernelPrefixSums, whiteCovariance, type SupportedKernel } from '../../analysis/linear-statistic.ts';
import { seenFrom } from '../../analysis/noise-prediction.ts';
import { allChannels, foldedProducts } from '../../signal/channel-fold.ts';
import type { NoisePlan } from '../../signal/noise-plan.ts';
import { BlockStreams, SEED_BLOCK, type StreamPurpose } from '../../random/streams.ts';
import type { RandomStream } from '../../random/stream.ts';
import { makeScratch, makeShotBatch, noiseRuntime, scratchHistory, type BatchScratch, type ShotBatch } from '../trace/batch.ts';
import type { CompiledPoint } from '../compile-point.ts';
import { sampleHistories, type PathStore } from '../../physics/history.ts';

/** Per-point tables of the exact engine. */
export interface ExactTables {
  /** Number of nonzero outputs (I of every pipeline, Q of those with a carrier). */
  outputs: number;
  /** Number of hidden states (rows of `full` per output). */
  states: number;
  /** For output d: its pipeline and whether it is Q. */
  pipeline: Int32Array;
  isQuadrature: Uint8Array;
  /** Support [lo, hi) of output d's kernel. */
  lo: Int32Array;
  hi: Int32Array;
  /** prefix[d·S + s]: prefix sums of output d's kernel times state s's waveform. */
  prefix: Float64Array[];
  /** full[d·S + s]: the noise-free value of a shot that stays in s. */
  full: Float64Array;
  /** Lower Cholesky factor of the outputs' white-noise covariance, outputs×outputs row-major. */
  factor: Float64Array;
  /** Its nonzero columns (normals drawn per shot). */
  columns: Int32Array;
  sampleRate: number;
  /** The analog response's tables, or null without one. */
  response: ExactResponse | null;
}

/**
 * The first-order analog response (signal/response.ts) in closed form: between jumps the
 * responded level is L + D·e^(−(t − t_ref)/τ), so a segment of samples [u, v) adds
 * e^(−(u/fs − t_ref)/τ)·(Re D·S_c − Im D·S_s) to an output, with
 * S_c = Σ_{u≤k<v} K[k]·g·c_k·a^(k−u) = E_c[u] − a^(v−u)·E_c[v] (a = e^(−1/(fs·τ))) and E the
 * decayed suffix sums E[u] = K[u]·g·c_u + a·E[u+1]. O(1) per segment again.
 */
export interface ExactResponse {
  timeConstant: number;
  fromZero: boolean;
  levelRe: Float64Array;
  levelIm: Float64Array;
  /** levelPrefix[d·S + s]: prefix sums of output d's kernel times state s's unresponded waveform. */
  levelPrefix: Float64Array[];
  /** Decayed suffix sums of output d's kernel times gain·c_k and gain·s_k, over [lo, hi]. */
  decayI: Float64Array[];
  decayQ: Float64Array[];
}

/**
 * E[j] = Σ_{k ≥ lo+j} t[k]·a^(k−lo−j) over k < hi, for j = 0 … hi−lo (E at hi is 0), with
 * t[k] = Σ_c kernel[c·n + k]·carrier[c·n + k] the sample's terms over the record's channels.
 */
function decayedSuffixSums(kernel: Float64Array, carrier: Float64Array, lo: number, hi: number, a: number, channels: number): Float64Array {
  const e = new Float64Array(hi - lo + 1);
  if (channels === 1) {
    for (let k = hi - 1; k >= lo; k--) e[k - lo] = kernel[k]! * carrier[k]! + a * e[k - lo + 1]!;
    return e;
  }
  const t = foldedProducts(kernel, carrier, lo, hi, kernel.length / channels, allChannels(channels));
  for (let k = hi - 1; k >= lo; k--) e[k - lo] = t[k]! + a * e[k - lo + 1]!;
  return e;
}

/**
 * Adds to the outputs' covariance that of the noise kinds drawn per shot (signal/noise/:
 * correlated noise), each source seen from its injection point: the outputs' joint Gaussian then
 * holds every noise that is independent between shots.
 */
function addPerShotCovariance(covariance: Float64Array, kernels: readonly SupportedKernel[], noise: NoisePlan): Float64Array {
  const n = kernels.length;
  for (const { compiled } of noise.kinds) {
    const perShot = compiled.perShot;
    if (!perShot) continue;
    compiled.sources.forEach((info, s) => {
      // per output, the functional of each independent realisation of the source (signal/injection.ts)
      const seen = kernels.map((k) => seenFrom(noise, info.injection, k.kernel, k.lo, k.hi));
      for (let a = 0; a < n; a++) {
        for (let b = 0; b <= a; b++) {
          const lo = Math.min(kernels[a]!.lo, kernels[b]!.lo), hi = Math.max(kernels[a]!.hi, kernels[b]!.hi);
          const [first, ...rest] = seen[a]!.map((xa, r) => perShot.covariance(s, xa, seen[b]![r]!, lo, hi));
          const c = rest.reduce((sum, x) => sum + x, first!);
          covariance[a * n + b] += c;
          if (a !== b) covariance[b * n + a] += c;
        }
      }
    });
  }
  return covariance;
}

/** Builds the exact engine's tables for one compiled point. */
export function exactTables(point: CompiledPoint): ExactTables {
  const kernels: SupportedKernel[] = [];
  const pipeline: number[] = [], isQ: number[] = [];
  point.pipelines.forEach((p, i) => {
    const k = p.kernels;
    kernels.push({ kernel: k.inPhase, lo: k.lo, hi: k.hi }); pipeline.push(i); isQ.push(0);
    if (k.quadrature) { kernels.push({ kernel: k.quadrature, lo: k.lo, hi: k.hi }); pipeline.push(i); isQ.push(1); }
  });
  const n = kernels.length;
  const states = point.waveforms.length;
  const { channels } = point;
  const prefix: Float64Array[] = [];
  const full = new Float64Array(n * states);
  kernels.forEach((k, d) => {
    for (let s = 0; s < states; s++) {
      const p = kernelPrefixSums(k.kernel, point.waveforms[s]!, k.lo, k.hi, channels);
      prefix.push(p);
      full[d * states + s] = p[k.hi - k.lo]!;
    }
  });
  const { factor } = choleskyLower(addPerShotCovariance(whiteCovariance(kernels, point.whiteSigma, channels), kernels, point.noise), n);
  const columns: number[] = [];
  for (let j = 0; j < n; j++) if (factor[j * n + j]! > 0) columns.push(j);
  const r = point.noise.response;
  let response: ExactResponse | null = null;
  if (r) {
    const fs = point.grid.sampleRate;
    const a = Math.exp(-1 / (fs * r.timeConstant));
    response = {
      timeConstant: r.timeConstant, fromZero: r.fromZero, levelRe: r.levelRe, levelIm: r.levelIm,
      levelPrefix: kernels.flatMap((k) => point.levelWaves.map((w) => kernelPrefixSums(k.kernel, w, k.lo, k.hi, channels))),
      decayI: kernels.map((k) => decayedSuffixSums(k.kernel, r.inPhase, k.lo, k.hi, a, channels)),
      decayQ: kernels.map((k) => decayedSuffixSums(k.kernel, r.quadrature, k.lo, k.hi, a, channels)),
    };
  }
  return {
    response, states,
    outputs: n, pipeline: Int32Array.from(pipeline), isQuadrature: Uint8Array.from(isQ),
    lo: Int32Array.from(kernels, (k) => k.lo), hi: Int32Array.from(kernels, (k) => k.hi),
    prefix, full, factor, columns: Int32Array.from(columns), sampleRate: point.grid.sampleRate,
  };
}

/** Scratch of the exact engine: the trace engine's (histories) plus the tables and normals. */
export interface ExactScratch extends BatchScratch {
  exact: ExactTables;
  /** The point `exact` was built for. */
  exactPoint: CompiledPoint;
  normals: Float64Array;
}

export function makeExactScratch(point: CompiledPoint): ExactScratch {
  const exact = exactTables(point);
  return { ...makeScratch(point), exact, exactPoint: point, normals: new Float64Array(Math.max(1, exact.columns.length) * SEED_BLOCK) };
}

/** Rebuilds the exact tables of a scratch when it is used for another point. */
export function refreshExactScratch(point: CompiledPoint, scratch: ExactScratch): void {
  if (scratch.exactPoint === point) return;
  scratch.exact = exactTables(point);
  scratch.exactPoint = point;
  scratch.normals = new Float64Array(Math.max(1, scratch.exact.columns.length) * SEED_BLOCK);
}

/**
 * Runs shots [batch·batchSize, batch·batchSize + count) through the exact engine. Same
 * ShotBatch as `simulateBatch`; each block draws its histories from the start of its stream
 * (identical to the trace engine's), and its normals from the block's second lane
 * (random/streams.ts `laneInto`), shot by shot: the shot's normals for the Cholesky columns in
 * increasing order.
 */
export function simulateExactBatch(
  point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, batch: number, count: number,
  scratch: ExactScratch = makeExactScratch(point),
): ShotBatch {
  const out = makeShotBatch(point, pointIndex, purpose, batch, count);
  refreshExactScratch(point, scratch);
  const history = scratchHistory(point, scratch);
  const t = scratch.exact;
  const { store } = scratch;
  const targets = outputTargets(t, out);
  const blocks = new BlockStreams(point.scenario.seed, pointIndex, purpose, out.firstShot / SEED_BLOCK);
  const stream = blocks.current(), lane = blocks.current();
  for (let from = 0; from < count; from += SEED_BLOCK) {
    if (from > 0) blocks.advanceInto(stream);
    blocks.laneInto(lane);
    const to = Math.min(count, from + SEED_BLOCK);
    sampleHistories(history, stream, out, from, to, store);
    blockValues(t, lane, scratch.normals, targets, out.initial, from, to, store);
  }
  addLinearNoiseValues(point, pointIndex, purpose, scratch, t, targets, out.firstShot, 0, count);
  return out;
}

/** Scratch of blockValues: the block's shots with jumps. */
const jumpingShots = new Int32Array(SEED_BLOCK);

/** The value array of each output d (I or Q of its pipeline) in a batch. */
export function outputTargets(t: ExactTables, out: Pick<ShotBatch, 'values'>): Float64Array[] {
  return Array.from({ length: t.outputs }, (_, d) => {
    const v = out.values[t.pipeline[d]!]!;
    return t.isQuadrature[d] ? v.quadrature : v.inPhase;
  });
}

/** Output d's factor entry for the c-th nonzero Cholesky column (0 where that column does not reach d). */
export function factorEntry(t: ExactTables, d: number, c: number): number {
  return c < t.columns.length && t.columns[c]! <= d ? t.factor[d * t.outputs + t.columns[c]!]! : 0;
}

/**
 * The values of one seeding block's shots [from, to), whose histories were just drawn (initial
 * states in `initial`, jumps in `store`, store index = shot − from): draws the block's normals
 * from `lane` (shot by shot, one per nonzero Cholesky column) and writes targets[d][i] for
 * every output d as full[state] + Σ_c L[d][c]·z_c, then the path's signal for shots with jumps.
 */
export function blockValues(
  t: ExactTables, lane: RandomStream, normals: Float64Array, targets: readonly Float64Array[], initial: Uint8Array,
  from: number, to: number, store: PathStore,
): void {
  const n = t.outputs, nCols = t.columns.length;
  const states = t.states;
  const len = to - from;
  const offset = store.offset;
  // (the jump arrays may have grown while sampling)
  const times = store.times, entered = store.entered;
  if (nCols > 0) lane.fillNormals(normals, 0, nCols * len);
  // the block's shots with jumps inside the record (store index)
  const jumping = jumpingShots;
  let nJumping = 0;
  for (let j = 0; j < len; j++) if (offset[j] !== offset[j + 1]) jumping[nJumping++] = j;
  for (let d = 0; d < n; d++) {
    const y = targets[d]!;
    // the no-jump signal and the noise in one pass: y = full[state] + Σ_c L[d][c]·z_c
    noJumpPart(y, from, to, t.full, d * states, initial, factorEntry(t, d, 0), factorEntry(t, d, 1), normals, nCols);
    for (let c = 2; c < nCols; c++) {
      if (t.columns[c]! > d) break;
      addScaled(y, from, to, factorEntry(t, d, c), normals, c, nCols);
    }
    // shots with jumps inside the record: replace the no-jump signal by the path's
    for (let k = 0; k < nJumping; k++) {
      const i = from + jumping[k]!;
      const a = offset[i - from]!, b = offset[i - from + 1]!;
      y[i] += signalValue(t, d, initial[i]!, times, entered, a, b) - t.full[d * states + initial[i]!]!;
    }
  }
}

/** The noise-free value of output d for a path starting in `start` with jumps [a, b) of the store. */
export function signalValue(t: ExactTables, d: number, start: number, times: Float64Array, entered: Uint8Array, a: number, b: number): number {
  return t.response
    ? respondedPathValue(t, d, t.states, start, times, entered, a, b)
    : pathValue(t.prefix, d * t.states, t.lo[d]!, t.hi[d]!, t.sampleRate, start, times, entered, a, b);
}

/** y[i] += c·z[(i − from)·stride + col] for i in [from, to). */
function addScaled(y: Float64Array, from: number, to: number, c: number, z: Float64Array, col: number, stride: number): void {
  for (let i = from, k = col; i < to; i++, k += stride) y[i] += c * z[k]!;
}

/**
 * y[i] = full[base + initial[i]] + c0·z_0 (+ c1·z_1 when c1 ≠ 0) for the shots [from, to) of a
 * block, z_c the shot's c-th normal (z[(i − from)·stride + c]; 0 without columns).
 */
function noJumpPart(
  y: Float64Array, from: number, to: number, full: Float64Array, base: number, initial: Uint8Array,
  c0: number, c1: number, z: Float64Array, stride: number,
): void {
  if (stride === 0) {
    for (let i = from; i < to; i++) y[i] = full[base + initial[i]!]! + c0 * 0;
  } else if (c1 === 0) {
    for (let i = from, k = 0; i < to; i++, k += stride) y[i] = full[base + initial[i]!]! + c0 * z[k]!;
  } else {
    for (let i = from, k = 0; i < to; i++, k += stride) y[i] = full[base + initial[i]!]! + c0 * z[k]! + c1 * z[k + 1]!;
  }
}

/** Σ over the path's segments of the prefix-sum differences (a jump at t switches at sample ⌈t·fs⌉, as signal/trace.ts). */
function pathValue(
  prefix: readonly Float64Array[], base: number, lo: number, hi: number, fs: number, start: number,
  times: Float64Array, entered: Uint8Array, a: number, b: number,
): number {
  let state = start, k = lo, v = 0;
  for (let j = a; j < b; j++) {
    const u = Math.min(hi, Math.max(lo, Math.ceil(times[j]! * fs)));
    if (u > k) {
      const p = prefix[base + state]!;
      v += p[u - lo]! - p[k - lo]!;
      k = u;
    }
    state = entered[j]!;
  }
  const p = prefix[base + state]!;
  return v + (p[hi - lo]! - p[k - lo]!);
}

/** The noise-free value of output d for a path with jumps, with the analog response (see ExactResponse). */
function respondedPathValue(
  t: ExactTables, d: number, states: number, start: number, times: Float64Array, entered: Uint8Array, a: number, b: number,
): number {
  const r = t.response!;
  const lo = t.lo[d]!, hi = t.hi[d]!, fs = t.sampleRate, tau = r.timeConstant;
  const base = d * states;
  const eI = r.decayI[d]!, eQ = r.decayQ[d]!;
  // the deviation D = dRe + i·dIm (at time tRef) summed over samples [k, u)
  const deviation = (k: number, u: number, dRe: number, dIm: number, tRef: number): number => {
    if ((dRe === 0 && dIm === 0) || u <= k) return 0;
    const g = Math.exp(-(k / fs - tRef) / tau);
    const decay = Math.exp(-(u - k) / (fs * tau));
    return g * (dRe * (eI[k - lo]! - decay * eI[u - lo]!) - dIm * (eQ[k - lo]! - decay * eQ[u - lo]!));
  };
  let state = start;
  let dRe = r.fromZero ? -r.levelRe[state]! : 0, dIm = r.fromZero ? -r.levelIm[state]! : 0, tRef = 0;
  let k = lo, v = 0;
  for (let j = a; j < b; j++) {
    const tj = times[j]!;
    const u = Math.min(hi, Math.max(lo, Math.ceil(tj * fs)));
    if (u > k) {
      const p = r.levelPrefix[base + state]!;
      v += p[u - lo]! - p[k - lo]! + deviation(k, u, dRe, dIm, tRef);
      k = u;
    }
    const f = Math.exp(-(tj - tRef) / tau);
    const next = entered[j]!;
    dRe = dRe * f + r.levelRe[state]! - r.levelRe[next]!;
    dIm = dIm * f + r.levelIm[state]! - r.levelIm[next]!;
    tRef = tj;
    state = next;
  }
  const p = r.levelPrefix[base + state]!;
  return v + (p[hi - lo]! - p[k - lo]!) + deviation(k, hi, dRe, dIm, tRef);
}

/**
 * Adds the noise with a linear path (1/f) to targets[d][i] for the shots [from, to) of a batch whose first shot is
 * `firstShot` (nothing without such noise): the same per-shot timeline draw and carried dot
 * product as the trace engine's values (batch.ts), in shot order.
 */
export function addLinearNoiseValues(
  point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, scratch: BatchScratch, t: ExactTables,
  targets: readonly Float64Array[], firstShot: number, from: number, to: number,
): void {
  if (!point.noise.kinds.some((k) => k.compiled.linear)) return;
  const slow = noiseRuntime(point, pointIndex, purpose, scratch);
  for (let i = from; i < to; i++) {
    slow.shot(firstShot + i);
    for (let d = 0; d < t.outputs; d++) targets[d]![i] += slow.linearValue(t.pipeline[d]!, t.isQuadrature[d] === 1);
  }
}
