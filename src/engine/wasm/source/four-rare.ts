/**
 * The four-lane exact kernel's rare lanes as scalar WebAssembly text: a lane that drew a jump
 * ($quadJump), a ziggurat rejection ($quadSlowNormal) or a wrong shot ($quadCause) leaves the
 * vectors for these functions, which work on memory and step only that lane's stream. A jump's
 * path value is exact/batch.ts pathValue for one jump ($oneJump).
 */
import { CAUSES } from '../../../analysis/causes.ts';
import { HISTORY_RECORD, type Layout } from '../layout.ts';
import { SCALAR, uniformOf, xoshiroStep } from './xoshiro.ts';

/** x·c for a constant c ≥ 1 (a shift when c is a power of two). */
function timesConst(x: string, c: number): string {
  const k = Math.log2(c);
  return Number.isInteger(k) ? `(i32.shl ${x} (i32.const ${k}))` : `(i32.mul ${x} (i32.const ${c}))`;
}

/** $oneJump. */
function oneJumpFunction(): string {
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

/** Element s of an i32 slot: its byte index s·4. */
const i32At = (s: string): string => `(i32.shl (local.get ${s}) (i32.const 2))`;

/** The path's value for the shot's jump, of I or Q (prefix sums and window from the slots). */
function pathValue(prefix: number, window: number, initial: string, next: string): string {
  return `(call $oneJump
                  (i32.load offset=${prefix} ${i32At(initial)})
                  (i32.load offset=${prefix} ${i32At(next)})
                  (i32.load (i32.const ${window})) (i32.load (i32.const ${window + 4})) (local.get $switchAt))`;
}

/** The first jump's cause as the pipeline sees it: by the window's last sample and the pipeline's. */
function jumpCauseOf(L: Layout, initial: string, next: string): string {
  return `(if (f64.le (local.get $time) (f64.load (i32.const ${L.at.lastWindowSample})))
                  (then (local.set $jc (i32.load offset=${L.at.jumpCause}
                    (i32.shl (i32.add (i32.shl (local.get ${initial}) (i32.const 1)) (local.get ${next})) (i32.const 2))))))
                (if (i32.eqz (f64.le (local.get $time) (f64.load (i32.const ${L.at.lastSample}))))
                  (then (local.set $jc (i32.const 0))))`;
}

export function rareLaneFunctions(L: Layout): string {
  const a = L.at, R = HISTORY_RECORD;
  const laneWord = (slot: number, j: number): number => slot + 16 * j;
  return `${oneJumpFunction()}
  ;; the jump of lane k (u ≥ noJumpCut[initial]) into the shot's history record \`rec\`: its
  ;; cause, that it jumped, and its values' corrections (path − no-jump value)
  (func $quadJump (param $k i32) (param $rec i32)
    (local $u f64) (local $initial i32) (local $next i32) (local $time f64) (local $switchAt f64) (local $jc i32)
    (local $at i32) (local $s0 i32) (local $s1 i32) (local $s2 i32) (local $s3 i32) (local $n2 i32) (local $n3 i32)
    (local.set $at (i32.shl (local.get $k) (i32.const 2)))
    (local.set $u ${uniformOf(`(i32.load offset=${a.fourJumpDraws} (local.get $at))`)})
    (local.set $initial (i32.and (i32.load offset=${a.fourInitial} (local.get $at)) (i32.const 1)))
    (local.set $time (f64.div (f64.neg (call $log (local.get $u)))
                              (f64.load offset=${a.exitRate} (i32.shl (local.get $initial) (i32.const 3)))))
    (if (i32.eqz (f64.lt (local.get $time) (f64.load (i32.const ${a.recordLength})))) (then (return)))
    ;; the destination's uniform: one step of lane k's history stream, output unused
    ${xoshiroStep({
      isa: SCALAR, words: ['$s0', '$s1', '$s2', '$s3'], temps: ['$n2', '$n3'],
      load: (j, into) => `(local.set ${into} (i32.load offset=${laneWord(a.fourStreams, j)} (local.get $at)))`,
      store: (j, value) => `(i32.store offset=${laneWord(a.fourStreams, j)} (local.get $at) ${value})`,
    })}
    (local.set $next (i32.sub (i32.const 1) (local.get $initial)))
    ${jumpCauseOf(L, '$initial', '$next')}
    (i32.store offset=${R.jumpCause} (i32.add (local.get $rec) (local.get $at)) (local.get $jc))
    (i32.store offset=${R.jumped} (i32.add (local.get $rec) (local.get $at)) (i32.const -1))
    (local.set $switchAt (f64.ceil (f64.mul (local.get $time) (f64.load (i32.const ${a.sampleRate})))))
    (local.set $at (i32.add (local.get $rec) (i32.shl (local.get $k) (i32.const 3))))
    (f64.store offset=${R.correctionI} (local.get $at)
        (f64.sub ${pathValue(a.prefixI, a.windowI, '$initial', '$next')}
                 (f64.load offset=${a.fullI} (i32.shl (local.get $initial) (i32.const 3)))))
    (if (i32.load (i32.const ${a.hasQ}))
      (then (f64.store offset=${R.correctionQ} (local.get $at)
          (f64.sub ${pathValue(a.prefixQ, a.windowQ, '$initial', '$next')}
                   (f64.load offset=${a.fullQ} (i32.shl (local.get $initial) (i32.const 3))))))))

  ;; the ziggurat's rejection branch for lane k of the normals (its state transposed to oneState)
  (func $quadSlowNormal (param $k i32)
    (local $at i32)
    (local.set $at (i32.shl (local.get $k) (i32.const 2)))
    ${[0, 1, 2, 3].map((j) => `(i32.store (i32.const ${a.oneState + 4 * j}) (i32.load offset=${laneWord(a.fourLanes, j)} (local.get $at)))`).join('\n    ')}
    (f64.store offset=${a.fourNormals} (i32.shl (local.get $k) (i32.const 3))
      (call $normalSlow (i32.const ${a.oneState}) (i32.load offset=${a.fourPositions} (local.get $at)) (i32.load offset=${a.fourLayers} (local.get $at))))
    ${[0, 1, 2, 3].map((j) => `(i32.store offset=${laneWord(a.fourLanes, j)} (local.get $at) (i32.load (i32.const ${a.oneState + 4 * j})))`).join('\n    ')})

  ;; the cause of lane k's wrong shot, counted in its causes
  (func $quadCause (param $k i32)
    (local $at i32) (local $intended i32) (local $prepared i32) (local $initial i32) (local $jc i32) (local $cause i32)
    (local.set $at (i32.shl (local.get $k) (i32.const 2)))
    (local.set $intended (i32.and (i32.load offset=${a.fourIntended} (local.get $at)) (i32.const 1)))
    (local.set $prepared (i32.and (i32.load offset=${a.fourPrepared} (local.get $at)) (i32.const 1)))
    (local.set $initial (i32.and (i32.load offset=${a.fourInitial} (local.get $at)) (i32.const 1)))
    (local.set $jc (i32.load offset=${a.fourJumpCauses} (local.get $at)))
    (local.set $cause (call $causeOf (local.get $intended) (local.get $prepared) (local.get $initial) (local.get $jc)))
    ;; lane k of vector CAUSES.length·intended + cause
    (local.set $at (i32.add (local.get $at)
      (i32.shl (i32.add ${timesConst('(local.get $intended)', CAUSES.length)} (local.get $cause)) (i32.const 4))))
    (i32.store offset=${a.fourCauses} (local.get $at) (i32.add (i32.load offset=${a.fourCauses} (local.get $at)) (i32.const 1))))
`;
}
