/**
 * The trace engine's per-sample loops as WebAssembly text (record-loops.ts RecordKernel): white
 * noise onto a record (random/stream.ts addNormalsFast) and the record's dot products with a
 * pipeline's kernels (dsp/integrate.ts dotRange and dotRangePair), in their arithmetic order.
 */
import type { Layout } from '../layout.ts';
import { stepLocals } from './xoshiro.ts';
import { zigguratNormal } from './ziggurat.ts';

const WORDS = ['$s0', '$s1', '$s2', '$s3'] as const;

/** The state of the slot at byte `at` into the locals `words`, or back. */
export function loadWords(words: readonly string[], at: number): string {
  return words.map((w, j) => `(local.set ${w} (i32.load (i32.const ${at + 4 * j})))`).join('\n    ');
}
export function storeWords(words: readonly string[], at: number): string {
  return words.map((w, j) => `(i32.store (i32.const ${at + 4 * j}) (local.get ${w}))`).join('\n    ');
}

export function recordFunctions(L: Layout): string {
  const { stream, dotResults } = L.at;
  return `
  ;; out[i] = base[i] + sigma·n_i for i in [0, count), n_i the i-th standard normal of the
  ;; stream (slot stream); \`out\` and \`base\` are byte offsets of f64 arrays (they may be equal)
  (func (export "addNormalsOnto") (param $out i32) (param $base i32) (param $count i32) (param $sigma f64)
    (local $s0 i32) (local $s1 i32) (local $s2 i32) (local $s3 i32)
    (local $u i32) (local $n2 i32) (local $n3 i32) (local $layer i32) (local $pos i32)
    (local $at i32) (local $end i32) (local $z f64)
    ${loadWords(WORDS, stream)}
    (local.set $end (i32.shl (local.get $count) (i32.const 3)))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $at) (local.get $end)))
        ${stepLocals(WORDS, '$u')}
        ${zigguratNormal(L, '$u', '$z', WORDS, stream)}
        (f64.store (i32.add (local.get $out) (local.get $at))
          (f64.add (f64.load (i32.add (local.get $base) (local.get $at)))
                   (f64.mul (local.get $sigma) (local.get $z))))
        (local.set $at (i32.add (local.get $at) (i32.const 8)))
        (br $next)))
    ${storeWords(WORDS, stream)})

  ;; Σ_{k=lo}^{hi−1} a[k]·x[k] into dotResults[0], with dotRange's even/odd accumulators
  (func (export "dot") (param $a i32) (param $x i32) (param $lo i32) (param $hi i32)
    (local $k i32) (local $o i32) (local $s0 f64) (local $s1 f64)
    (local.set $k (local.get $lo))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $hi)))
        (local.set $o (i32.shl (local.get $k) (i32.const 3)))
        (local.set $s0 (f64.add (local.get $s0)
          (f64.mul (f64.load (i32.add (local.get $a) (local.get $o))) (f64.load (i32.add (local.get $x) (local.get $o))))))
        (local.set $s1 (f64.add (local.get $s1)
          (f64.mul (f64.load offset=8 (i32.add (local.get $a) (local.get $o))) (f64.load offset=8 (i32.add (local.get $x) (local.get $o))))))
        (local.set $k (i32.add (local.get $k) (i32.const 2)))
        (br $next)))
    (if (i32.lt_s (local.get $k) (local.get $hi))
      (then
        (local.set $o (i32.shl (local.get $k) (i32.const 3)))
        (local.set $s0 (f64.add (local.get $s0)
          (f64.mul (f64.load (i32.add (local.get $a) (local.get $o))) (f64.load (i32.add (local.get $x) (local.get $o))))))))
    (f64.store (i32.const ${dotResults}) (f64.add (local.get $s0) (local.get $s1))))

  ;; Σ a[k]·x[k] and Σ b[k]·x[k] over [lo, hi) into dotResults[0] and [1], as dotRangePair
  (func (export "dotPair") (param $a i32) (param $b i32) (param $x i32) (param $lo i32) (param $hi i32)
    (local $k i32) (local $o i32) (local $a0 f64) (local $a1 f64) (local $b0 f64) (local $b1 f64) (local $x0 f64) (local $x1 f64)
    (local.set $k (local.get $lo))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $hi)))
        (local.set $o (i32.shl (local.get $k) (i32.const 3)))
        (local.set $x0 (f64.load (i32.add (local.get $x) (local.get $o))))
        (local.set $x1 (f64.load offset=8 (i32.add (local.get $x) (local.get $o))))
        (local.set $a0 (f64.add (local.get $a0) (f64.mul (f64.load (i32.add (local.get $a) (local.get $o))) (local.get $x0))))
        (local.set $a1 (f64.add (local.get $a1) (f64.mul (f64.load offset=8 (i32.add (local.get $a) (local.get $o))) (local.get $x1))))
        (local.set $b0 (f64.add (local.get $b0) (f64.mul (f64.load (i32.add (local.get $b) (local.get $o))) (local.get $x0))))
        (local.set $b1 (f64.add (local.get $b1) (f64.mul (f64.load offset=8 (i32.add (local.get $b) (local.get $o))) (local.get $x1))))
        (local.set $k (i32.add (local.get $k) (i32.const 2)))
        (br $next)))
    (if (i32.lt_s (local.get $k) (local.get $hi))
      (then
        (local.set $o (i32.shl (local.get $k) (i32.const 3)))
        (local.set $x0 (f64.load (i32.add (local.get $x) (local.get $o))))
        (local.set $a0 (f64.add (local.get $a0) (f64.mul (f64.load (i32.add (local.get $a) (local.get $o))) (local.get $x0))))
        (local.set $b0 (f64.add (local.get $b0) (f64.mul (f64.load (i32.add (local.get $b) (local.get $o))) (local.get $x0))))))
    (f64.store (i32.const ${dotResults}) (f64.add (local.get $a0) (local.get $a1)))
    (f64.store (i32.const ${dotResults + 8}) (f64.add (local.get $b0) (local.get $b1))))
`;
}
