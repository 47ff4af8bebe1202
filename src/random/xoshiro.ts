/**
 * xoshiro128** 1.0: a 128-bit-state, 32-bit-output generator built from shifts, rotations and
 * XORs (Blackman & Vigna, "Scrambled linear pseudorandom number generators", ACM TOMS 47, 36
 * (2021)). Chosen for the hot loop because every step is plain 32-bit integer arithmetic, which
 * V8 compiles to machine integer instructions. Its linear engine is what `jump.ts` exploits.
 */

/** The generator state: four 32-bit words, not all zero. Mutated in place. */
export type XoshiroState = Uint32Array;

/**
 * One xoshiro128** step on the state words, in place; returns the 32-bit output as a signed
 * int32. The one definition of the step in TypeScript: everything calls it, except the two
 * hottest loops (physics/history.ts sampleHistories and stream.ts addNormalsFast), which run it
 * inline on local variables — calling it there measured 6–9 % slower, the state then living
 * in the array — and carry a comment naming it; test/random/step-copies.test.ts checks those
 * copies against it over 10^6 steps. (The WebAssembly kernels emit it from one template,
 * engine/wasm/source/xoshiro.ts.)
 */
export function nextInt32Of(st: Int32Array | XoshiroState): number {
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

/** Advances the state by one step and returns the next 32-bit output (as an unsigned number). */
export function nextUint32(s: XoshiroState): number {
  return nextInt32Of(s) >>> 0;
}

/** Advances the linear engine one step without scrambling (used to build jump matrices). */
export function stepLinear(s: XoshiroState): void {
  const s0 = s[0]!, s1 = s[1]!, s2 = s[2]!, s3 = s[3]!;
  const t = s1 << 9;
  const n2 = s2 ^ s0;
  const n3 = s3 ^ s1;
  s[1] = s1 ^ n2;
  s[0] = s0 ^ n3;
  s[2] = n2 ^ t;
  s[3] = (n3 << 11) | (n3 >>> 21);
}
