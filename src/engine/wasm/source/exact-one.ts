/**
 * The exact engine's one-loop kernel on one seeding block as WebAssembly text (exact/fast.ts
 * fastTallyBlock, for points whose every jump ends the chain and whose signal has no analog
 * response), and the helpers the four-lane kernel shares with it: the path's value for one jump
 * ($oneJump) and the first jump's cause.
 */
import { CAUSES } from '../../../analysis/causes.ts';
import type { Layout } from '../layout.ts';
import { loadWords, storeWords } from './record.ts';
import { stepLocals, uniformOf } from './xoshiro.ts';
import { zigguratNormal } from './ziggurat.ts';

/** x·c for a constant c ≥ 1 (a shift when c is a power of two). */
export function timesConst(x: string, c: number): string {
  const k = Math.log2(c);
  return Number.isInteger(k) ? `(i32.shl ${x} (i32.const ${k}))` : `(i32.mul ${x} (i32.const ${c}))`;
}

export function sharedExactFunctions(): string {
  return `
  ;; the path's value for one jump switching at sample \`switchAt\` from the state with prefix
  ;; sums at \`from\` to the one with \`to\` (exact/batch.ts pathValue, in the same operations)
  (func $oneJump (param $from i32) (param $to i32) (param $lo i32) (param $hi i32) (param $switchAt f64) (result f64)
    (local $u i32) (local $k i32) (local $v f64)
    (local.set $u (i32.trunc_f64_s (f64.min (f64.convert_i32_s (local.get $hi))
                                            (f64.max (f64.convert_i32_s (local.get $lo)) (local.get $switchAt)))))
    (local.set $k (local.get $lo))
    (if (i32.gt_s (local.get $u) (local.get $k))
      (then
        (local.set $v (f64.add (local.get $v)
          (f64.sub (f64.load (i32.add (local.get $from) (i32.shl (i32.sub (local.get $u) (local.get $lo)) (i32.const 3))))
                   (f64.load (i32.add (local.get $from) (i32.shl (i32.sub (local.get $k) (local.get $lo)) (i32.const 3)))))))
        (local.set $k (local.get $u))))
    (f64.add (local.get $v)
      (f64.sub (f64.load (i32.add (local.get $to) (i32.shl (i32.sub (local.get $hi) (local.get $lo)) (i32.const 3))))
               (f64.load (i32.add (local.get $to) (i32.shl (i32.sub (local.get $k) (local.get $lo)) (i32.const 3)))))))
`;
}

/** s·8 or s·4: the byte index of element s of an f64 or i32 slot. */
const f64At = (s: string): string => `(i32.shl (local.get ${s}) (i32.const 3))`;
const i32At = (s: string): string => `(i32.shl (local.get ${s}) (i32.const 2))`;

/** The path's value for the shot's jump, of I or Q (prefix sums and window from the slots). */
export function pathValue(prefix: number, window: number, initial: string, next: string): string {
  return `(call $oneJump
                  (i32.load offset=${prefix} ${i32At(initial)})
                  (i32.load offset=${prefix} ${i32At(next)})
                  (i32.load (i32.const ${window})) (i32.load (i32.const ${window + 4})) (local.get $switchAt))`;
}

/** The first jump's cause as the pipeline sees it: by the window's last sample and the pipeline's. */
export function jumpCauseOf(L: Layout, initial: string, next: string): string {
  return `(if (f64.le (local.get $time) (f64.load (i32.const ${L.at.lastWindowSample})))
                  (then (local.set $jc (i32.load offset=${L.at.jumpCause}
                    (i32.shl (i32.add (i32.shl (local.get ${initial}) (i32.const 1)) (local.get ${next})) (i32.const 2))))))
                (if (i32.eqz (f64.le (local.get $time) (f64.load (i32.const ${L.at.lastSample}))))
                  (then (local.set $jc (i32.const 0))))`;
}

export function tallyBlockFunction(L: Layout): string {
  const a = L.at, A = ['$a0', '$a1', '$a2', '$a3'] as const, B = ['$b0', '$b1', '$b2', '$b3'] as const;
  const draw = `${stepLocals(A, '$r')}
            (local.set $u ${uniformOf('(local.get $r)')})`;
  const f64Param = (local: string, slot: number): string => `(local.set ${local} (f64.load (i32.const ${slot})))`;
  const i32Param = (local: string, slot: number): string => `(local.set ${local} (i32.load (i32.const ${slot})))`;
  return `
  (func (export "tallyBlock") (param $len i32)
    (local $a0 i32) (local $a1 i32) (local $a2 i32) (local $a3 i32)
    (local $b0 i32) (local $b1 i32) (local $b2 i32) (local $b3 i32)
    (local $r i32) (local $n2 i32) (local $n3 i32) (local $i i32)
    (local $u f64) (local $intended i32) (local $prepared i32) (local $initial i32) (local $next i32)
    (local $jc i32) (local $jumped i32) (local $time f64) (local $switchAt f64) (local $pathI f64) (local $pathQ f64)
    (local $layer i32) (local $pos i32) (local $z0 f64) (local $z1 f64)
    (local $valueI f64) (local $valueQ f64) (local $v f64) (local $outcome i32) (local $cause i32)
    (local $clean i32) (local $w0 i32) (local $w1 i32) (local $d0 f64) (local $d1 f64) (local $e0 f64) (local $e1 f64)
    (local $sumState i32) (local $sumOutcome i32) (local $sumBoth i32) (local $n0 i32) (local $n1 i32)
    (local $shift0 f64) (local $shift1 f64) (local $s10 f64) (local $s11 f64) (local $s20 f64) (local $s21 f64)
    (local $at i32)
    ;; parameters used every shot, in locals
    (local $firstCut f64) (local $cI0 f64) (local $cQ0 f64) (local $cQ1 f64)
    (local $cos f64) (local $sin f64) (local $threshold f64) (local $band f64)
    (local $anyPrep i32) (local $anyMap i32) (local $hasQ i32) (local $qTwoTerms i32) (local $nCols i32) (local $flip i32)
    ${f64Param('$firstCut', a.firstCut)}
    ${f64Param('$cI0', a.factorI0)} ${f64Param('$cQ0', a.factorQ0)} ${f64Param('$cQ1', a.factorQ1)}
    ${f64Param('$cos', a.cos)} ${f64Param('$sin', a.sin)} ${f64Param('$threshold', a.threshold)} ${f64Param('$band', a.band)}
    ${i32Param('$anyPrep', a.anyPrep)} ${i32Param('$anyMap', a.anyMap)} ${i32Param('$hasQ', a.hasQ)}
    ${i32Param('$qTwoTerms', a.qTwoTerms)} ${i32Param('$nCols', a.columns)} ${i32Param('$flip', a.flip)}
    ${loadWords(A, a.stream)}
    ${loadWords(B, a.lane)}
    (block $done
      (loop $shot
        (br_if $done (i32.ge_s (local.get $i) (local.get $len)))
        ;; the intended state: a xoshiro128** step on the stream, u in (0, 1)
        ${draw}
        (local.set $intended (f64.gt (local.get $u) (local.get $firstCut)))
        (local.set $prepared (local.get $intended))
        (if (local.get $anyPrep)
          (then
            ${draw}
            (if (f64.lt (local.get $u) (f64.load offset=${a.prepProbability} ${f64At('$intended')}))
              (then (local.set $prepared (i32.load offset=${a.prepInto} ${i32At('$intended')}))))))
        (local.set $initial (local.get $prepared))
        (if (local.get $anyMap)
          (then
            ${draw}
            (if (f64.lt (local.get $u) (f64.load offset=${a.mapProbability} ${f64At('$prepared')}))
              (then (local.set $initial (i32.load offset=${a.mapInto} ${i32At('$prepared')}))))))
        ;; the jump: its uniform, then (rarely) its time, cause and the path's values
        ${draw}
        (local.set $jc (i32.const 0))
        (local.set $jumped (i32.const 0))
        (local.set $pathI (f64.const 0))
        (local.set $pathQ (f64.const 0))
        (if (f64.ge (local.get $u) (f64.load offset=${a.noJumpCut} ${f64At('$initial')}))
          (then
            (local.set $time (f64.div (f64.neg (call $log (local.get $u)))
                                      (f64.load offset=${a.exitRate} ${f64At('$initial')})))
            (if (f64.lt (local.get $time) (f64.load (i32.const ${a.recordLength})))
              (then
                (local.set $jumped (i32.const 1))
                ;; the destination's uniform (its outcome is certain here): one step, output unused
                ${stepLocals(A)}
                (local.set $next (i32.sub (i32.const 1) (local.get $initial)))
                ${jumpCauseOf(L, '$initial', '$next')}
                (local.set $switchAt (f64.ceil (f64.mul (local.get $time) (f64.load (i32.const ${a.sampleRate})))))
                (local.set $pathI ${pathValue(a.prefixI, a.windowI, '$initial', '$next')})
                (if (local.get $hasQ)
                  (then (local.set $pathQ ${pathValue(a.prefixQ, a.windowQ, '$initial', '$next')})))))))
        ;; the shot's normals from the lane (the ziggurat, as RandomStream.nextNormal)
        (local.set $z0 (f64.const 0))
        (local.set $z1 (f64.const 0))
        (if (i32.gt_s (local.get $nCols) (i32.const 0))
          (then
            ${stepLocals(B, '$r')}
            ${zigguratNormal(L, '$r', '$z0', B, a.lane)}
            (if (i32.gt_s (local.get $nCols) (i32.const 1))
              (then
                ${stepLocals(B, '$r')}
                ${zigguratNormal(L, '$r', '$z1', B, a.lane)}))))
        ;; the values: fullI[initial] + cI0·z0, fullQ[initial] + cQ0·z0 (+ cQ1·z1)
        (local.set $valueI (f64.add (f64.load offset=${a.fullI} ${f64At('$initial')})
                                    (f64.mul (local.get $cI0) (local.get $z0))))
        (local.set $valueQ (f64.const 0))
        (if (local.get $hasQ)
          (then
            (local.set $valueQ (f64.add (f64.load offset=${a.fullQ} ${f64At('$initial')})
                                        (f64.mul (local.get $cQ0) (local.get $z0))))
            (if (local.get $qTwoTerms)
              (then (local.set $valueQ (f64.add (local.get $valueQ) (f64.mul (local.get $cQ1) (local.get $z1))))))))
        (if (local.get $jumped)
          (then
            (local.set $valueI (f64.add (local.get $valueI)
              (f64.sub (local.get $pathI) (f64.load offset=${a.fullI} ${f64At('$initial')}))))
            (if (local.get $hasQ)
              (then (local.set $valueQ (f64.add (local.get $valueQ)
                (f64.sub (local.get $pathQ) (f64.load offset=${a.fullQ} ${f64At('$initial')}))))))))
        ;; the projection and the decision
        (local.set $v (f64.add (f64.mul (local.get $valueI) (local.get $cos)) (f64.mul (local.get $valueQ) (local.get $sin))))
        (local.set $outcome (select (f64.lt (local.get $v) (local.get $threshold))
                                    (f64.gt (local.get $v) (local.get $threshold))
                                    (local.get $flip)))
        (local.set $sumState (i32.add (local.get $sumState) (local.get $intended)))
        (local.set $sumOutcome (i32.add (local.get $sumOutcome) (local.get $outcome)))
        (local.set $sumBoth (i32.add (local.get $sumBoth) (i32.and (local.get $intended) (local.get $outcome))))
        ;; the cause of a wrong shot, counted in causes[CAUSES.length·intended + cause]
        (local.set $cause (i32.const 0))
        (if (i32.ne (local.get $outcome) (i32.load offset=${a.outcomeOf} ${i32At('$intended')}))
          (then
            (local.set $cause (call $causeOf (local.get $intended) (local.get $prepared) (local.get $initial) (local.get $jc)))
            (local.set $at (i32.shl (i32.add ${timesConst('(local.get $intended)', CAUSES.length)} (local.get $cause)) (i32.const 2)))
            (i32.store offset=${a.causes} (local.get $at) (i32.add (i32.load offset=${a.causes} (local.get $at)) (i32.const 1)))))
        ;; the ambiguous band: discarded[intended], and discardedWrong[intended] for a wrong shot
        (if (i32.and (f64.ge (local.get $band) (f64.const 0))
                     (f64.lt (f64.abs (f64.sub (local.get $v) (local.get $threshold))) (local.get $band)))
          (then
            (local.set $at ${i32At('$intended')})
            (i32.store offset=${a.discarded} (local.get $at) (i32.add (i32.load offset=${a.discarded} (local.get $at)) (i32.const 1)))
            (if (local.get $cause)
              (then (i32.store offset=${a.discardedWrong} (local.get $at) (i32.add (i32.load offset=${a.discardedWrong} (local.get $at)) (i32.const 1)))))))
        ;; the shifted sums of the clean values per state (moments.ts momentsFromShiftedSums)
        (local.set $clean (i32.and (i32.and (i32.eq (local.get $prepared) (local.get $intended))
                                            (i32.eq (local.get $initial) (local.get $intended)))
                                   (i32.eqz (local.get $jc))))
        (local.set $w1 (i32.and (local.get $clean) (local.get $intended)))
        (local.set $w0 (i32.and (local.get $clean) (i32.xor (local.get $intended) (i32.const 1))))
        (if (i32.and (i32.eqz (local.get $n0)) (i32.ne (local.get $w0) (i32.const 0))) (then (local.set $shift0 (local.get $v))))
        (if (i32.and (i32.eqz (local.get $n1)) (i32.ne (local.get $w1) (i32.const 0))) (then (local.set $shift1 (local.get $v))))
        (local.set $d0 (f64.sub (local.get $v) (local.get $shift0)))
        (local.set $d1 (f64.sub (local.get $v) (local.get $shift1)))
        (local.set $e0 (f64.mul (f64.convert_i32_s (local.get $w0)) (local.get $d0)))
        (local.set $e1 (f64.mul (f64.convert_i32_s (local.get $w1)) (local.get $d1)))
        (local.set $s10 (f64.add (local.get $s10) (local.get $e0)))
        (local.set $s20 (f64.add (local.get $s20) (f64.mul (local.get $e0) (local.get $d0))))
        (local.set $n0 (i32.add (local.get $n0) (local.get $w0)))
        (local.set $s11 (f64.add (local.get $s11) (local.get $e1)))
        (local.set $s21 (f64.add (local.get $s21) (f64.mul (local.get $e1) (local.get $d1))))
        (local.set $n1 (i32.add (local.get $n1) (local.get $w1)))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $shot)))
    ${storeWords(A, a.stream)}
    ${storeWords(B, a.lane)}
    (f64.store (i32.const ${a.cleanSum1}) (local.get $s10)) (f64.store (i32.const ${a.cleanSum1 + 8}) (local.get $s11))
    (f64.store (i32.const ${a.cleanSum2}) (local.get $s20)) (f64.store (i32.const ${a.cleanSum2 + 8}) (local.get $s21))
    (f64.store (i32.const ${a.cleanShift}) (local.get $shift0)) (f64.store (i32.const ${a.cleanShift + 8}) (local.get $shift1))
    (i32.store (i32.const ${a.sumState}) (local.get $sumState)) (i32.store (i32.const ${a.sumOutcome}) (local.get $sumOutcome))
    (i32.store (i32.const ${a.sumBoth}) (local.get $sumBoth)) (i32.store (i32.const ${a.cleanCount}) (local.get $n0))
    (i32.store (i32.const ${a.cleanCount + 4}) (local.get $n1)))
`;
}
