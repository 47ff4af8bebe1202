/**
 * xoshiro128** 1.0: a 128-bit-state, 32-bit-output generator built from shifts, rotations and
 * XORs (Blackman & Vigna, "Scrambled linear pseudorandom number generators", ACM TOMS 47, 36
 * (2021)). Chosen for the hot loop because every step is plain 32-bit integer arithmetic, which
 * V8 compiles to machine integer instructions. Its linear engine is what `jump.ts` exploits.
 */

/** The generator state: four 32-bit words, not all zero. Mutated in place. */
export type XoshiroState = Uint32Array;

/** Advances the state by one step and returns the next 32-bit output (as an unsigned number). */
export function nextUint32(s: XoshiroState): number {
  const s0 = s[0]!, s1 = s[1]!, s2 = s[2]!, s3 = s[3]!;
  const m = Math.imul(s1, 5);
  const result = Math.imul((m << 7) | (m >>> 25), 9) >>> 0;
  const t = s1 << 9;
  const n2 = s2 ^ s0;
  const n3 = s3 ^ s1;
  s[1] = s1 ^ n2;
  s[0] = s0 ^ n3;
  s[2] = n2 ^ t;
  s[3] = (n3 << 11) | (n3 >>> 21);
  return result;
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
