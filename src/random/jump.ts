/**
 * Jumps of the xoshiro128 linear engine by large powers of two, computed here rather than
 * copied: the engine is linear over GF(2), so one step is a 128×128 bit matrix M, and a jump of
 * 2^k steps is M^(2^k), obtained by k squarings. Applying such a matrix costs 128 word-vector
 * products, so reaching stream g (g·2^64 steps from the base) costs one matrix product per set
 * bit of g. Streams therefore occupy disjoint stretches of the single period 2^128 − 1 by
 * construction (see streams.ts).
 */
import { stepLinear, type XoshiroState } from './xoshiro.ts';

/** A 128×128 matrix over GF(2): column j (the image of basis bit j) as four words. */
type BitMatrix = Uint32Array; // length 128 * 4

function stepMatrix(): BitMatrix {
  const m = new Uint32Array(512);
  const v = new Uint32Array(4);
  for (let j = 0; j < 128; j++) {
    v.fill(0);
    v[j >>> 5] = 1 << (j & 31);
    stepLinear(v);
    m.set(v, j * 4);
  }
  return m;
}

/** out = m · v (v a 128-bit column vector); out may not alias v. */
function applyMatrix(m: BitMatrix, v: Uint32Array, out: Uint32Array): void {
  let o0 = 0, o1 = 0, o2 = 0, o3 = 0;
  for (let j = 0; j < 128; j++) {
    if ((v[j >>> 5]! >>> (j & 31)) & 1) {
      const b = j * 4;
      o0 ^= m[b]!; o1 ^= m[b + 1]!; o2 ^= m[b + 2]!; o3 ^= m[b + 3]!;
    }
  }
  out[0] = o0; out[1] = o1; out[2] = o2; out[3] = o3;
}

/** Matrix product a·b (apply b first, then a). */
function multiply(a: BitMatrix, b: BitMatrix): BitMatrix {
  const out = new Uint32Array(512);
  const col = new Uint32Array(4);
  for (let j = 0; j < 128; j++) {
    applyMatrix(a, b.subarray(j * 4, j * 4 + 4), col);
    out.set(col, j * 4);
  }
  return out;
}

/** How many stream-index bits the table covers: 2^40 streams of 2^64 steps each. */
export const STREAM_INDEX_BITS = 40;
/** Each stream's stretch of the sequence: 2^64 steps. */
export const STREAM_LENGTH_LOG2 = 64;

let table: BitMatrix[] | null = null;
/** M^(2^63): half a stream's stretch (the offset of a block's second lane). */
let halfStream: BitMatrix | null = null;

/** M^(2^(64+i)) for i = 0 … STREAM_INDEX_BITS−1, built once (about 10 ms). */
function jumpTable(): BitMatrix[] {
  if (table) return table;
  let m = stepMatrix();
  for (let k = 0; k < STREAM_LENGTH_LOG2 - 1; k++) m = multiply(m, m);
  halfStream = m;
  m = multiply(m, m);
  const t: BitMatrix[] = [m];
  for (let i = 1; i < STREAM_INDEX_BITS; i++) {
    m = multiply(m, m);
    t.push(m);
  }
  table = t;
  return t;
}

/*
 * A jump matrix sliced by bytes: entry (b·256 + v)·4 holds the image of the state bits v placed
 * in byte b (16 bytes), so one jump costs 16 lookups of four words instead of 128 bit tests.
 */

function byteTable(m: BitMatrix): Uint32Array {
  const t = new Uint32Array(16 * 256 * 4);
  for (let b = 0; b < 16; b++) {
    for (let v = 1; v < 256; v++) {
      // v = (v without its lowest bit) + lowest bit: one XOR with that bit's column
      const low = 31 - Math.clz32(v & -v);
      const rest = v & (v - 1);
      const col = (b * 8 + low) * 4, from = (b * 256 + rest) * 4, to = (b * 256 + v) * 4;
      for (let w = 0; w < 4; w++) t[to + w] = t[from + w]! ^ m[col + w]!;
    }
  }
  return t;
}

/** The same for M^(2^63). */
let halfStreamTable: Uint32Array | null = null;

/** Advances `s` by 2^64 steps (one stream) in place, by the byte-sliced table; returns it. */
export function jumpOneStream(s: XoshiroState): XoshiroState {
  return applyByteTable((streamTables[0] ??= byteTable(jumpTable()[0]!)), s);
}

/** Advances `s` by 2^63 steps (half a stream) in place; returns it. */
export function jumpHalfStream(s: XoshiroState): XoshiroState {
  if (!halfStreamTable) {
    jumpTable();
    halfStreamTable = byteTable(halfStream!);
  }
  return applyByteTable(halfStreamTable, s);
}

/** s ← (the matrix of byte table t)·s, in place. */
function applyByteTable(t: Uint32Array, s: XoshiroState): XoshiroState {
  let o0 = 0, o1 = 0, o2 = 0, o3 = 0;
  for (let w = 0; w < 4; w++) {
    const word = s[w]!;
    for (let k = 0; k < 4; k++) {
      const e = (((w * 4 + k) << 8) | ((word >>> (8 * k)) & 255)) << 2;
      o0 ^= t[e]!; o1 ^= t[e + 1]!; o2 ^= t[e + 2]!; o3 ^= t[e + 3]!;
    }
  }
  s[0] = o0; s[1] = o1; s[2] = o2; s[3] = o3;
  return s;
}

/** Byte tables of the jump matrices M^(2^(64+i)), built on first use of bit i. */
const streamTables: (Uint32Array | undefined)[] = [];

/**
 * Advances `s` by index·2^64 steps in place (index < 2^40) and returns it: one byte-table
 * product per set bit of the index (a batch's first block is reached in a few µs).
 */
export function jumpStreams(s: XoshiroState, index: number): XoshiroState {
  if (!Number.isInteger(index) || index < 0 || index >= 2 ** STREAM_INDEX_BITS) {
    throw new RangeError(`stream index ${index} outside [0, 2^${STREAM_INDEX_BITS})`);
  }
  let rest = index;
  for (let i = 0; rest > 0; i++, rest = Math.floor(rest / 2)) {
    if (rest % 2 === 1) applyByteTable((streamTables[i] ??= byteTable(jumpTable()[i]!)), s);
  }
  return s;
}

/** Advances `s` by 2^k steps using matrix squaring (for tests of the jump machinery). */
export function jumpPowerOfTwo(s: XoshiroState, k: number): XoshiroState {
  let m = stepMatrix();
  for (let i = 0; i < k; i++) m = multiply(m, m);
  const tmp = new Uint32Array(4);
  applyMatrix(m, s, tmp);
  s.set(tmp);
  return s;
}
