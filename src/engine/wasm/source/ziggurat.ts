/**
 * The ziggurat as WebAssembly text (random/stream.ts nextNormal and normalSlowPath, step for
 * step): the fast draw from a 32-bit output, the rejection branch $normalSlow, and its wedge
 * test $below.
 */
import { ZIGGURAT_R } from '../../../random/ziggurat.ts';
import { EXP_TABLE_LENGTH, type Layout } from '../layout.ts';

/** |pos| < the layer's bound: the draw is in the layer's fast region. */
export function inFastRegion(L: Layout, pos: string, layer: string): string {
  return `(i32.lt_s (select ${pos} (i32.sub (i32.const 0) ${pos}) (i32.ge_s ${pos} (i32.const 0)))
                (i32.load offset=${L.at.layerBounds} (i32.shl ${layer} (i32.const 2))))`;
}

/** pos · the layer's factor: the normal of a draw in the fast region. */
export function fastNormal(L: Layout, pos: string, layer: string): string {
  return `(f64.mul (f64.convert_i32_s ${pos}) (f64.load offset=${L.at.layerFactors} (i32.shl ${layer} (i32.const 3))))`;
}

/**
 * The normal of the output in local `r` into local `z`, as RandomStream.nextNormal: 7 low bits
 * pick the layer, the upper 25 (signed) the position; the rare rejection (~3 %) runs
 * $normalSlow on the state, written from the locals `words` to the slot at byte `stateAt` and
 * read back after.
 */
export function zigguratNormal(L: Layout, r: string, z: string, words: readonly string[], stateAt: number): string {
  const put = words.map((w, j) => `(i32.store (i32.const ${stateAt + 4 * j}) (local.get ${w}))`).join(' ');
  const take = words.map((w, j) => `(local.set ${w} (i32.load (i32.const ${stateAt + 4 * j})))`).join(' ');
  return `(local.set $layer (i32.and (local.get ${r}) (i32.const 127)))
    (local.set $pos (i32.shr_s (local.get ${r}) (i32.const 7)))
    (if ${inFastRegion(L, '(local.get $pos)', '(local.get $layer)')}
      (then (local.set ${z} ${fastNormal(L, '(local.get $pos)', '(local.get $layer)')}))
      (else
        ${put}
        (local.set ${z} (call $normalSlow (i32.const ${stateAt}) (local.get $pos) (local.get $layer)))
        ${take}))`;
}

/** $below (exported: a test checks it against Math.exp) and $normalSlow. */
export function zigguratFunctions(L: Layout): string {
  const R = ZIGGURAT_R;
  return `
  ;; y < Math.exp(t), the wedge's test, mostly without the exp: for −95/16 ≤ t ≤ 0 an estimate
  ;; e = exp(−j/16)·(degree-5 Taylor polynomial of exp(r)), t = −j/16 + r with |r| < 1/16, lies
  ;; within 1e-10 of exp(t) relative (truncation below 1e-10, the table's and the arithmetic's
  ;; rounding ~1e-15), and Math.exp within 1 ulp; so y outside e·(1 ± 1e-9) is decided by e
  ;; alone, and only the rare y inside calls exp (its latency, ~40 ns, was a fifth of the exact
  ;; kernel's time). The table exp(−j/16), j = 0 … 95, is the slot expTable.
  (func $below (export "below") (param $y f64) (param $t f64) (result i32)
    (local $j i32) (local $r f64) (local $e f64) (local $margin f64)
    (if (i32.eqz (f64.ge (local.get $t) (f64.const ${-(EXP_TABLE_LENGTH - 1) / 16})))
      (then (return (f64.lt (local.get $y) (call $exp (local.get $t))))))
    ;; j = floor(-16 t), 0 ... 95 (t = -x^2/2 is never positive)
    (local.set $j (i32.trunc_f64_s (f64.mul (local.get $t) (f64.const -16))))
    (local.set $r (f64.add (local.get $t) (f64.mul (f64.convert_i32_s (local.get $j)) (f64.const 0.0625))))
    (local.set $e (f64.mul (f64.load offset=${L.at.expTable} (i32.shl (local.get $j) (i32.const 3)))
      (f64.add (f64.const 1) (f64.mul (local.get $r)
        (f64.add (f64.const 1) (f64.mul (local.get $r)
          (f64.add (f64.const 0.5) (f64.mul (local.get $r)
            (f64.add (f64.const 0x1.5555555555555p-3) (f64.mul (local.get $r)
              (f64.add (f64.const 0x1.5555555555555p-5) (f64.mul (local.get $r) (f64.const 0x1.1111111111111p-7)))))))))))))
    (local.set $margin (f64.mul (local.get $e) (f64.const 1e-9)))
    (if (f64.lt (local.get $y) (f64.sub (local.get $e) (local.get $margin))) (then (return (i32.const 1))))
    (if (f64.gt (local.get $y) (f64.add (local.get $e) (local.get $margin))) (then (return (i32.const 0))))
    (f64.lt (local.get $y) (call $exp (local.get $t))))

  ;; the ziggurat's rejection branch for a draw that missed its layer's fast region, drawing
  ;; further from the state at byte \`st\` (random/stream.ts normalSlowPath, step for step)
  (func $normalSlow (param $st i32) (param $pos i32) (param $layer i32) (result f64)
    (local $x f64) (local $y f64) (local $fl f64) (local $u i32)
    (loop $again
      (if (i32.eqz (local.get $layer))
        (then
          ;; the base strip's tail beyond R (Marsaglia & Tsang 2000)
          (loop $tail
            (local.set $x (f64.div (f64.neg (call $log (call $uniform (local.get $st)))) (f64.const ${R})))
            (local.set $y (f64.neg (call $log (call $uniform (local.get $st)))))
            (br_if $tail (f64.lt (f64.add (local.get $y) (local.get $y)) (f64.mul (local.get $x) (local.get $x)))))
          (return (select (f64.add (f64.const ${R}) (local.get $x))
                          (f64.sub (f64.const ${-R}) (local.get $x))
                          (i32.gt_s (local.get $pos) (i32.const 0))))))
      ;; a wedge: accept under the density (the layer's, and the one below's at offset − 8)
      (local.set $x ${fastNormal(L, '(local.get $pos)', '(local.get $layer)')})
      (local.set $fl (f64.load offset=${L.at.layerDensities} (i32.shl (local.get $layer) (i32.const 3))))
      (if (call $below (f64.add (local.get $fl)
                                (f64.mul (call $uniform (local.get $st))
                                         (f64.sub (f64.load offset=${L.at.layerDensities - 8} (i32.shl (local.get $layer) (i32.const 3))) (local.get $fl))))
                       (f64.mul (f64.mul (f64.const -0.5) (local.get $x)) (local.get $x)))
        (then (return (local.get $x))))
      ;; else a fresh draw
      (local.set $u (call $next (local.get $st)))
      (local.set $layer (i32.and (local.get $u) (i32.const 127)))
      (local.set $pos (i32.shr_s (local.get $u) (i32.const 7)))
      (if ${inFastRegion(L, '(local.get $pos)', '(local.get $layer)')}
        (then (return ${fastNormal(L, '(local.get $pos)', '(local.get $layer)')})))
      (br $again))
    (unreachable))
`;
}
