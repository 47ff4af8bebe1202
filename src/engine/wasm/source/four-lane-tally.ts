/**
 * The four-lane exact kernel's last two passes over a chunk, as WebAssembly text (see
 * four-lane.ts): the values, decisions and counts, then the clean values' shifted sums; and the
 * results written to their slots at the end.
 */
import { HISTORY_RECORD as H, NORMAL_RECORD, VALUE_RECORD as V, type Layout } from '../layout.ts';

const ZERO_F = '(v128.const i64x2 0 0)';
const ZERO_I = '(v128.const i32x4 0 0 0 0)';
/** The f64 lanes 0–1 (low) and 2–3 (high) of an i32x4 mask, as i64x2 masks. */
const TO_LOW = 'i64x2.extend_low_i32x4_s', TO_HIGH = 'i64x2.extend_high_i32x4_s';
/** The i32x4 mask of two f64x2 comparisons (lanes 0–1, then 2–3). */
const NARROW = 'i8x16.shuffle 0 1 2 3 8 9 10 11 16 17 18 19 24 25 26 27';

const splat = (slot: number): string => `(v128.load64_splat (i32.const ${slot}))`;
/** Per lane, the f64 slot's entry of the lane's state (mask: the i64x2 mask of state 1). */
const f64ByState = (slot: number, mask: string): string => `(v128.bitselect ${splat(slot + 8)} ${splat(slot)} ${mask})`;
/** counts[s] −= mask (a count per lane: masks are −1). */
const countInto = (slot: number, mask: string): string =>
  `(v128.store (i32.const ${slot}) (i32x4.sub (v128.load (i32.const ${slot})) ${mask}))`;

/** The values pass: a shot's values, projection, decision, counts, wrong lanes' causes and band. */
export function valuesPass(L: Layout): string {
  const a = L.at;
  const value = (lo: string, hi: string, full: number, factor: number): string =>
    `(local.set ${lo} (f64x2.add ${f64ByState(full, '(local.get $x)')}
                                       (f64x2.mul ${splat(factor)} (local.get $z0lo))))
            (local.set ${hi} (f64x2.add ${f64ByState(full, '(local.get $d)')}
                                       (f64x2.mul ${splat(factor)} (local.get $z0hi))))`;
  return `(local.set $h (i32.const ${a.fourHistories}))
        (local.set $at (i32.const ${a.fourNormalsBuffer}))
        (local.set $v (i32.const ${a.fourValues}))
        (local.set $j (i32.const 0))
        (block $end_value
          (loop $value
            (br_if $end_value (i32.ge_s (local.get $j) (local.get $count)))
            (local.set $mInt (v128.load (local.get $h))) (local.set $mPrep (v128.load offset=${H.prepared} (local.get $h)))
            (local.set $mInit (v128.load offset=${H.initial} (local.get $h))) (local.set $jcv (v128.load offset=${H.jumpCause} (local.get $h)))
            (local.set $z0lo ${ZERO_F}) (local.set $z0hi ${ZERO_F})
            (local.set $z1lo ${ZERO_F}) (local.set $z1hi ${ZERO_F})
            (if (i32.gt_s (local.get $nCols) (i32.const 0))
              (then
                (local.set $z0lo (v128.load (local.get $at))) (local.set $z0hi (v128.load offset=16 (local.get $at)))
                (if (i32.gt_s (local.get $nCols) (i32.const 1))
                  (then (local.set $z1lo (v128.load offset=${NORMAL_RECORD.size} (local.get $at))) (local.set $z1hi (v128.load offset=${NORMAL_RECORD.size + 16} (local.get $at)))))))
            ;; the values: fullI[initial] + factorI0·z0, and Q likewise (+ factorQ1·z1)
            (local.set $x (${TO_LOW} (local.get $mInit)))
            (local.set $d (${TO_HIGH} (local.get $mInit)))
            ${value('$iLo', '$iHi', a.fullI, a.factorI0)}
            (local.set $qLo ${ZERO_F}) (local.set $qHi ${ZERO_F})
            (if (local.get $hasQ)
              (then
                ${value('$qLo', '$qHi', a.fullQ, a.factorQ0)}
                (if (local.get $qTwoTerms)
                  (then
                    (local.set $qLo (f64x2.add (local.get $qLo) (f64x2.mul ${splat(a.factorQ1)} (local.get $z1lo))))
                    (local.set $qHi (f64x2.add (local.get $qHi) (f64x2.mul ${splat(a.factorQ1)} (local.get $z1hi))))))))
            ;; a jumped lane's values: + (path − no-jump value), from the history pass
            (local.set $jump (v128.load offset=${H.jumped} (local.get $h)))
            (if (v128.any_true (local.get $jump))
              (then
                (local.set $x (${TO_LOW} (local.get $jump)))
                (local.set $d (${TO_HIGH} (local.get $jump)))
                (local.set $iLo (v128.bitselect (f64x2.add (local.get $iLo) (v128.load offset=${H.correctionI} (local.get $h))) (local.get $iLo) (local.get $x)))
                (local.set $iHi (v128.bitselect (f64x2.add (local.get $iHi) (v128.load offset=${H.correctionI + 16} (local.get $h))) (local.get $iHi) (local.get $d)))
                (if (local.get $hasQ)
                  (then
                    (local.set $qLo (v128.bitselect (f64x2.add (local.get $qLo) (v128.load offset=${H.correctionQ} (local.get $h))) (local.get $qLo) (local.get $x)))
                    (local.set $qHi (v128.bitselect (f64x2.add (local.get $qHi) (v128.load offset=${H.correctionQ + 16} (local.get $h))) (local.get $qHi) (local.get $d)))))))
            ;; the projection and the decision
            (local.set $vLo (f64x2.add (f64x2.mul (local.get $iLo) ${splat(a.cos)})
                                       (f64x2.mul (local.get $qLo) ${splat(a.sin)})))
            (local.set $vHi (f64x2.add (f64x2.mul (local.get $iHi) ${splat(a.cos)})
                                       (f64x2.mul (local.get $qHi) ${splat(a.sin)})))
            (local.set $x ${splat(a.threshold)})
            (if (local.get $flip)
              (then (local.set $out (${NARROW}
                      (f64x2.lt (local.get $vLo) (local.get $x)) (f64x2.lt (local.get $vHi) (local.get $x)))))
              (else (local.set $out (${NARROW}
                      (f64x2.gt (local.get $vLo) (local.get $x)) (f64x2.gt (local.get $vHi) (local.get $x))))))
            (local.set $sumState (i32x4.sub (local.get $sumState) (local.get $mInt)))
            (local.set $sumOutcome (i32x4.sub (local.get $sumOutcome) (local.get $out)))
            (local.set $sumBoth (i32x4.sub (local.get $sumBoth) (v128.and (local.get $mInt) (local.get $out))))
            ;; wrong shots (rare): their causes in scalar code
            (local.set $wrong (v128.xor (local.get $out)
              (v128.bitselect (v128.load (i32.const ${a.fourOutcomeMask + 16})) (v128.load (i32.const ${a.fourOutcomeMask})) (local.get $mInt))))
            (if (local.tee $bits (i32x4.bitmask (local.get $wrong)))
              (then
                (v128.store (i32.const ${a.fourJumpCauses}) (local.get $jcv)) (v128.store (i32.const ${a.fourInitial}) (local.get $mInit))
                (v128.store (i32.const ${a.fourIntended}) (local.get $mInt)) (v128.store (i32.const ${a.fourPrepared}) (local.get $mPrep))
                (loop $each
                  (call $quadCause (i32.ctz (local.get $bits)))
                  (br_if $each (local.tee $bits (i32.and (local.get $bits) (i32.sub (local.get $bits) (i32.const 1))))))))
            ;; the ambiguous band: discarded[intended], and discardedWrong[intended] of the wrong lanes
            (if (local.get $hasBand)
              (then
                (local.set $d ${splat(a.band)})
                (local.set $ambiguous (${NARROW}
                  (f64x2.lt (f64x2.abs (f64x2.sub (local.get $vLo) (local.get $x))) (local.get $d))
                  (f64x2.lt (f64x2.abs (f64x2.sub (local.get $vHi) (local.get $x))) (local.get $d))))
                ${countInto(a.fourDiscarded, '(v128.andnot (local.get $ambiguous) (local.get $mInt))')}
                ${countInto(a.fourDiscarded + 16, '(v128.and (local.get $ambiguous) (local.get $mInt))')}
                (local.set $ambiguous (v128.and (local.get $ambiguous) (local.get $wrong)))
                ${countInto(a.fourDiscardedWrong, '(v128.andnot (local.get $ambiguous) (local.get $mInt))')}
                ${countInto(a.fourDiscardedWrong + 16, '(v128.and (local.get $ambiguous) (local.get $mInt))')}))
            ;; the clean shots per state, kept with the values for the sums
            (local.set $clean (v128.and (v128.and (i32x4.eq (local.get $mPrep) (local.get $mInt)) (i32x4.eq (local.get $mInit) (local.get $mInt)))
                                        (i32x4.eq (local.get $jcv) ${ZERO_I})))
            (local.set $w1 (v128.and (local.get $clean) (local.get $mInt)))
            (local.set $w0 (v128.andnot (local.get $clean) (local.get $mInt)))
            (v128.store (local.get $v) (local.get $vLo)) (v128.store offset=16 (local.get $v) (local.get $vHi))
            (v128.store offset=${V.clean0} (local.get $v) (local.get $w0)) (v128.store offset=${V.clean1} (local.get $v) (local.get $w1))
            (local.set $h (i32.add (local.get $h) (i32.const ${H.size})))
            (local.set $at (i32.add (local.get $at) (i32.shl (local.get $nCols) (i32.const ${Math.log2(NORMAL_RECORD.size)}))))
            (local.set $v (i32.add (local.get $v) (i32.const ${V.size})))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $value)))`;
}

/** One state's sums on one half of the lanes: e = w·d with w as 0.0 or 1.0 (the mask's bits and those of 1.0). */
function addClean(half: 'lo' | 'hi', state: 0 | 1): string {
  const v = half === 'lo' ? '$vLo' : '$vHi', extend = half === 'lo' ? TO_LOW : TO_HIGH;
  return `(local.set $d (f64x2.sub (local.get ${v}) (local.get $sh${state}${half})))
            (local.set $e (f64x2.mul (v128.and (${extend} (local.get $w${state})) (local.get $one)) (local.get $d)))
            (local.set $s1${state}${half} (f64x2.add (local.get $s1${state}${half}) (local.get $e)))
            (local.set $s2${state}${half} (f64x2.add (local.get $s2${state}${half}) (f64x2.mul (local.get $e) (local.get $d))))`;
}

/** The sums pass: the shifted sums of the clean values per state, in shot order. */
export function sumsPass(L: Layout): string {
  const shiftOf = (state: 0 | 1): string => `(local.set $x (v128.and (i32x4.eq (local.get $n${state}) ${ZERO_I}) (local.get $w${state})))
                (local.set $sh${state}lo (v128.bitselect (local.get $vLo) (local.get $sh${state}lo) (${TO_LOW} (local.get $x))))
                (local.set $sh${state}hi (v128.bitselect (local.get $vHi) (local.get $sh${state}hi) (${TO_HIGH} (local.get $x))))`;
  return `(local.set $v (i32.const ${L.at.fourValues}))
        (local.set $j (i32.const 0))
        (block $end_sum
          (loop $sum
            (br_if $end_sum (i32.ge_s (local.get $j) (local.get $count)))
            (local.set $vLo (v128.load (local.get $v))) (local.set $vHi (v128.load offset=16 (local.get $v)))
            (local.set $w0 (v128.load offset=${V.clean0} (local.get $v))) (local.set $w1 (v128.load offset=${V.clean1} (local.get $v)))
            (if (local.get $shifting)
              (then
                ;; a lane's shift is its state's first clean value
                ${shiftOf(0)}
                ${shiftOf(1)}))
            ${addClean('lo', 0)}
            ${addClean('hi', 0)}
            ${addClean('lo', 1)}
            ${addClean('hi', 1)}
            (local.set $n0 (i32x4.sub (local.get $n0) (local.get $w0)))
            (local.set $n1 (i32x4.sub (local.get $n1) (local.get $w1)))
            (if (local.get $shifting)
              (then (local.set $shifting (i32.eqz (i32.and (i32x4.all_true (local.get $n0)) (i32x4.all_true (local.get $n1)))))))
            (local.set $v (i32.add (local.get $v) (i32.const ${V.size})))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $sum)))`;
}

/** The streams and results back to their slots. */
export function storeFourResults(L: Layout): string {
  const a = L.at;
  const put = (slot: number, j: number, local: string): string => `(v128.store (i32.const ${slot + 16 * j}) (local.get ${local}))`;
  return [
    ['$a0', '$a1', '$a2', '$a3'].map((w, j) => put(a.fourStreams, j, w)).join(' '),
    ['$b0', '$b1', '$b2', '$b3'].map((w, j) => put(a.fourLanes, j, w)).join(' '),
    put(a.fourSumState, 0, '$sumState'), put(a.fourSumOutcome, 0, '$sumOutcome'), put(a.fourSumBoth, 0, '$sumBoth'),
    put(a.fourCleanCount, 0, '$n0'), put(a.fourCleanCount, 1, '$n1'),
    ['$s10lo', '$s10hi', '$s11lo', '$s11hi'].map((x, j) => put(a.fourCleanSum1, j, x)).join(' '),
    ['$s20lo', '$s20hi', '$s21lo', '$s21hi'].map((x, j) => put(a.fourCleanSum2, j, x)).join(' '),
    ['$sh0lo', '$sh0hi', '$sh1lo', '$sh1hi'].map((x, j) => put(a.fourCleanShift, j, x)).join(' '),
  ].join('\n    ');
}
