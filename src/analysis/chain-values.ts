/**
 * The distribution of a pipeline's noise-free integrated value over the paths of a
 * continuous-time Markov chain, with the cause of each path's first jump: the budget of any
 * chain, not only of a first jump (analysis/budget.ts uses it when a jump can be followed by
 * another).
 *
 * Model. The value is V = Σ_{k=lo}^{hi−1} d_{x_k}(k) with d_s(k) = K_k·w_s[k] (the projected
 * kernel times state s's waveform; on baseband I and Q summed over both channels, which switch
 * together) and x_k the state at sample k. The engine switches at sample
 * ⌈t·fs⌉, so sample k shows x(k/fs): the path on the sample grid is exactly the chain sampled at
 * k/fs, with transition matrix exp(Q/fs). The first jump's cause is carried in an augmented state
 * (s, f): f = 0 before any jump, else the cause of the first jump (a generator on the augmented
 * space: from (s, 0) to (c, cause(s→c)) and from (s, f) to (c, f) at rate q_sc), so exp(Q_aug·t)
 * is exact for paths with any number of jumps, including several within one sample (Norris,
 * "Markov Chains", Cambridge 1997, §2.8; the occupation of a chain sampled on a grid).
 *
 * Recursion. Track u = V_{<k} − D_{x_k}(k), D_s(k) = Σ_{lo≤j<k} d_s(j): a path that stays in s
 * keeps u, and mass that jumps from s to s' between samples k and k+1 moves by
 * D_s(k+1) − D_{s'}(k+1). So only jumping mass is shifted (onto a value grid of step h, split
 * linearly between the two nearest points, which keeps its mean exact and adds at most h²/4 of
 * variance per jump), never the mass that stays — no numerical diffusion along the window. At the
 * end V = u + D_s(hi). With h ≤ σ/16 the grid's error on a Gaussian tail is far below the
 * Monte Carlo intervals it is compared with.
 *
 * Analog response (signal/response.ts, a first-order low-pass of time constant τ on the level
 * path). The response is linear, so the responded record is the superposition of each step's
 * response: a jump from s to s' at time t adds (L_s − L_s')·e^(−(t_m − t)/τ) to every later sample
 * m (and, for a record that rings up from zero, −(L_s − L_s')·e^(−t_m/τ), the part of the ring-up
 * the new state's own waveform already holds). Through the kernel that is
 * ΔL_re·E_I(j)·e^(−(t_j − t)/τ) − ΔL_im·E_Q(j)·… with E the kernel times gain·cos θ (sin θ)
 * summed with the decay from the switching sample j = ⌈t·fs⌉ on; the jump time inside its sample
 * interval is taken at the interval's average of e^(−(t_j − t)/τ), ρ̄ = τ·fs·(1 − e^(−1/(τ·fs)))
 * (exact for the mean of the value; it leaves out the small spread of the jump within one
 * sample). So a jumping path moves by that much more; jumps up to 40 τ before the window start
 * are followed for their transient.
 */
import { matrixExponential } from '../classify/matrix-exponential.ts';
import { allChannels, foldedProducts } from '../signal/channel-fold.ts';
import type { ResponseTables } from '../signal/response.ts';

/** What the chain's value distribution needs (a subset of the budget's input). */
export interface ChainValueInput {
  kernel: Float64Array;
  lo: number;
  hi: number;
  sampleRate: number;
  waveforms: readonly Float64Array[];
  /** rate[from·N + to], 1/s. */
  rate: Float64Array;
  /** Cause code of each jump, jumpCause[from·N + to]. */
  jumpCause: Uint8Array;
  /** The analog response on the level path, or null/absent without one. */
  response?: ResponseTables | null;
  /** Channels of the record (absent: 1); kernel, waveforms and response tables are channel-major. */
  channels?: number;
}

/** Mass at value points: `values[i]` with probability `mass[i]`. */
export interface ValueMass {
  values: Float64Array;
  mass: Float64Array;
}

/** The value distribution of paths starting in one state, by the first jump's cause (0: no jump before the last sample). */
export type ValuesByCause = Map<number, ValueMass>;

/** Most grid points of the value. */
const MAX_POINTS = 8192;

/** Whether every jump of the chain ends it (its destination cannot leave): then the first-jump closed form is exact. */
export function onlyTerminalJumps(rate: Float64Array, states: number): boolean {
  for (let b = 0; b < states; b++) {
    for (let c = 0; c < states; c++) {
      if (c === b || !(rate[b * states + c]! > 0)) continue;
      for (let d = 0; d < states; d++) if (d !== c && rate[c * states + d]! > 0) return false;
    }
  }
  return true;
}

/**
 * The distribution of the noise-free value for paths starting in `start` at the record start,
 * split by the cause of the first jump up to the pipeline's last sample; `step` is the value grid
 * step (the caller picks about σ/16).
 */
export function chainValues(input: ChainValueInput, start: number, step: number): ValuesByCause {
  const { lo, hi, waveforms, rate, jumpCause } = input;
  const n = waveforms.length;
  const causes = [0];
  for (let i = 0; i < n * n; i++) if (rate[i]! > 0 && !causes.includes(jumpCause[i]!)) causes.push(jumpCause[i]!);
  const C = causes.length, A = n * C;
  const aug = (s: number, f: number) => s * C + f;
  const q = new Float64Array(A * A);
  for (let s = 0; s < n; s++) {
    for (let c = 0; c < n; c++) {
      const r = c === s ? 0 : rate[s * n + c]!;
      if (!(r > 0)) continue;
      const first = causes.indexOf(jumpCause[s * n + c]!);
      for (let f = 0; f < C; f++) {
        const from = aug(s, f), to = aug(c, f === 0 ? first : f);
        q[from * A + to] += r;
        q[from * A + from] -= r;
      }
    }
  }
  const dt = 1 / input.sampleRate;
  const r = input.response ?? null;
  // jumps this many samples before the window still reach it through the response's transient
  const first = r ? Math.max(0, lo - Math.ceil(40 * r.timeConstant * input.sampleRate)) : lo;
  const transient = r ? responseTransients(input, r, first) : null;
  const scaled = (t: number) => Float64Array.from(q, (x) => x * t);
  const step1 = matrixExponential(scaled(dt), A);
  // the augmented state at the first sample followed
  const before = matrixExponential(scaled(first * dt), A);
  // d_s(k), each sample's terms over the channels, and D_s(k) for k = lo … hi (0 before the window)
  const terms = waveforms.map((w) => sampleTerms(input, w));
  const prefix = terms.map((t) => {
    const p = new Float64Array(hi - lo + 1);
    for (let k = lo; k < hi; k++) p[k - lo + 1] = p[k - lo]! + t[k]!;
    return p;
  });
  const prefixAt = (s: number, k: number) => (k <= lo ? 0 : prefix[s]![k - lo]!);
  // bounds of u = V_{<k} − D_s(k) over every path and sample
  let vMin = 0, vMax = 0, uMin = 0, uMax = 0;
  for (let k = lo; k <= hi; k++) {
    let dMin = Infinity, dMax = -Infinity;
    for (let s = 0; s < n; s++) { dMin = Math.min(dMin, prefix[s]![k - lo]!); dMax = Math.max(dMax, prefix[s]![k - lo]!); }
    uMin = Math.min(uMin, vMin - dMax);
    uMax = Math.max(uMax, vMax - dMin);
    if (k < hi) {
      let lowest = Infinity, highest = -Infinity;
      for (let s = 0; s < n; s++) { const d = terms[s]![k]!; lowest = Math.min(lowest, d); highest = Math.max(highest, d); }
      vMin += lowest; vMax += highest;
    }
  }
  if (transient) {
    // the transients add at most Σ_jumps |ΔL|·|E|: widen by the largest, times the states
    const widest = transient.bound * n;
    uMin -= widest; uMax += widest;
  }
  const span = uMax - uMin;
  const h = span > 0 ? Math.max(Math.min(step, span / 16), span / MAX_POINTS) : 1;
  const points = span > 0 ? Math.ceil(span / h) + 2 : 1;
  let mass = Array.from({ length: A }, () => new Float64Array(points));
  let next = Array.from({ length: A }, () => new Float64Array(points));
  for (const arr of next) arr.fill(0);
  const zero = (0 - uMin) / h;
  for (let a = 0; a < A; a++) {
    const p = before[aug(start, 0) * A + a]!;
    if (p > 0) addShifted(mass[a]!, zero, p, points, mass[a]!, true);
  }
  const stateOf = (a: number) => Math.floor(a / C);
  // the pairs a mass can move along in one sample (entries below 1e-18 move nothing measurable)
  const pairs: [number, number, number][] = [];
  for (let a = 0; a < A; a++) for (let b = 0; b < A; b++) if (step1[a * A + b]! > 1e-18) pairs.push([a, b, step1[a * A + b]!]);
  // per augmented state, the range of grid points holding mass (the rest is skipped)
  let lowest = new Int32Array(A).fill(points), highest = new Int32Array(A).fill(-1);
  let nextLowest = new Int32Array(A), nextHighest = new Int32Array(A);
  const span0 = (a: number, m: Float64Array) => {
    for (let i = 0; i < points; i++) if (m[i] !== 0) { lowest[a] = Math.min(lowest[a]!, i); highest[a] = Math.max(highest[a]!, i); }
  };
  for (let a = 0; a < A; a++) span0(a, mass[a]!);
  for (let k = first; k < hi - 1; k++) {
    for (let b = 0; b < A; b++) {
      if (nextHighest[b]! >= 0 || nextLowest[b]! < points) next[b]!.fill(0);
      nextLowest[b] = points; nextHighest[b] = -1;
    }
    for (const [a, b, t] of pairs) {
      if (highest[a]! < 0) continue;
      const from = stateOf(a), to = stateOf(b);
      let shift = prefixAt(from, k + 1) - prefixAt(to, k + 1);
      if (transient && from !== to) shift += transient.value(from, to, k + 1);
      const moved = addShifted(next[b]!, shift / h, t, points, mass[a]!, false, lowest[a]!, highest[a]!);
      if (moved[0] < nextLowest[b]!) nextLowest[b] = moved[0];
      if (moved[1] > nextHighest[b]!) nextHighest[b] = moved[1];
    }
    [mass, next] = [next, mass];
    [lowest, nextLowest] = [nextLowest, lowest];
    [highest, nextHighest] = [nextHighest, highest];
  }
  const out: ValuesByCause = new Map();
  for (let f = 0; f < C; f++) {
    const values: number[] = [], probabilities: number[] = [];
    for (let s = 0; s < n; s++) {
      const m = mass[aug(s, f)]!;
      const end = prefix[s]![hi - lo]!;
      for (let i = 0; i < points; i++) {
        if (m[i]! > 0) { values.push(uMin + i * h + end); probabilities.push(m[i]!); }
      }
    }
    out.set(causes[f]!, { values: Float64Array.from(values), mass: Float64Array.from(probabilities) });
  }
  return out;
}

/**
 * target[i + shift] += weight·source[i] for source points in [from, to], the fractional shift
 * split linearly between the two nearest points; with `point`, puts `weight` at the single
 * position `shift` instead. Returns the range of target points written.
 */
function addShifted(
  target: Float64Array, shift: number, weight: number, points: number, source: Float64Array, point: boolean, from = 0, to = points - 1,
): [number, number] {
  const whole = Math.floor(shift), frac = shift - whole;
  if (point) {
    const i = Math.min(points - 1, Math.max(0, whole));
    target[i] += weight * (1 - frac);
    if (frac > 0 && i + 1 < points) target[i + 1] += weight * frac;
    return [i, Math.min(points - 1, i + 1)];
  }
  const a = weight * (1 - frac), b = weight * frac;
  const start = Math.max(from, -whole), end = Math.min(to, points - 1 - whole);
  if (start > end) return [points, -1];
  for (let i = start; i <= end; i++) {
    const x = source[i]!;
    if (x === 0) continue;
    target[i + whole] += a * x;
    // the upper neighbour of the grid's last point falls off it: the bounds keep that point empty
    if (i + whole + 1 < points) target[i + whole + 1] += b * x;
    else target[i + whole] += b * x;
  }
  return [start + whole, Math.min(points - 1, end + whole + 1)];
}

/**
 * The mean transient through the kernel of a jump switching at sample j (see the file comment):
 * ρ̄·(ΔL_re·E_I(j) − ΔL_im·E_Q(j)), minus the ring-up's part for a record that starts from zero;
 * `bound` is the largest |E|·|ΔL| over the samples followed, for the value grid's bounds.
 */
function responseTransients(input: ChainValueInput, r: ResponseTables, first: number): {
  value(from: number, to: number, j: number): number; bound: number;
} {
  const { lo, hi, sampleRate } = input;
  const a = Math.exp(-1 / (sampleRate * r.timeConstant));
  const termI = sampleTerms(input, r.inPhase), termQ = sampleTerms(input, r.quadrature);
  const rho = -r.timeConstant * sampleRate * Math.expm1(-1 / (r.timeConstant * sampleRate));
  const length = hi - first + 1;
  // E(j) for j = first … hi: the kernel times gain·c (gain·s) from max(j, lo) on, decayed from j
  const eI = new Float64Array(length), eQ = new Float64Array(length);
  // F(j): the same without the decay from j, times e^(−t_m/τ) (the ring-up's share), for fromZero
  const fI = new Float64Array(length), fQ = new Float64Array(length);
  for (let j = hi - 1; j >= first; j--) {
    const k = j - first;
    const inWindow = j >= lo;
    eI[k] = (inWindow ? termI[j]! : 0) + a * eI[k + 1]!;
    eQ[k] = (inWindow ? termQ[j]! : 0) + a * eQ[k + 1]!;
    const ring = Math.exp(-j / (sampleRate * r.timeConstant));
    fI[k] = (inWindow ? termI[j]! * ring : 0) + fI[k + 1]!;
    fQ[k] = (inWindow ? termQ[j]! * ring : 0) + fQ[k + 1]!;
  }
  let largestE = 0, largestL = 0;
  for (let k = 0; k < length; k++) largestE = Math.max(largestE, Math.hypot(eI[k]!, eQ[k]!));
  for (let s = 0; s < r.levelRe.length; s++) largestL = Math.max(largestL, Math.hypot(r.levelRe[s]!, r.levelIm[s]!));
  return {
    bound: 2 * largestL * largestE * (r.fromZero ? 2 : 1),
    value(from, to, j) {
      const dRe = r.levelRe[from]! - r.levelRe[to]!, dIm = r.levelIm[from]! - r.levelIm[to]!;
      const k = j - first;
      let v = rho * (dRe * eI[k]! - dIm * eQ[k]!);
      if (r.fromZero) v -= dRe * fI[k]! - dIm * fQ[k]!;
      return v;
    },
  };
}

/** The kernel's terms with a channel-major table x at each sample of [lo, hi), folded over the record's channels. */
function sampleTerms(input: ChainValueInput, x: Float64Array): Float64Array {
  const channels = input.channels ?? 1;
  return foldedProducts(input.kernel, x, input.lo, input.hi, input.kernel.length / channels, allChannels(channels));
}
