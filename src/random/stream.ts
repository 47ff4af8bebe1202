/**
 * A seeded random stream: xoshiro128** for the bits, the ziggurat for normals. Every random
 * number in the simulator comes from one of these, made by `streams.ts` for one batch.
 */
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
  /** Scratch for the ziggurat's rare rejections in `addNormals`. */
  private rejectIndex: Int32Array;
  private rejectDraw: Int32Array;

  /** `state`: four 32-bit words, not all zero (see streams.ts for how they are derived). */
  constructor(state: Uint32Array) {
    this.s = new Int32Array(4);
    for (let i = 0; i < 4; i++) this.s[i] = state[i]! | 0;
    if ((this.s[0]! | this.s[1]! | this.s[2]! | this.s[3]!) === 0) throw new RangeError('all-zero generator state');
    this.rejectIndex = new Int32Array(256);
    this.rejectDraw = new Int32Array(256);
  }

  /** The current state (for checkpoints and tests). */
  state(): Uint32Array {
    return new Uint32Array(this.s.buffer.slice(0));
  }

  /** Next 32-bit output as a signed int32 (xoshiro128**). */
  nextInt32(): number {
    const st = this.s;
    const s0 = st[0]!, s1 = st[1]!, s2 = st[2]!, s3 = st[3]!;
    const m = Math.imul(s1, 5);
    const result = Math.imul((m << 7) | (m >>> 25), 9);
    const n2 = s2 ^ s0;
    const n3 = s3 ^ s1;
    st[1] = s1 ^ n2;
    st[0] = s0 ^ n3;
    st[2] = n2 ^ (s1 << 9);
    st[3] = (n3 << 11) | (n3 >>> 21);
    return result;
  }

  /** Next 32-bit output as an unsigned number in [0, 2^32). */
  nextUint32(): number {
    return this.nextInt32() >>> 0;
  }

  /** Uniform double in the open interval (0, 1), 32-bit resolution. */
  nextDouble(): number {
    return ((this.nextInt32() >>> 0) + 0.5) * INV_TWO_POW_32;
  }

  /** Exponential variate with the given rate (1/mean). */
  nextExponential(rate: number): number {
    return -Math.log(this.nextDouble()) / rate;
  }

  /** Standard normal variate (ziggurat). */
  nextNormal(): number {
    const u = this.nextInt32();
    const layer = u & 127;
    const pos = u >> 7;
    if (Math.abs(pos) < LAYER_K[layer]!) return pos * LAYER_W[layer]!;
    return this.normalSlowPath(pos, layer);
  }

  /**
   * Adds sigma·N(0,1) to out[start … start+count): the inner loop of trace synthesis. The rare
   * rejections of the ziggurat (about 3 %) are only noted in the loop and resolved after it,
   * which keeps the loop free of calls. Deterministic: the slow path draws after the loop.
   */
  addNormals(out: Float64Array, start: number, count: number, sigma: number): void {
    this.addNormalsOnto(out, out, start, count, sigma);
  }

  /**
   * out[i] = base[i] + sigma·N(0,1) on [start, start+count): the same numbers, from the same
   * draws, as copying base into out and calling addNormals, in one pass (base may be out).
   */
  addNormalsOnto(out: Float64Array, base: Float64Array, start: number, count: number, sigma: number): void {
    if (this.rejectIndex.length < count) {
      this.rejectIndex = new Int32Array(count);
      this.rejectDraw = new Int32Array(count);
    }
    const nRejects = addNormalsFast(this.s, out, base, start, count, sigma, this.rejectIndex, this.rejectDraw);
    const rejectIndex = this.rejectIndex, rejectDraw = this.rejectDraw;
    for (let r = 0; r < nRejects; r++) {
      const u = rejectDraw[r]!;
      out[rejectIndex[r]!] += sigma * this.normalSlowPath(u >> 7, u & 127);
    }
  }

  /**
   * Fills out[start … start+count) with standard normals: the same numbers, from the same
   * draws, as zeroing the range and calling addNormals(out, start, count, 1), in one pass.
   */
  fillNormals(out: Float64Array, start: number, count: number): void {
    if (ZEROS.length < start + count) ZEROS = new Float64Array(start + count);
    // 0 + 1·x is x exactly, so this writes the normals themselves
    this.addNormalsOnto(out, ZEROS, start, count, 1);
  }

  /** Ziggurat rejection branch: the base strip's tail or a wedge (Marsaglia & Tsang 2000). */
  private normalSlowPath(pos: number, layer: number): number {
    for (;;) {
      if (layer === 0) {
        let x: number, y: number;
        do {
          x = -Math.log(this.nextDouble()) / ZIGGURAT_R;
          y = -Math.log(this.nextDouble());
        } while (y + y < x * x);
        return pos > 0 ? ZIGGURAT_R + x : -ZIGGURAT_R - x;
      }
      const x = pos * LAYER_W[layer]!;
      const fl = LAYER_F[layer]!;
      if (fl + this.nextDouble() * (LAYER_F[layer - 1]! - fl) < Math.exp(-0.5 * x * x)) return x;
      const u = this.nextInt32();
      layer = u & 127;
      pos = u >> 7;
      if (Math.abs(pos) < LAYER_K[layer]!) return pos * LAYER_W[layer]!;
    }
  }
}

/**
 * The fast pass of `addNormalsOnto` as a free function over the state words (V8 optimises it
 * better than a method): out[i] = base[i] + σ·n_i, rejected draws noted for the slow path
 * (out[i] = base[i] there for now). Returns the number of rejected draws.
 */
function addNormalsFast(
  st: Int32Array, out: Float64Array, base: Float64Array, start: number, count: number, sigma: number,
  rejectIndex: Int32Array, rejectDraw: Int32Array,
): number {
  let s0 = st[0]!, s1 = st[1]!, s2 = st[2]!, s3 = st[3]!;
  let nRejects = 0;
  const end = start + count;
  for (let i = start; i < end; i++) {
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
    if (Math.abs(pos) < LAYER_K[layer]!) out[i] = base[i]! + sigma * pos * LAYER_W[layer]!;
    else {
      out[i] = base[i]!;
      rejectIndex[nRejects] = i;
      rejectDraw[nRejects++] = u;
    }
  }
  st[0] = s0; st[1] = s1; st[2] = s2; st[3] = s3;
  return nRejects;
}

