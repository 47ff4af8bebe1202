;; The trace engine's two per-sample loops as WebAssembly: white noise onto a record and the
;; record's dot products with a pipeline's kernels. They do the arithmetic of the TypeScript
;; loops (random/stream.ts addNormalsFast, dsp/integrate.ts dotRange and dotRangePair) in the
;; same order, so their numbers are the same to the bit (test/signal/record-kernel.test.ts);
;; V8 compiles them without the typed-array bounds checks, which is where the time goes.
;;
;; Edit this file, then `npm run build:wasm` (writes record-kernel-wasm.ts); a test fails
;; when the two differ.
;;
;; Memory (imported, laid out by record-kernel.ts; every offset in bytes):
;;   0     the generator state, four i32 (xoshiro128**), read at entry and written at exit
;;   16    the dot products' results, two f64
;;   64    the ziggurat's acceptance bounds, 128 i32
;;   1024  the ziggurat's position-to-x factors, 128 f64
;;   2048… the arrays (waveforms, kernels, record)
(module
  (import "env" "memory" (memory 1))
  ;; the ziggurat's rejection branch (random/stream.ts normalSlowPath) on the state at 0
  (import "env" "normalSlowPath" (func $slow (param i32 i32) (result f64)))

  ;; out[i] = base[i] + sigma·n_i for i in [0, count), n_i the i-th standard normal of the
  ;; stream; `out` and `base` are byte offsets of f64 arrays (they may be equal)
  (func (export "addNormalsOnto") (param $out i32) (param $base i32) (param $count i32) (param $sigma f64)
    (local $s0 i32) (local $s1 i32) (local $s2 i32) (local $s3 i32)
    (local $u i32) (local $n2 i32) (local $n3 i32) (local $layer i32) (local $pos i32)
    (local $at i32) (local $end i32) (local $z f64)
    (local.set $s0 (i32.load (i32.const 0)))
    (local.set $s1 (i32.load (i32.const 4)))
    (local.set $s2 (i32.load (i32.const 8)))
    (local.set $s3 (i32.load (i32.const 12)))
    (local.set $end (i32.shl (local.get $count) (i32.const 3)))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $at) (local.get $end)))
        ;; one xoshiro128** step
        (local.set $u (i32.mul (i32.rotl (i32.mul (local.get $s1) (i32.const 5)) (i32.const 7)) (i32.const 9)))
        (local.set $n2 (i32.xor (local.get $s2) (local.get $s0)))
        (local.set $n3 (i32.xor (local.get $s3) (local.get $s1)))
        (local.set $s2 (i32.xor (local.get $n2) (i32.shl (local.get $s1) (i32.const 9))))
        (local.set $s1 (i32.xor (local.get $s1) (local.get $n2)))
        (local.set $s0 (i32.xor (local.get $s0) (local.get $n3)))
        (local.set $s3 (i32.rotl (local.get $n3) (i32.const 11)))
        ;; the ziggurat: 7 low bits pick the layer, the upper 25 (signed) the position
        (local.set $layer (i32.and (local.get $u) (i32.const 127)))
        (local.set $pos (i32.shr_s (local.get $u) (i32.const 7)))
        (if (i32.lt_s
              (select (local.get $pos) (i32.sub (i32.const 0) (local.get $pos)) (i32.ge_s (local.get $pos) (i32.const 0)))
              (i32.load offset=64 (i32.shl (local.get $layer) (i32.const 2))))
          (then
            (local.set $z (f64.mul (f64.convert_i32_s (local.get $pos))
                                   (f64.load offset=1024 (i32.shl (local.get $layer) (i32.const 3))))))
          (else
            ;; rare (~1 %): hand the state to the TypeScript branch and take it back
            (i32.store (i32.const 0) (local.get $s0))
            (i32.store (i32.const 4) (local.get $s1))
            (i32.store (i32.const 8) (local.get $s2))
            (i32.store (i32.const 12) (local.get $s3))
            (local.set $z (call $slow (local.get $pos) (local.get $layer)))
            (local.set $s0 (i32.load (i32.const 0)))
            (local.set $s1 (i32.load (i32.const 4)))
            (local.set $s2 (i32.load (i32.const 8)))
            (local.set $s3 (i32.load (i32.const 12)))))
        (f64.store (i32.add (local.get $out) (local.get $at))
          (f64.add (f64.load (i32.add (local.get $base) (local.get $at)))
                   (f64.mul (local.get $sigma) (local.get $z))))
        (local.set $at (i32.add (local.get $at) (i32.const 8)))
        (br $next)))
    (i32.store (i32.const 0) (local.get $s0))
    (i32.store (i32.const 4) (local.get $s1))
    (i32.store (i32.const 8) (local.get $s2))
    (i32.store (i32.const 12) (local.get $s3)))

  ;; Σ_{k=lo}^{hi−1} a[k]·x[k] into the f64 at 16, with dotRange's even/odd accumulators
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
    (f64.store (i32.const 16) (f64.add (local.get $s0) (local.get $s1))))

  ;; Σ a[k]·x[k] and Σ b[k]·x[k] over [lo, hi) into the f64s at 16 and 24, as dotRangePair
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
    (f64.store (i32.const 16) (f64.add (local.get $a0) (local.get $a1)))
    (f64.store (i32.const 24) (f64.add (local.get $b0) (local.get $b1))))
)
