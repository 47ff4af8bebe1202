/**
 * A seeded random stream: xoshiro128** for the bits, the ziggurat for normals. Every random
 * number in the simulator comes from one of these, made by `streams.ts` for one batch.
 */
import { nextInt32Of } from './xoshiro.ts';
import { ZIGGURAT, ZIGGURAT_R } from './ziggurat.ts';

const INV_TWO_POW_32 = 1 / 4294967296;
const LAYER_K = ZIGGURAT.k;
const LAYER_W = ZIGGURAT.w;
const LAYER_F = ZIGGURAT.f;
/** A zero record for `fillNormals` (grown on demand, never written). */
let ZEROS = new Float64Array(0);

/** A seeded stream of uniform integers, uniform doubles and standard normals. */
export class RandomStream {
  /** xoshiro128** state, four words (held in an Int32Array so the hot loops read it fast). */
  readonly s: Int32Array;

  /** `state`: four 32-bit words, not all zero (see streams.ts for how they are derived). */
  constructor(state: Uint32Array) {
    this.s = new Int32Array(4);
    for (let i = 0; i < 4; i++) this.s[i] = state[i]! | 0;
    if ((this.s[0]! | this.s[1]! | this.s[2]! | this.s[3]!) === 0) throw new RangeError('all-zero generator state');
  }

  /** The current state (for checkpoints and tests). */
  state(): Uint32Array {
    return new Uint32Array(this.s.buffer.slice(0));
  }

  /** Next 32-bit output as a signed int32 (xoshiro128**). */
  nextInt32(): number {
    return nextInt32Of(this.s);
  }

  /** Next 32-bit output as an unsigned number in [0, 2^32). */
  nextUint32(): number {
    return nextInt32Of(this.s) >>> 0;
  }

  /** Uniform double in the open interval (0, 1), 32-bit resolution. */
  nextDouble(): number {
    return ((nextInt32Of(this.s) >>> 0) + 0.5) * INV_TWO_POW_32;
  }

  /** Exponential variate with the given rate (1/mean). */
  nextExponential(rate: number): number {
    return -Math.log(this.nextDouble()) / rate;
  }

  /** Standard normal variate (ziggurat). */
  nextNormal(): number {
    const u = nextInt32Of(this.s);
    const layer = u & 127;
    const pos = u >> 7;
    if (Math.abs(pos) < LAYER_K[layer]!) return pos * LAYER_W[layer]!;
    return normalSlowPath(this.s, pos, layer);
  }

  /**
   * Adds sigma·N(0,1) to out[start … start+count): the inner loop of trace synthesis. The
   * normals are those of `count` calls of nextNormal(), in order, from the same draws.
   */
  addNormals(out: Float64Array, start: number, count: number, sigma: number): void {
    addNormalsFast(this.s, out, out, start, count, sigma);
  }

  /**
   * out[i] = base[i] + sigma·N(0,1) on [start, start+count): the same numbers, from the same
   * draws, as copying base into out and calling addNormals, in one pass (base may be out).
   */
  addNormalsOnto(out: Float64Array, base: Float64Array, start: number, count: number, sigma: number): void {
    addNormalsFast(this.s, out, base, start, count, sigma);
  }

  /**
   * Fills out[start … start+count) with standard normals: the numbers of `count` calls of
   * nextNormal(), from the same draws, in one pass.
   */
  fillNormals(out: Float64Array, start: number, count: number): void {
    if (ZEROS.length < start + count) ZEROS = new Float64Array(start + count);
    // 0 + 1·x is x exactly, so this writes the normals themselves
    addNormalsFast(this.s, out, ZEROS, start, count, 1);
  }
}

/**
 * The ziggurat's rejection branch for a draw that missed its layer's fast region: the base
 * strip's tail or a wedge (Marsaglia & Tsang 2000), drawing further from the state words. Hot
 * loops that keep the state in locals call it with the state written back (rare: ~3 % of draws).
 */
export function normalSlowPath(st: Int32Array, pos: number, layer: number): number {
  for (;;) {
    if (layer === 0) {
      let x: number, y: number;
      do {
        x = -Math.log(((nextInt32Of(st) >>> 0) + 0.5) * INV_TWO_POW_32) / ZIGGURAT_R;
        y = -Math.log(((nextInt32Of(st) >>> 0) + 0.5) * INV_TWO_POW_32);
      } while (y + y < x * x);
      return pos > 0 ? ZIGGURAT_R + x : -ZIGGURAT_R - x;
    }
    const x = pos * LAYER_W[layer]!;
    const fl = LAYER_F[layer]!;
    if (fl + ((nextInt32Of(st) >>> 0) + 0.5) * INV_TWO_POW_32 * (LAYER_F[layer - 1]! - fl) < Math.exp(-0.5 * x * x)) return x;
    const u = nextInt32Of(st);
    layer = u & 127;
    pos = u >> 7;
    if (Math.abs(pos) < LAYER_K[layer]!) return pos * LAYER_W[layer]!;
  }
}

/**
 * The loop of `addNormalsOnto` as a free function over the state words (V8 optimises it better
 * than a method): out[i] = base[i] + σ·n_i with n_i the i-th nextNormal(). The state lives in
 * locals; the rare rejection writes it back, resolves the draw and reloads it.
 */
function addNormalsFast(st: Int32Array, out: Float64Array, base: Float64Array, start: number, count: number, sigma: number): void {
  let s0 = st[0]!, s1 = st[1]!, s2 = st[2]!, s3 = st[3]!;
  const end = start + count;
  for (let i = start; i < end; i++) {
    // xoshiro128** (xoshiro.ts nextInt32Of), inline on the locals: calling it measured slower
    const m = Math.imul(s1, 5);
    const u = Math.imul((m << 7) | (m >>> 25), 9);
    const t = s1 << 9;
    const n2 = s2 ^ s0;
    const n3 = s3 ^ s1;
    s1 = s1 ^ n2;
    s0 = s0 ^ n3;
    s2 = n2 ^ t;
    s3 = (n3 << 11) | (n3 >>> 21);
    const layer = u & 127;
    const pos = u >> 7;
    if (Math.abs(pos) < LAYER_K[layer]!) out[i] = base[i]! + sigma * (pos * LAYER_W[layer]!);
    else {
      st[0] = s0; st[1] = s1; st[2] = s2; st[3] = s3;
      out[i] = base[i]! + sigma * normalSlowPath(st, pos, layer);
      s0 = st[0]!; s1 = st[1]!; s2 = st[2]!; s3 = st[3]!;
    }
  }
  st[0] = s0; st[1] = s1; st[2] = s2; st[3] = s3;
}
