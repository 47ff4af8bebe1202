/**
 * The exact engine's kernel on four seeding blocks at once, as WebAssembly text (exact/kernel.ts
 * tallyFourBlocks): lane k of every vector is block k, with its own history stream and normals
 * lane, so each block draws exactly the numbers, and sums exactly the terms in the order, of the
 * TypeScript path (exact/fused.ts) on it alone. The uniforms' comparisons are made on the 32-bit outputs against
 * integer cuts (exact/kernel.ts uniformCut: the same decisions); the rare lanes — a jump, a
 * ziggurat rejection, a wrong shot — leave the vectors for scalar code on memory (four-rare.ts).
 *
 * Each chunk of CHUNK shots runs in four passes over buffers: the histories and the normals
 * (here), then the values, decisions and counts, and the clean values' sums (four-lane-tally.ts).
 * Each pass holds few vectors, so that its rare lanes' scalar calls cost little around them.
 */
import { CHUNK, HISTORY_RECORD, NORMAL_RECORD, type Layout } from '../layout.ts';
import { LANES, xoshiroStep } from './xoshiro.ts';
import { sumsPass, storeFourResults, valuesPass } from './four-lane-tally.ts';

/** The four lanes' state words in vectors (word j of the lanes in vector j). */
export const HISTORY_WORDS = ['$a0', '$a1', '$a2', '$a3'] as const;
export const NORMAL_WORDS = ['$b0', '$b1', '$b2', '$b3'] as const;

/** A v128 slot's vector j: load, store. */
export const loadVector = (slot: number, j = 0): string => `(v128.load (i32.const ${slot + 16 * j}))`;
export const storeVector = (slot: number, value: string, j = 0): string => `(v128.store (i32.const ${slot + 16 * j}) ${value})`;
/** The four words of a state in locals from the slot, or back. */
export const loadFourWords = (words: readonly string[], slot: number): string =>
  words.map((w, j) => `(local.set ${w} ${loadVector(slot, j)})`).join(' ');
export const storeFourWords = (words: readonly string[], slot: number): string =>
  words.map((w, j) => storeVector(slot, `(local.get ${w})`, j)).join(' ');
/** A per-state pair of vector slots chosen per lane by a mask (all ones: state 1). */
export const byState = (slot: number, mask: string): string => `(v128.bitselect ${loadVector(slot, 1)} ${loadVector(slot)} ${mask})`;

/** One xoshiro128** step of four lanes in place, its output into `output`. */
const stepLanes = (words: readonly [string, string, string, string], output: string): string =>
  xoshiroStep({ isa: LANES, words, temps: ['$n2', '$n3'], output, scratch: '$m' });

/** The lanes' decision on output $r against a per-state cut: (r ≥ cut, unsigned) XOR flip. */
const decide = (cut: number, flip: number, mask: string): string => `(v128.xor
                  (i32x4.ge_u (local.get $r) ${byState(cut, mask)})
                  ${byState(flip, mask)})`;

/** The history pass: per shot its masks, jump cause and jumped lanes, and their corrections. */
function historyPass(L: Layout): string {
  const a = L.at;
  return `(local.set $h (i32.const ${a.fourHistories}))
        (local.set $j (i32.const 0))
        (block $end_history
          (loop $history
            (br_if $end_history (i32.ge_s (local.get $j) (local.get $count)))
            ;; the intended state: u > cut as the output against an integer cut
            ${stepLanes(HISTORY_WORDS, '$r')}
            (local.set $mInt (v128.xor (i32x4.ge_u (local.get $r) ${loadVector(a.fourFirstCut)}) ${loadVector(a.fourFirstFlip)}))
            (local.set $mPrep (local.get $mInt))
            (if (local.get $anyPrep)
              (then
                ${stepLanes(HISTORY_WORDS, '$r')}
                ;; a hit moves the intended state to prepInto[intended] (as masks)
                (local.set $hit ${decide(a.fourPrepCut, a.fourPrepFlip, '(local.get $mInt)')})
                (local.set $mPrep (v128.bitselect
                  ${byState(a.fourPrepIntoMask, '(local.get $mInt)')}
                  (local.get $mInt) (local.get $hit)))))
            (local.set $mInit (local.get $mPrep))
            (if (local.get $anyMap)
              (then
                ${stepLanes(HISTORY_WORDS, '$r')}
                (local.set $hit ${decide(a.fourMapCut, a.fourMapFlip, '(local.get $mPrep)')})
                (local.set $mInit (v128.bitselect
                  ${byState(a.fourMapIntoMask, '(local.get $mPrep)')}
                  (local.get $mPrep) (local.get $hit)))))
            ;; the jump's uniform: u ≥ noJumpCut[initial]; its time and the rest in $quadJump
            ${stepLanes(HISTORY_WORDS, '$r')}
            (local.set $jump ${decide(a.fourJumpCut, a.fourJumpFlip, '(local.get $mInit)')})
            (v128.store (local.get $h) (local.get $mInt)) (v128.store offset=${HISTORY_RECORD.prepared} (local.get $h) (local.get $mPrep))
            (v128.store offset=${HISTORY_RECORD.initial} (local.get $h) (local.get $mInit))
            (v128.store offset=${HISTORY_RECORD.jumpCause} (local.get $h) (v128.const i32x4 0 0 0 0)) (v128.store offset=${HISTORY_RECORD.jumped} (local.get $h) (v128.const i32x4 0 0 0 0))
            ;; the lanes that drew a jump: its time, cause and path, in scalar code on memory
            (if (local.tee $bits (i32x4.bitmask (local.get $jump)))
              (then
                ${storeFourWords(HISTORY_WORDS, a.fourStreams)}
                ${storeVector(a.fourJumpDraws, '(local.get $r)')} ${storeVector(a.fourInitial, '(local.get $mInit)')}
                (loop $each
                  (call $quadJump (i32.ctz (local.get $bits)) (local.get $h))
                  (br_if $each (local.tee $bits (i32.and (local.get $bits) (i32.sub (local.get $bits) (i32.const 1))))))
                ${loadFourWords(HISTORY_WORDS, a.fourStreams)}))
            (local.set $h (i32.add (local.get $h) (i32.const ${HISTORY_RECORD.size})))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $history)))`;
}

/** Lane `lane`'s layer: its bound into $ok and its factor into `into` (lane 0 or 1 of it). */
function layerLookup(L: Layout, lane: number, into: string): string {
  const a = L.at;
  const half = lane % 2;
  const ok = lane === 0 ? `v128.load32_zero offset=${a.layerBounds} (local.get $l)` : `v128.load32_lane offset=${a.layerBounds} ${lane} (local.get $l) (local.get $ok)`;
  const factor = half === 0
    ? `v128.load64_zero offset=${a.layerFactors} (i32.shl (local.get $l) (i32.const 1))`
    : `v128.load64_lane offset=${a.layerFactors} 1 (i32.shl (local.get $l) (i32.const 1)) (local.get ${into})`;
  return `(local.set $l (i32.shl (i32x4.extract_lane ${lane} (local.get $layer)) (i32.const 2)))
            (local.set $ok (${ok}))
            (local.set ${into} (${factor}))`;
}

/** The normals pass: nCols a shot, the ziggurat's fast draws in lanes, rejections in scalar code. */
function normalsPass(L: Layout): string {
  const a = L.at;
  return `(local.set $h (i32.const ${a.fourNormalsBuffer}))
        (local.set $j (i32.const 0))
        (block $end_normal
          (loop $normal
            (br_if $end_normal (i32.ge_s (local.get $j) (i32.mul (local.get $count) (local.get $nCols))))
            ${stepLanes(NORMAL_WORDS, '$w')}
            (local.set $layer (v128.and (local.get $w) (local.get $c127)))
            (local.set $pos (i32x4.shr_s (local.get $w) (i32.const 7)))
            ${layerLookup(L, 0, '$z0lo')}
            ${layerLookup(L, 1, '$z0lo')}
            ${layerLookup(L, 2, '$z0hi')}
            ${layerLookup(L, 3, '$z0hi')}
            (local.set $z0lo (f64x2.mul (f64x2.convert_low_i32x4_s (local.get $pos)) (local.get $z0lo)))
            (local.set $z0hi (f64x2.mul (f64x2.convert_low_i32x4_s
              (i8x16.shuffle 8 9 10 11 12 13 14 15 8 9 10 11 12 13 14 15 (local.get $pos) (local.get $pos))) (local.get $z0hi)))
            (local.set $bits (i32.xor (i32x4.bitmask (i32x4.lt_s (i32x4.abs (local.get $pos)) (local.get $ok))) (i32.const 15)))
            (if (local.get $bits)
              (then
                ${storeFourWords(NORMAL_WORDS, a.fourLanes)}
                ${storeVector(a.fourNormals, '(local.get $z0lo)')} ${storeVector(a.fourNormals, '(local.get $z0hi)', 1)}
                ${storeVector(a.fourPositions, '(local.get $pos)')} ${storeVector(a.fourLayers, '(local.get $layer)')}
                (loop $each
                  (call $quadSlowNormal (i32.ctz (local.get $bits)))
                  (br_if $each (local.tee $bits (i32.and (local.get $bits) (i32.sub (local.get $bits) (i32.const 1))))))
                ${loadFourWords(NORMAL_WORDS, a.fourLanes)}
                (local.set $z0lo ${loadVector(a.fourNormals)}) (local.set $z0hi ${loadVector(a.fourNormals, 1)})))
            (v128.store (local.get $h) (local.get $z0lo)) (v128.store offset=16 (local.get $h) (local.get $z0hi))
            (local.set $h (i32.add (local.get $h) (i32.const ${NORMAL_RECORD.size})))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $normal)))`;
}

export function tallyFourFunction(L: Layout): string {
  const a = L.at;
  const i32Param = (local: string, slot: number): string => `(local.set ${local} (i32.load (i32.const ${slot})))`;
  return `
  (func (export "tallyFour") (param $len i32)
    (local $a0 v128) (local $a1 v128) (local $a2 v128) (local $a3 v128)
    (local $b0 v128) (local $b1 v128) (local $b2 v128) (local $b3 v128)
    (local $m v128) (local $r v128) (local $n2 v128) (local $n3 v128)
    (local $mInt v128) (local $mPrep v128) (local $mInit v128) (local $hit v128) (local $jump v128)
    (local $pos v128) (local $layer v128) (local $ok v128) (local $w v128)
    (local $z0lo v128) (local $z0hi v128) (local $z1lo v128) (local $z1hi v128)
    (local $iLo v128) (local $iHi v128) (local $qLo v128) (local $qHi v128)
    (local $vLo v128) (local $vHi v128) (local $out v128) (local $wrong v128) (local $ambiguous v128)
    (local $clean v128) (local $w0 v128) (local $w1 v128) (local $jcv v128) (local $x v128) (local $d v128) (local $e v128)
    (local $sumState v128) (local $sumOutcome v128) (local $sumBoth v128) (local $n0 v128) (local $n1 v128)
    (local $sh0lo v128) (local $sh0hi v128) (local $sh1lo v128) (local $sh1hi v128)
    (local $s10lo v128) (local $s10hi v128) (local $s11lo v128) (local $s11hi v128)
    (local $s20lo v128) (local $s20hi v128) (local $s21lo v128) (local $s21hi v128)
    (local $five v128) (local $nine v128) (local $c127 v128) (local $one v128)
    (local $i i32) (local $j i32) (local $count i32) (local $h i32) (local $at i32) (local $v i32) (local $bits i32) (local $l i32) (local $shifting i32)
    (local $anyPrep i32) (local $anyMap i32) (local $hasQ i32) (local $qTwoTerms i32) (local $nCols i32) (local $flip i32) (local $hasBand i32)
    ${i32Param('$anyPrep', a.anyPrep)} ${i32Param('$anyMap', a.anyMap)} ${i32Param('$hasQ', a.hasQ)}
    ${i32Param('$qTwoTerms', a.qTwoTerms)} ${i32Param('$nCols', a.columns)} ${i32Param('$flip', a.flip)}
    (local.set $hasBand (f64.ge (f64.load (i32.const ${a.band})) (f64.const 0)))
    ${loadFourWords(HISTORY_WORDS, a.fourStreams)}
    ${loadFourWords(NORMAL_WORDS, a.fourLanes)}
    (local.set $shifting (i32.const 1))
    (local.set $five (v128.const i32x4 5 5 5 5)) (local.set $nine (v128.const i32x4 9 9 9 9))
    (local.set $c127 (v128.const i32x4 127 127 127 127)) (local.set $one (v128.const f64x2 1 1))
    (block $done
      (loop $chunk
        (br_if $done (i32.ge_s (local.get $i) (local.get $len)))
        (local.set $count (select (i32.sub (local.get $len) (local.get $i)) (i32.const ${CHUNK})
                                  (i32.lt_s (i32.sub (local.get $len) (local.get $i)) (i32.const ${CHUNK}))))
        ${historyPass(L)}
        ${normalsPass(L)}
        ${valuesPass(L)}
        ${sumsPass(L)}
        (local.set $i (i32.add (local.get $i) (local.get $count)))
        (br $chunk)))
    ${storeFourResults(L)})
`;
}
