;; The simulator's two hot loops as WebAssembly, and the ziggurat they share:
;;   - the trace engine's per-sample loops (plan/record-kernel.ts): white noise onto a record,
;;     and the record's dot products with a pipeline's kernels (random/stream.ts addNormalsFast,
;;     dsp/integrate.ts dotRange and dotRangePair);
;;   - the exact engine's one-loop kernel (plan/exact-kernel.ts; exact-fast.ts fastTallyBlock)
;;     for the common point whose every jump ends the chain and whose signal has no analog
;;     response: on one block (tallyBlock), or on four blocks at once in SIMD lanes (tallyFour).
;; Each does the arithmetic of its TypeScript counterpart in the same order, with Math.exp and
;; Math.log imported, so the numbers are the same to the bit (test/plan/kernels.test.ts,
;; test/plan/exact-fused.test.ts); V8 compiles them without typed-array bounds checks and with
;; the generator states in registers, which is where the time goes.
;;
;; Edit this file, then `npm run build:wasm` (writes kernels-wasm.ts); a test fails when the two
;; differ.
;;
;; Memory (imported, laid out by kernel-memory.ts; offsets in bytes):
;;   0     a stream's state, four i32 (xoshiro128**): the record's noise, or the history stream
;;   16    the exact engine's normals lane, likewise
;;   32    the dot products' results, two f64
;;   64    the ziggurat's acceptance bounds, 128 i32
;;   1024  the ziggurat's position-to-x factors, 128 f64
;;   2048  the ziggurat's densities at the layers' edges, 128 f64
;;   3072  the exact kernel's f64 parameters P0 … P23 (see exact-kernel.ts for the list)
;;   3328  its i32 parameters Q0 … Q23
;;   3456  its f64 results: s10 s11 s20 s21 shift0 shift1
;;   3520  its i32 results: sumState sumOutcome sumBoth n0 n1, causes[2·8], discarded[2], discardedWrong[2]
;;   4096  the four-block exact kernel's states, results, scratch and parameters (tallyFour)
;;   5376  exp(−j/16), j = 0 … 95, for the wedge test ($below)
;;   65536… arrays (waveforms, kernels and record; or prefix sums of kernel × waveform)
(module
  (import "env" "memory" (memory 1))
  (import "env" "exp" (func $exp (param f64) (result f64)))
  (import "env" "log" (func $log (param f64) (result f64)))

  ;; one xoshiro128** step on the state at byte `st`; returns the 32-bit output
  (func $next (param $st i32) (result i32)
    (local $s0 i32) (local $s1 i32) (local $s2 i32) (local $s3 i32) (local $n2 i32) (local $n3 i32)
    (local.set $s0 (i32.load (local.get $st))) (local.set $s1 (i32.load offset=4 (local.get $st)))
    (local.set $s2 (i32.load offset=8 (local.get $st))) (local.set $s3 (i32.load offset=12 (local.get $st)))
    (local.set $n2 (i32.xor (local.get $s2) (local.get $s0)))
    (local.set $n3 (i32.xor (local.get $s3) (local.get $s1)))
    (i32.store offset=4 (local.get $st) (i32.xor (local.get $s1) (local.get $n2)))
    (i32.store (local.get $st) (i32.xor (local.get $s0) (local.get $n3)))
    (i32.store offset=8 (local.get $st) (i32.xor (local.get $n2) (i32.shl (local.get $s1) (i32.const 9))))
    (i32.store offset=12 (local.get $st) (i32.rotl (local.get $n3) (i32.const 11)))
    (i32.mul (i32.rotl (i32.mul (local.get $s1) (i32.const 5)) (i32.const 7)) (i32.const 9)))

  ;; a uniform in (0, 1) from the next output, as RandomStream.nextDouble
  (func $uniform (param $st i32) (result f64)
    (f64.mul (f64.add (f64.convert_i32_u (call $next (local.get $st))) (f64.const 0.5)) (f64.const 0x1p-32)))

  ;; y < Math.exp(t), the wedge's test, mostly without the exp: for −95/16 ≤ t ≤ 0 an estimate
  ;; e = exp(−j/16)·(degree-5 Taylor polynomial of exp(r)), t = −j/16 + r with |r| < 1/16, lies
  ;; within 1e-10 of exp(t) relative (truncation below 1e-10, the table's and the arithmetic's
  ;; rounding ~1e-15), and Math.exp within 1 ulp; so y outside e·(1 ± 1e-9) is decided by e
  ;; alone, and only the rare y inside calls exp (its latency, ~40 ns, was a fifth of the exact
  ;; kernel's time). The table exp(−j/16), j = 0 … 95, is at 5376 (kernel-memory.ts).
  (func $below (export "below") (param $y f64) (param $t f64) (result i32)
    (local $j i32) (local $r f64) (local $e f64) (local $margin f64)
    (if (i32.eqz (f64.ge (local.get $t) (f64.const -5.9375)))
      (then (return (f64.lt (local.get $y) (call $exp (local.get $t))))))
    ;; j = floor(-16 t), 0 ... 95 (t = -x^2/2 is never positive)
    (local.set $j (i32.trunc_f64_s (f64.mul (local.get $t) (f64.const -16))))
    (local.set $r (f64.add (local.get $t) (f64.mul (f64.convert_i32_s (local.get $j)) (f64.const 0.0625))))
    (local.set $e (f64.mul (f64.load offset=5376 (i32.shl (local.get $j) (i32.const 3)))
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
  ;; further from the state at byte `st` (random/stream.ts normalSlowPath, step for step)
  (func $normalSlow (param $st i32) (param $pos i32) (param $layer i32) (result f64)
    (local $x f64) (local $y f64) (local $fl f64) (local $u i32)
    (loop $again
      (if (i32.eqz (local.get $layer))
        (then
          ;; the base strip's tail beyond R = 3.442619855899 (Marsaglia & Tsang 2000)
          (loop $tail
            (local.set $x (f64.div (f64.neg (call $log (call $uniform (local.get $st)))) (f64.const 3.442619855899)))
            (local.set $y (f64.neg (call $log (call $uniform (local.get $st)))))
            (br_if $tail (f64.lt (f64.add (local.get $y) (local.get $y)) (f64.mul (local.get $x) (local.get $x)))))
          (return (select (f64.add (f64.const 3.442619855899) (local.get $x))
                          (f64.sub (f64.const -3.442619855899) (local.get $x))
                          (i32.gt_s (local.get $pos) (i32.const 0))))))
      ;; a wedge: accept under the density
      (local.set $x (f64.mul (f64.convert_i32_s (local.get $pos)) (f64.load offset=1024 (i32.shl (local.get $layer) (i32.const 3)))))
      (local.set $fl (f64.load offset=2048 (i32.shl (local.get $layer) (i32.const 3))))
      (if (call $below (f64.add (local.get $fl)
                                (f64.mul (call $uniform (local.get $st))
                                         (f64.sub (f64.load offset=2040 (i32.shl (local.get $layer) (i32.const 3))) (local.get $fl))))
                       (f64.mul (f64.mul (f64.const -0.5) (local.get $x)) (local.get $x)))
        (then (return (local.get $x))))
      ;; else a fresh draw
      (local.set $u (call $next (local.get $st)))
      (local.set $layer (i32.and (local.get $u) (i32.const 127)))
      (local.set $pos (i32.shr_s (local.get $u) (i32.const 7)))
      (if (i32.lt_s (select (local.get $pos) (i32.sub (i32.const 0) (local.get $pos)) (i32.ge_s (local.get $pos) (i32.const 0)))
                    (i32.load offset=64 (i32.shl (local.get $layer) (i32.const 2))))
        (then (return (f64.mul (f64.convert_i32_s (local.get $pos)) (f64.load offset=1024 (i32.shl (local.get $layer) (i32.const 3)))))))
      (br $again))
    (unreachable))

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
            ;; rare (~1 %): the rejection branch, on the state in memory
            (i32.store (i32.const 0) (local.get $s0))
            (i32.store (i32.const 4) (local.get $s1))
            (i32.store (i32.const 8) (local.get $s2))
            (i32.store (i32.const 12) (local.get $s3))
            (local.set $z (call $normalSlow (i32.const 0) (local.get $pos) (local.get $layer)))
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

  ;; Σ_{k=lo}^{hi−1} a[k]·x[k] into the f64 at 32, with dotRange's even/odd accumulators
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
    (f64.store (i32.const 32) (f64.add (local.get $s0) (local.get $s1))))

  ;; Σ a[k]·x[k] and Σ b[k]·x[k] over [lo, hi) into the f64s at 32 and 40, as dotRangePair
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
    (f64.store (i32.const 32) (f64.add (local.get $a0) (local.get $a1)))
    (f64.store (i32.const 40) (f64.add (local.get $b0) (local.get $b1))))

  ;; the cause of a wrong shot (analysis/causes.ts's precedence): preparation (5), mapping (6),
  ;; else its first jump's cause if any, else noise (1)
  (func $causeOf (param $intended i32) (param $prepared i32) (param $initial i32) (param $jc i32) (result i32)
    (if (result i32) (i32.ne (local.get $prepared) (local.get $intended))
      (then (i32.const 5))
      (else (if (result i32) (i32.ne (local.get $initial) (local.get $prepared))
        (then (i32.const 6))
        (else (select (local.get $jc) (i32.const 1) (local.get $jc)))))))

  ;; exact-fast.ts oneJumpValue: the path's value for one jump switching at sample `switchAt`
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
    (local.set $firstCut (f64.load (i32.const 3072)))
    (local.set $cI0 (f64.load (i32.const 3208)))
    (local.set $cQ0 (f64.load (i32.const 3216)))
    (local.set $cQ1 (f64.load (i32.const 3224)))
    (local.set $cos (f64.load (i32.const 3232)))
    (local.set $sin (f64.load (i32.const 3240)))
    (local.set $threshold (f64.load (i32.const 3248)))
    (local.set $band (f64.load (i32.const 3256)))
    (local.set $anyPrep (i32.load (i32.const 3368)))
    (local.set $anyMap (i32.load (i32.const 3372)))
    (local.set $hasQ (i32.load (i32.const 3376)))
    (local.set $qTwoTerms (i32.load (i32.const 3380)))
    (local.set $nCols (i32.load (i32.const 3384)))
    (local.set $flip (i32.load (i32.const 3388)))
    (local.set $a0 (i32.load (i32.const 0))) (local.set $a1 (i32.load (i32.const 4)))
    (local.set $a2 (i32.load (i32.const 8))) (local.set $a3 (i32.load (i32.const 12)))
    (local.set $b0 (i32.load (i32.const 16))) (local.set $b1 (i32.load (i32.const 20)))
    (local.set $b2 (i32.load (i32.const 24))) (local.set $b3 (i32.load (i32.const 28)))
    (block $done
      (loop $shot
        (br_if $done (i32.ge_s (local.get $i) (local.get $len)))
        ;; the intended state: a xoshiro128** step on the stream, u in (0, 1)
        (local.set $r (i32.mul (i32.rotl (i32.mul (local.get $a1) (i32.const 5)) (i32.const 7)) (i32.const 9)))
        (local.set $n2 (i32.xor (local.get $a2) (local.get $a0))) (local.set $n3 (i32.xor (local.get $a3) (local.get $a1)))
        (local.set $a2 (i32.xor (local.get $n2) (i32.shl (local.get $a1) (i32.const 9))))
        (local.set $a1 (i32.xor (local.get $a1) (local.get $n2))) (local.set $a0 (i32.xor (local.get $a0) (local.get $n3)))
        (local.set $a3 (i32.rotl (local.get $n3) (i32.const 11)))
        (local.set $u (f64.mul (f64.add (f64.convert_i32_u (local.get $r)) (f64.const 0.5)) (f64.const 0x1p-32)))
        (local.set $intended (f64.gt (local.get $u) (local.get $firstCut)))
        (local.set $prepared (local.get $intended))
        (if (local.get $anyPrep)
          (then
            (local.set $r (i32.mul (i32.rotl (i32.mul (local.get $a1) (i32.const 5)) (i32.const 7)) (i32.const 9)))
            (local.set $n2 (i32.xor (local.get $a2) (local.get $a0))) (local.set $n3 (i32.xor (local.get $a3) (local.get $a1)))
            (local.set $a2 (i32.xor (local.get $n2) (i32.shl (local.get $a1) (i32.const 9))))
            (local.set $a1 (i32.xor (local.get $a1) (local.get $n2))) (local.set $a0 (i32.xor (local.get $a0) (local.get $n3)))
            (local.set $a3 (i32.rotl (local.get $n3) (i32.const 11)))
            (local.set $u (f64.mul (f64.add (f64.convert_i32_u (local.get $r)) (f64.const 0.5)) (f64.const 0x1p-32)))
            ;; P1+s prepProbability[s], Q0+s prepInto[s]
            (if (f64.lt (local.get $u) (f64.load offset=3080 (i32.shl (local.get $intended) (i32.const 3))))
              (then (local.set $prepared (i32.load offset=3328 (i32.shl (local.get $intended) (i32.const 2))))))))
        (local.set $initial (local.get $prepared))
        (if (local.get $anyMap)
          (then
            (local.set $r (i32.mul (i32.rotl (i32.mul (local.get $a1) (i32.const 5)) (i32.const 7)) (i32.const 9)))
            (local.set $n2 (i32.xor (local.get $a2) (local.get $a0))) (local.set $n3 (i32.xor (local.get $a3) (local.get $a1)))
            (local.set $a2 (i32.xor (local.get $n2) (i32.shl (local.get $a1) (i32.const 9))))
            (local.set $a1 (i32.xor (local.get $a1) (local.get $n2))) (local.set $a0 (i32.xor (local.get $a0) (local.get $n3)))
            (local.set $a3 (i32.rotl (local.get $n3) (i32.const 11)))
            (local.set $u (f64.mul (f64.add (f64.convert_i32_u (local.get $r)) (f64.const 0.5)) (f64.const 0x1p-32)))
            ;; P3+s mapProbability[s], Q2+s mapInto[s]
            (if (f64.lt (local.get $u) (f64.load offset=3096 (i32.shl (local.get $prepared) (i32.const 3))))
              (then (local.set $initial (i32.load offset=3336 (i32.shl (local.get $prepared) (i32.const 2))))))))
        ;; the jump: its uniform, then (rarely) its time, cause and the path's values
        (local.set $r (i32.mul (i32.rotl (i32.mul (local.get $a1) (i32.const 5)) (i32.const 7)) (i32.const 9)))
        (local.set $n2 (i32.xor (local.get $a2) (local.get $a0))) (local.set $n3 (i32.xor (local.get $a3) (local.get $a1)))
        (local.set $a2 (i32.xor (local.get $n2) (i32.shl (local.get $a1) (i32.const 9))))
        (local.set $a1 (i32.xor (local.get $a1) (local.get $n2))) (local.set $a0 (i32.xor (local.get $a0) (local.get $n3)))
        (local.set $a3 (i32.rotl (local.get $n3) (i32.const 11)))
        (local.set $u (f64.mul (f64.add (f64.convert_i32_u (local.get $r)) (f64.const 0.5)) (f64.const 0x1p-32)))
        (local.set $jc (i32.const 0))
        (local.set $jumped (i32.const 0))
        (local.set $pathI (f64.const 0))
        (local.set $pathQ (f64.const 0))
        ;; P5+s noJumpCut[s]
        (if (f64.ge (local.get $u) (f64.load offset=3112 (i32.shl (local.get $initial) (i32.const 3))))
          (then
            ;; P7+s exitRate[s]
            (local.set $time (f64.div (f64.neg (call $log (local.get $u)))
                                      (f64.load offset=3128 (i32.shl (local.get $initial) (i32.const 3)))))
            ;; P9 recordLength
            (if (f64.lt (local.get $time) (f64.load (i32.const 3144)))
              (then
                (local.set $jumped (i32.const 1))
                ;; the destination's uniform (its outcome is certain here): one step, output unused
                (local.set $n2 (i32.xor (local.get $a2) (local.get $a0))) (local.set $n3 (i32.xor (local.get $a3) (local.get $a1)))
                (local.set $a2 (i32.xor (local.get $n2) (i32.shl (local.get $a1) (i32.const 9))))
                (local.set $a1 (i32.xor (local.get $a1) (local.get $n2))) (local.set $a0 (i32.xor (local.get $a0) (local.get $n3)))
                (local.set $a3 (i32.rotl (local.get $n3) (i32.const 11)))
                (local.set $next (i32.sub (i32.const 1) (local.get $initial)))
                ;; P10 lastWindowSample, Q4 + 2·initial + next jumpCause
                (if (f64.le (local.get $time) (f64.load (i32.const 3152)))
                  (then (local.set $jc (i32.load offset=3344
                    (i32.shl (i32.add (i32.shl (local.get $initial) (i32.const 1)) (local.get $next)) (i32.const 2))))))
                ;; P11 lastSample
                (if (i32.eqz (f64.le (local.get $time) (f64.load (i32.const 3160))))
                  (then (local.set $jc (i32.const 0))))
                ;; P12 sampleRate; Q16-19 lo/hi of I and Q; Q20-23 prefix offsets (I s0, I s1, Q s0, Q s1)
                (local.set $switchAt (f64.ceil (f64.mul (local.get $time) (f64.load (i32.const 3168)))))
                (local.set $pathI (call $oneJump
                  (i32.load offset=3408 (i32.shl (local.get $initial) (i32.const 2)))
                  (i32.load offset=3408 (i32.shl (local.get $next) (i32.const 2)))
                  (i32.load (i32.const 3392)) (i32.load (i32.const 3396)) (local.get $switchAt)))
                (if (local.get $hasQ)
                  (then (local.set $pathQ (call $oneJump
                    (i32.load offset=3416 (i32.shl (local.get $initial) (i32.const 2)))
                    (i32.load offset=3416 (i32.shl (local.get $next) (i32.const 2)))
                    (i32.load (i32.const 3400)) (i32.load (i32.const 3404)) (local.get $switchAt)))))))))
        ;; the shot's normals from the lane (the ziggurat, as RandomStream.nextNormal)
        (local.set $z0 (f64.const 0))
        (local.set $z1 (f64.const 0))
        (if (i32.gt_s (local.get $nCols) (i32.const 0))
          (then
            (local.set $r (i32.mul (i32.rotl (i32.mul (local.get $b1) (i32.const 5)) (i32.const 7)) (i32.const 9)))
            (local.set $n2 (i32.xor (local.get $b2) (local.get $b0))) (local.set $n3 (i32.xor (local.get $b3) (local.get $b1)))
            (local.set $b2 (i32.xor (local.get $n2) (i32.shl (local.get $b1) (i32.const 9))))
            (local.set $b1 (i32.xor (local.get $b1) (local.get $n2))) (local.set $b0 (i32.xor (local.get $b0) (local.get $n3)))
            (local.set $b3 (i32.rotl (local.get $n3) (i32.const 11)))
            (local.set $layer (i32.and (local.get $r) (i32.const 127)))
            (local.set $pos (i32.shr_s (local.get $r) (i32.const 7)))
            (if (i32.lt_s (select (local.get $pos) (i32.sub (i32.const 0) (local.get $pos)) (i32.ge_s (local.get $pos) (i32.const 0)))
                          (i32.load offset=64 (i32.shl (local.get $layer) (i32.const 2))))
              (then (local.set $z0 (f64.mul (f64.convert_i32_s (local.get $pos))
                                            (f64.load offset=1024 (i32.shl (local.get $layer) (i32.const 3))))))
              (else
                (i32.store (i32.const 16) (local.get $b0)) (i32.store (i32.const 20) (local.get $b1))
                (i32.store (i32.const 24) (local.get $b2)) (i32.store (i32.const 28) (local.get $b3))
                (local.set $z0 (call $normalSlow (i32.const 16) (local.get $pos) (local.get $layer)))
                (local.set $b0 (i32.load (i32.const 16))) (local.set $b1 (i32.load (i32.const 20)))
                (local.set $b2 (i32.load (i32.const 24))) (local.set $b3 (i32.load (i32.const 28)))))
            (if (i32.gt_s (local.get $nCols) (i32.const 1))
              (then
                (local.set $r (i32.mul (i32.rotl (i32.mul (local.get $b1) (i32.const 5)) (i32.const 7)) (i32.const 9)))
                (local.set $n2 (i32.xor (local.get $b2) (local.get $b0))) (local.set $n3 (i32.xor (local.get $b3) (local.get $b1)))
                (local.set $b2 (i32.xor (local.get $n2) (i32.shl (local.get $b1) (i32.const 9))))
                (local.set $b1 (i32.xor (local.get $b1) (local.get $n2))) (local.set $b0 (i32.xor (local.get $b0) (local.get $n3)))
                (local.set $b3 (i32.rotl (local.get $n3) (i32.const 11)))
                (local.set $layer (i32.and (local.get $r) (i32.const 127)))
                (local.set $pos (i32.shr_s (local.get $r) (i32.const 7)))
                (if (i32.lt_s (select (local.get $pos) (i32.sub (i32.const 0) (local.get $pos)) (i32.ge_s (local.get $pos) (i32.const 0)))
                              (i32.load offset=64 (i32.shl (local.get $layer) (i32.const 2))))
                  (then (local.set $z1 (f64.mul (f64.convert_i32_s (local.get $pos))
                                                (f64.load offset=1024 (i32.shl (local.get $layer) (i32.const 3))))))
                  (else
                    (i32.store (i32.const 16) (local.get $b0)) (i32.store (i32.const 20) (local.get $b1))
                    (i32.store (i32.const 24) (local.get $b2)) (i32.store (i32.const 28) (local.get $b3))
                    (local.set $z1 (call $normalSlow (i32.const 16) (local.get $pos) (local.get $layer)))
                    (local.set $b0 (i32.load (i32.const 16))) (local.set $b1 (i32.load (i32.const 20)))
                    (local.set $b2 (i32.load (i32.const 24))) (local.set $b3 (i32.load (i32.const 28)))))))))
        ;; the values: P13+s fullI[s], P15+s fullQ[s]
        (local.set $valueI (f64.add (f64.load offset=3176 (i32.shl (local.get $initial) (i32.const 3)))
                                    (f64.mul (local.get $cI0) (local.get $z0))))
        (local.set $valueQ (f64.const 0))
        (if (local.get $hasQ)
          (then
            (local.set $valueQ (f64.add (f64.load offset=3192 (i32.shl (local.get $initial) (i32.const 3)))
                                        (f64.mul (local.get $cQ0) (local.get $z0))))
            (if (local.get $qTwoTerms)
              (then (local.set $valueQ (f64.add (local.get $valueQ) (f64.mul (local.get $cQ1) (local.get $z1))))))))
        (if (local.get $jumped)
          (then
            (local.set $valueI (f64.add (local.get $valueI)
              (f64.sub (local.get $pathI) (f64.load offset=3176 (i32.shl (local.get $initial) (i32.const 3))))))
            (if (local.get $hasQ)
              (then (local.set $valueQ (f64.add (local.get $valueQ)
                (f64.sub (local.get $pathQ) (f64.load offset=3192 (i32.shl (local.get $initial) (i32.const 3))))))))))
        ;; the projection and the decision
        (local.set $v (f64.add (f64.mul (local.get $valueI) (local.get $cos)) (f64.mul (local.get $valueQ) (local.get $sin))))
        (local.set $outcome (select (f64.lt (local.get $v) (local.get $threshold))
                                    (f64.gt (local.get $v) (local.get $threshold))
                                    (local.get $flip)))
        (local.set $sumState (i32.add (local.get $sumState) (local.get $intended)))
        (local.set $sumOutcome (i32.add (local.get $sumOutcome) (local.get $outcome)))
        (local.set $sumBoth (i32.add (local.get $sumBoth) (i32.and (local.get $intended) (local.get $outcome))))
        ;; the cause of a wrong shot (Q8+s outcomeOf[s]); causes at 3540 + 4·(8·intended + cause)
        (local.set $cause (i32.const 0))
        (if (i32.ne (local.get $outcome) (i32.load offset=3360 (i32.shl (local.get $intended) (i32.const 2))))
          (then
            (local.set $cause (call $causeOf (local.get $intended) (local.get $prepared) (local.get $initial) (local.get $jc)))
            (local.set $at (i32.shl (i32.add (i32.shl (local.get $intended) (i32.const 3)) (local.get $cause)) (i32.const 2)))
            (i32.store offset=3540 (local.get $at) (i32.add (i32.load offset=3540 (local.get $at)) (i32.const 1)))))
        ;; the ambiguous band: discarded[s] at 3604, discardedWrong[s] at 3612
        (if (i32.and (f64.ge (local.get $band) (f64.const 0))
                     (f64.lt (f64.abs (f64.sub (local.get $v) (local.get $threshold))) (local.get $band)))
          (then
            (local.set $at (i32.shl (local.get $intended) (i32.const 2)))
            (i32.store offset=3604 (local.get $at) (i32.add (i32.load offset=3604 (local.get $at)) (i32.const 1)))
            (if (local.get $cause)
              (then (i32.store offset=3612 (local.get $at) (i32.add (i32.load offset=3612 (local.get $at)) (i32.const 1)))))))
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
    (i32.store (i32.const 0) (local.get $a0)) (i32.store (i32.const 4) (local.get $a1))
    (i32.store (i32.const 8) (local.get $a2)) (i32.store (i32.const 12) (local.get $a3))
    (i32.store (i32.const 16) (local.get $b0)) (i32.store (i32.const 20) (local.get $b1))
    (i32.store (i32.const 24) (local.get $b2)) (i32.store (i32.const 28) (local.get $b3))
    (f64.store (i32.const 3456) (local.get $s10)) (f64.store (i32.const 3464) (local.get $s11))
    (f64.store (i32.const 3472) (local.get $s20)) (f64.store (i32.const 3480) (local.get $s21))
    (f64.store (i32.const 3488) (local.get $shift0)) (f64.store (i32.const 3496) (local.get $shift1))
    (i32.store (i32.const 3520) (local.get $sumState)) (i32.store (i32.const 3524) (local.get $sumOutcome))
    (i32.store (i32.const 3528) (local.get $sumBoth)) (i32.store (i32.const 3532) (local.get $n0))
    (i32.store (i32.const 3536) (local.get $n1)))

  ;; ---- four seeding blocks at once (exact-kernel.ts tallyFourBlocks) ----
  ;; tallyBlock's work on four blocks of equal length side by side: lane k of every vector is
  ;; block k, with its own history stream and normals lane, so each block draws exactly the
  ;; numbers, and sums exactly the terms in the order, of tallyBlock on it alone. The uniforms'
  ;; comparisons are made on the 32-bit outputs against integer cuts (exact-kernel.ts
  ;; uniformCut: the same decisions); the rare lanes — a jump, a ziggurat rejection, a wrong
  ;; shot — leave the vectors for scalar code on memory.
  ;;
  ;; Memory (bytes):
  ;;   4096  history states, word j of the four lanes at 4096 + 16j
  ;;   4160  normals states, likewise
  ;;   4224  i32 results, 25 vectors (lane k at +4k): sumState sumOutcome sumBoth n0 n1,
  ;;         causes[8·s + c] (16), discarded[s] (2), discardedWrong[s] (2)
  ;;   4624  f64 results, 6 fields of four lanes: s10 s11 s20 s21 shift0 shift1
  ;;   4816  scratch: jc, the jump draw, initial, intended, prepared (i32 ×4 each), normals
  ;;         (f64 ×4, at 4960), positions and layers (i32 ×4), one state
  ;;   5056  i32 parameters, each in all four lanes (16 bytes): cut and flip of the intended
  ;;         draw; cuts[s] and flips[s] of preparation, mapping and the jump; expected outcome
  ;;         mask[s]; preparation's and mapping's destination masks[s] (exact-kernel.ts setScoring)
  ;;   8192  a chunk's buffers between passes: histories (144 bytes a shot), normals (32 bytes
  ;;         each, at 26624), values and clean masks (64 bytes a shot, at 34816)

  ;; the jump of lane k (tallyBlock's rare branch) into the shot's history record `rec`: its
  ;; cause, that it jumped, and its values' corrections (path − no-jump value)
  (func $quadJump (param $k i32) (param $rec i32)
    (local $u f64) (local $initial i32) (local $next i32) (local $time f64) (local $switchAt f64) (local $jc i32)
    (local $at i32) (local $s0 i32) (local $s1 i32) (local $s2 i32) (local $s3 i32) (local $n2 i32) (local $n3 i32)
    (local.set $at (i32.shl (local.get $k) (i32.const 2)))
    (local.set $u (f64.mul (f64.add (f64.convert_i32_u (i32.load offset=4832 (local.get $at))) (f64.const 0.5)) (f64.const 0x1p-32)))
    (local.set $initial (i32.and (i32.load offset=4848 (local.get $at)) (i32.const 1)))
    (local.set $time (f64.div (f64.neg (call $log (local.get $u)))
                              (f64.load offset=3128 (i32.shl (local.get $initial) (i32.const 3)))))
    (if (i32.eqz (f64.lt (local.get $time) (f64.load (i32.const 3144)))) (then (return)))
    ;; the destination's uniform: one step of lane k's history stream, output unused
    (local.set $s0 (i32.load offset=4096 (local.get $at))) (local.set $s1 (i32.load offset=4112 (local.get $at)))
    (local.set $s2 (i32.load offset=4128 (local.get $at))) (local.set $s3 (i32.load offset=4144 (local.get $at)))
    (local.set $n2 (i32.xor (local.get $s2) (local.get $s0))) (local.set $n3 (i32.xor (local.get $s3) (local.get $s1)))
    (i32.store offset=4128 (local.get $at) (i32.xor (local.get $n2) (i32.shl (local.get $s1) (i32.const 9))))
    (i32.store offset=4112 (local.get $at) (i32.xor (local.get $s1) (local.get $n2)))
    (i32.store offset=4096 (local.get $at) (i32.xor (local.get $s0) (local.get $n3)))
    (i32.store offset=4144 (local.get $at) (i32.rotl (local.get $n3) (i32.const 11)))
    (local.set $next (i32.sub (i32.const 1) (local.get $initial)))
    (if (f64.le (local.get $time) (f64.load (i32.const 3152)))
      (then (local.set $jc (i32.load offset=3344
        (i32.shl (i32.add (i32.shl (local.get $initial) (i32.const 1)) (local.get $next)) (i32.const 2))))))
    (if (i32.eqz (f64.le (local.get $time) (f64.load (i32.const 3160))))
      (then (local.set $jc (i32.const 0))))
    (i32.store offset=48 (i32.add (local.get $rec) (local.get $at)) (local.get $jc))
    (i32.store offset=64 (i32.add (local.get $rec) (local.get $at)) (i32.const -1))
    (local.set $switchAt (f64.ceil (f64.mul (local.get $time) (f64.load (i32.const 3168)))))
    (local.set $at (i32.add (local.get $rec) (i32.shl (local.get $k) (i32.const 3))))
    (f64.store offset=80 (local.get $at)
        (f64.sub (call $oneJump
                   (i32.load offset=3408 (i32.shl (local.get $initial) (i32.const 2)))
                   (i32.load offset=3408 (i32.shl (local.get $next) (i32.const 2)))
                   (i32.load (i32.const 3392)) (i32.load (i32.const 3396)) (local.get $switchAt))
                 (f64.load offset=3176 (i32.shl (local.get $initial) (i32.const 3)))))
    (if (i32.load (i32.const 3376))
      (then (f64.store offset=112 (local.get $at)
          (f64.sub (call $oneJump
                     (i32.load offset=3416 (i32.shl (local.get $initial) (i32.const 2)))
                     (i32.load offset=3416 (i32.shl (local.get $next) (i32.const 2)))
                     (i32.load (i32.const 3400)) (i32.load (i32.const 3404)) (local.get $switchAt))
                   (f64.load offset=3192 (i32.shl (local.get $initial) (i32.const 3))))))))

  ;; the ziggurat's rejection branch for lane k of the normals (its state transposed to 5040)
  (func $quadSlowNormal (param $k i32)
    (local $at i32)
    (local.set $at (i32.shl (local.get $k) (i32.const 2)))
    (i32.store (i32.const 5040) (i32.load offset=4160 (local.get $at)))
    (i32.store (i32.const 5044) (i32.load offset=4176 (local.get $at)))
    (i32.store (i32.const 5048) (i32.load offset=4192 (local.get $at)))
    (i32.store (i32.const 5052) (i32.load offset=4208 (local.get $at)))
    (f64.store offset=4960 (i32.shl (local.get $k) (i32.const 3))
      (call $normalSlow (i32.const 5040) (i32.load offset=4992 (local.get $at)) (i32.load offset=5008 (local.get $at))))
    (i32.store offset=4160 (local.get $at) (i32.load (i32.const 5040)))
    (i32.store offset=4176 (local.get $at) (i32.load (i32.const 5044)))
    (i32.store offset=4192 (local.get $at) (i32.load (i32.const 5048)))
    (i32.store offset=4208 (local.get $at) (i32.load (i32.const 5052))))

  ;; the cause of lane k's wrong shot, counted in its causes
  (func $quadCause (param $k i32)
    (local $at i32) (local $intended i32) (local $prepared i32) (local $initial i32) (local $jc i32) (local $cause i32)
    (local.set $at (i32.shl (local.get $k) (i32.const 2)))
    (local.set $intended (i32.and (i32.load offset=4864 (local.get $at)) (i32.const 1)))
    (local.set $prepared (i32.and (i32.load offset=4880 (local.get $at)) (i32.const 1)))
    (local.set $initial (i32.and (i32.load offset=4848 (local.get $at)) (i32.const 1)))
    (local.set $jc (i32.load offset=4816 (local.get $at)))
    (local.set $cause (call $causeOf (local.get $intended) (local.get $prepared) (local.get $initial) (local.get $jc)))
    (local.set $at (i32.add (local.get $at)
      (i32.shl (i32.add (i32.const 5) (i32.add (i32.shl (local.get $intended) (i32.const 3)) (local.get $cause))) (i32.const 4))))
    (i32.store offset=4224 (local.get $at) (i32.add (i32.load offset=4224 (local.get $at)) (i32.const 1))))

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
    (local.set $anyPrep (i32.load (i32.const 3368)))
    (local.set $anyMap (i32.load (i32.const 3372)))
    (local.set $hasQ (i32.load (i32.const 3376)))
    (local.set $qTwoTerms (i32.load (i32.const 3380)))
    (local.set $nCols (i32.load (i32.const 3384)))
    (local.set $flip (i32.load (i32.const 3388)))
    (local.set $hasBand (f64.ge (f64.load (i32.const 3256)) (f64.const 0)))
    (local.set $a0 (v128.load (i32.const 4096))) (local.set $a1 (v128.load (i32.const 4112)))
    (local.set $a2 (v128.load (i32.const 4128))) (local.set $a3 (v128.load (i32.const 4144)))
    (local.set $b0 (v128.load (i32.const 4160))) (local.set $b1 (v128.load (i32.const 4176)))
    (local.set $b2 (v128.load (i32.const 4192))) (local.set $b3 (v128.load (i32.const 4208)))
    (local.set $shifting (i32.const 1))
    (local.set $five (v128.const i32x4 5 5 5 5)) (local.set $nine (v128.const i32x4 9 9 9 9))
    (local.set $c127 (v128.const i32x4 127 127 127 127)) (local.set $one (v128.const f64x2 1 1))
    ;; chunks of 128 shots, each in four passes over buffers (at 8192): the histories, the
    ;; normals, then the values, decisions and counts, then the clean values' sums. Each pass
    ;; holds few vectors, so that its rare lanes' scalar calls cost little around them.
    (block $done
      (loop $chunk
        (br_if $done (i32.ge_s (local.get $i) (local.get $len)))
        (local.set $count (select (i32.sub (local.get $len) (local.get $i)) (i32.const 128)
                                  (i32.lt_s (i32.sub (local.get $len) (local.get $i)) (i32.const 128))))
        ;; histories: the shot's masks (intended, prepared, initial), jump cause and jumped
        ;; lanes, and their values' corrections — 144 bytes a shot at 8192
        (local.set $h (i32.const 8192))
        (local.set $j (i32.const 0))
        (block $end_history
          (loop $history
            (br_if $end_history (i32.ge_s (local.get $j) (local.get $count)))
            ;; the intended state: u > cut as the output against an integer cut
            (local.set $r (i32x4.mul (v128.or (i32x4.shl (local.tee $m (i32x4.mul (local.get $a1) (local.get $five))) (i32.const 7)) (i32x4.shr_u (local.get $m) (i32.const 25))) (local.get $nine)))
            (local.set $n2 (v128.xor (local.get $a2) (local.get $a0))) (local.set $n3 (v128.xor (local.get $a3) (local.get $a1)))
            (local.set $a2 (v128.xor (local.get $n2) (i32x4.shl (local.get $a1) (i32.const 9))))
            (local.set $a1 (v128.xor (local.get $a1) (local.get $n2))) (local.set $a0 (v128.xor (local.get $a0) (local.get $n3)))
            (local.set $a3 (v128.or (i32x4.shl (local.get $n3) (i32.const 11)) (i32x4.shr_u (local.get $n3) (i32.const 21))))
            (local.set $mInt (v128.xor (i32x4.ge_u (local.get $r) (v128.load (i32.const 5056))) (v128.load (i32.const 5072))))
            (local.set $mPrep (local.get $mInt))
            (if (local.get $anyPrep)
              (then
                (local.set $r (i32x4.mul (v128.or (i32x4.shl (local.tee $m (i32x4.mul (local.get $a1) (local.get $five))) (i32.const 7)) (i32x4.shr_u (local.get $m) (i32.const 25))) (local.get $nine)))
                (local.set $n2 (v128.xor (local.get $a2) (local.get $a0))) (local.set $n3 (v128.xor (local.get $a3) (local.get $a1)))
                (local.set $a2 (v128.xor (local.get $n2) (i32x4.shl (local.get $a1) (i32.const 9))))
                (local.set $a1 (v128.xor (local.get $a1) (local.get $n2))) (local.set $a0 (v128.xor (local.get $a0) (local.get $n3)))
                (local.set $a3 (v128.or (i32x4.shl (local.get $n3) (i32.const 11)) (i32x4.shr_u (local.get $n3) (i32.const 21))))
                ;; a hit moves the intended state to prepInto[intended] (Q0+s, as masks)
                (local.set $hit (v128.xor
                  (i32x4.ge_u (local.get $r) (v128.bitselect (v128.load (i32.const 5104)) (v128.load (i32.const 5088)) (local.get $mInt)))
                  (v128.bitselect (v128.load (i32.const 5136)) (v128.load (i32.const 5120)) (local.get $mInt))))
                (local.set $mPrep (v128.bitselect
                  (v128.bitselect (v128.load (i32.const 5328)) (v128.load (i32.const 5312)) (local.get $mInt))
                  (local.get $mInt) (local.get $hit)))))
            (local.set $mInit (local.get $mPrep))
            (if (local.get $anyMap)
              (then
                (local.set $r (i32x4.mul (v128.or (i32x4.shl (local.tee $m (i32x4.mul (local.get $a1) (local.get $five))) (i32.const 7)) (i32x4.shr_u (local.get $m) (i32.const 25))) (local.get $nine)))
                (local.set $n2 (v128.xor (local.get $a2) (local.get $a0))) (local.set $n3 (v128.xor (local.get $a3) (local.get $a1)))
                (local.set $a2 (v128.xor (local.get $n2) (i32x4.shl (local.get $a1) (i32.const 9))))
                (local.set $a1 (v128.xor (local.get $a1) (local.get $n2))) (local.set $a0 (v128.xor (local.get $a0) (local.get $n3)))
                (local.set $a3 (v128.or (i32x4.shl (local.get $n3) (i32.const 11)) (i32x4.shr_u (local.get $n3) (i32.const 21))))
                ;; Q2+s mapInto[s]
                (local.set $hit (v128.xor
                  (i32x4.ge_u (local.get $r) (v128.bitselect (v128.load (i32.const 5168)) (v128.load (i32.const 5152)) (local.get $mPrep)))
                  (v128.bitselect (v128.load (i32.const 5200)) (v128.load (i32.const 5184)) (local.get $mPrep))))
                (local.set $mInit (v128.bitselect
                  (v128.bitselect (v128.load (i32.const 5360)) (v128.load (i32.const 5344)) (local.get $mPrep))
                  (local.get $mPrep) (local.get $hit)))))
            ;; the jump's uniform: u ≥ noJumpCut[initial]; its time and the rest in $quadJump below
            (local.set $r (i32x4.mul (v128.or (i32x4.shl (local.tee $m (i32x4.mul (local.get $a1) (local.get $five))) (i32.const 7)) (i32x4.shr_u (local.get $m) (i32.const 25))) (local.get $nine)))
            (local.set $n2 (v128.xor (local.get $a2) (local.get $a0))) (local.set $n3 (v128.xor (local.get $a3) (local.get $a1)))
            (local.set $a2 (v128.xor (local.get $n2) (i32x4.shl (local.get $a1) (i32.const 9))))
            (local.set $a1 (v128.xor (local.get $a1) (local.get $n2))) (local.set $a0 (v128.xor (local.get $a0) (local.get $n3)))
            (local.set $a3 (v128.or (i32x4.shl (local.get $n3) (i32.const 11)) (i32x4.shr_u (local.get $n3) (i32.const 21))))
            (local.set $jump (v128.xor
              (i32x4.ge_u (local.get $r) (v128.bitselect (v128.load (i32.const 5232)) (v128.load (i32.const 5216)) (local.get $mInit)))
              (v128.bitselect (v128.load (i32.const 5264)) (v128.load (i32.const 5248)) (local.get $mInit))))
            (v128.store (local.get $h) (local.get $mInt)) (v128.store offset=16 (local.get $h) (local.get $mPrep))
            (v128.store offset=32 (local.get $h) (local.get $mInit))
            (v128.store offset=48 (local.get $h) (v128.const i32x4 0 0 0 0)) (v128.store offset=64 (local.get $h) (v128.const i32x4 0 0 0 0))
            ;; the lanes that drew a jump: its time, cause and path, in scalar code on memory
            (if (local.tee $bits (i32x4.bitmask (local.get $jump)))
              (then
                (v128.store (i32.const 4096) (local.get $a0)) (v128.store (i32.const 4112) (local.get $a1))
                (v128.store (i32.const 4128) (local.get $a2)) (v128.store (i32.const 4144) (local.get $a3))
                (v128.store (i32.const 4832) (local.get $r)) (v128.store (i32.const 4848) (local.get $mInit))
                (loop $each
                  (call $quadJump (i32.ctz (local.get $bits)) (local.get $h))
                  (br_if $each (local.tee $bits (i32.and (local.get $bits) (i32.sub (local.get $bits) (i32.const 1))))))
                (local.set $a0 (v128.load (i32.const 4096))) (local.set $a1 (v128.load (i32.const 4112)))
                (local.set $a2 (v128.load (i32.const 4128))) (local.set $a3 (v128.load (i32.const 4144)))))
            (local.set $h (i32.add (local.get $h) (i32.const 144)))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $history)))
        ;; normals: nCols a shot, 32 bytes each at 26624
        (local.set $h (i32.const 26624))
        (local.set $j (i32.const 0))
        (block $end_normal
          (loop $normal
            (br_if $end_normal (i32.ge_s (local.get $j) (i32.mul (local.get $count) (local.get $nCols))))
            (local.set $w (i32x4.mul (v128.or (i32x4.shl (local.tee $m (i32x4.mul (local.get $b1) (local.get $five))) (i32.const 7)) (i32x4.shr_u (local.get $m) (i32.const 25))) (local.get $nine)))
            (local.set $n2 (v128.xor (local.get $b2) (local.get $b0))) (local.set $n3 (v128.xor (local.get $b3) (local.get $b1)))
            (local.set $b2 (v128.xor (local.get $n2) (i32x4.shl (local.get $b1) (i32.const 9))))
            (local.set $b1 (v128.xor (local.get $b1) (local.get $n2))) (local.set $b0 (v128.xor (local.get $b0) (local.get $n3)))
            (local.set $b3 (v128.or (i32x4.shl (local.get $n3) (i32.const 11)) (i32x4.shr_u (local.get $n3) (i32.const 21))))
            (local.set $layer (v128.and (local.get $w) (local.get $c127)))
            (local.set $pos (i32x4.shr_s (local.get $w) (i32.const 7)))
            (local.set $l (i32.shl (i32x4.extract_lane 0 (local.get $layer)) (i32.const 2)))
            (local.set $ok (v128.load32_zero offset=64 (local.get $l)))
            (local.set $z0lo (v128.load64_zero offset=1024 (i32.shl (local.get $l) (i32.const 1))))
            (local.set $l (i32.shl (i32x4.extract_lane 1 (local.get $layer)) (i32.const 2)))
            (local.set $ok (v128.load32_lane offset=64 1 (local.get $l) (local.get $ok)))
            (local.set $z0lo (v128.load64_lane offset=1024 1 (i32.shl (local.get $l) (i32.const 1)) (local.get $z0lo)))
            (local.set $l (i32.shl (i32x4.extract_lane 2 (local.get $layer)) (i32.const 2)))
            (local.set $ok (v128.load32_lane offset=64 2 (local.get $l) (local.get $ok)))
            (local.set $z0hi (v128.load64_zero offset=1024 (i32.shl (local.get $l) (i32.const 1))))
            (local.set $l (i32.shl (i32x4.extract_lane 3 (local.get $layer)) (i32.const 2)))
            (local.set $ok (v128.load32_lane offset=64 3 (local.get $l) (local.get $ok)))
            (local.set $z0hi (v128.load64_lane offset=1024 1 (i32.shl (local.get $l) (i32.const 1)) (local.get $z0hi)))
            (local.set $z0lo (f64x2.mul (f64x2.convert_low_i32x4_s (local.get $pos)) (local.get $z0lo)))
            (local.set $z0hi (f64x2.mul (f64x2.convert_low_i32x4_s
              (i8x16.shuffle 8 9 10 11 12 13 14 15 8 9 10 11 12 13 14 15 (local.get $pos) (local.get $pos))) (local.get $z0hi)))
            (local.set $bits (i32.xor (i32x4.bitmask (i32x4.lt_s (i32x4.abs (local.get $pos)) (local.get $ok))) (i32.const 15)))
            (if (local.get $bits)
              (then
                (v128.store (i32.const 4160) (local.get $b0)) (v128.store (i32.const 4176) (local.get $b1))
                (v128.store (i32.const 4192) (local.get $b2)) (v128.store (i32.const 4208) (local.get $b3))
                (v128.store (i32.const 4960) (local.get $z0lo)) (v128.store (i32.const 4976) (local.get $z0hi))
                (v128.store (i32.const 4992) (local.get $pos)) (v128.store (i32.const 5008) (local.get $layer))
                (loop $each
                  (call $quadSlowNormal (i32.ctz (local.get $bits)))
                  (br_if $each (local.tee $bits (i32.and (local.get $bits) (i32.sub (local.get $bits) (i32.const 1))))))
                (local.set $b0 (v128.load (i32.const 4160))) (local.set $b1 (v128.load (i32.const 4176)))
                (local.set $b2 (v128.load (i32.const 4192))) (local.set $b3 (v128.load (i32.const 4208)))
                (local.set $z0lo (v128.load (i32.const 4960))) (local.set $z0hi (v128.load (i32.const 4976)))))
            (v128.store (local.get $h) (local.get $z0lo)) (v128.store offset=16 (local.get $h) (local.get $z0hi))
            (local.set $h (i32.add (local.get $h) (i32.const 32)))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $normal)))
        ;; values, decisions and counts; the values and clean masks 64 bytes a shot at 34816
        (local.set $h (i32.const 8192))
        (local.set $at (i32.const 26624))
        (local.set $v (i32.const 34816))
        (local.set $j (i32.const 0))
        (block $end_value
          (loop $value
            (br_if $end_value (i32.ge_s (local.get $j) (local.get $count)))
            (local.set $mInt (v128.load (local.get $h))) (local.set $mPrep (v128.load offset=16 (local.get $h)))
            (local.set $mInit (v128.load offset=32 (local.get $h))) (local.set $jcv (v128.load offset=48 (local.get $h)))
            (local.set $z0lo (v128.const i64x2 0 0)) (local.set $z0hi (v128.const i64x2 0 0))
            (local.set $z1lo (v128.const i64x2 0 0)) (local.set $z1hi (v128.const i64x2 0 0))
            (if (i32.gt_s (local.get $nCols) (i32.const 0))
              (then
                (local.set $z0lo (v128.load (local.get $at))) (local.set $z0hi (v128.load offset=16 (local.get $at)))
                (if (i32.gt_s (local.get $nCols) (i32.const 1))
                  (then (local.set $z1lo (v128.load offset=32 (local.get $at))) (local.set $z1hi (v128.load offset=48 (local.get $at)))))))
            ;; the values: fullI[initial] + cI0·z0 (P13+s, P17), and Q likewise (P15+s, P18, P19)
            (local.set $x (i64x2.extend_low_i32x4_s (local.get $mInit)))
            (local.set $d (i64x2.extend_high_i32x4_s (local.get $mInit)))
            (local.set $iLo (f64x2.add (v128.bitselect (v128.load64_splat (i32.const 3184)) (v128.load64_splat (i32.const 3176)) (local.get $x))
                                       (f64x2.mul (v128.load64_splat (i32.const 3208)) (local.get $z0lo))))
            (local.set $iHi (f64x2.add (v128.bitselect (v128.load64_splat (i32.const 3184)) (v128.load64_splat (i32.const 3176)) (local.get $d))
                                       (f64x2.mul (v128.load64_splat (i32.const 3208)) (local.get $z0hi))))
            (local.set $qLo (v128.const i64x2 0 0)) (local.set $qHi (v128.const i64x2 0 0))
            (if (local.get $hasQ)
              (then
                (local.set $qLo (f64x2.add (v128.bitselect (v128.load64_splat (i32.const 3200)) (v128.load64_splat (i32.const 3192)) (local.get $x))
                                           (f64x2.mul (v128.load64_splat (i32.const 3216)) (local.get $z0lo))))
                (local.set $qHi (f64x2.add (v128.bitselect (v128.load64_splat (i32.const 3200)) (v128.load64_splat (i32.const 3192)) (local.get $d))
                                           (f64x2.mul (v128.load64_splat (i32.const 3216)) (local.get $z0hi))))
                (if (local.get $qTwoTerms)
                  (then
                    (local.set $qLo (f64x2.add (local.get $qLo) (f64x2.mul (v128.load64_splat (i32.const 3224)) (local.get $z1lo))))
                    (local.set $qHi (f64x2.add (local.get $qHi) (f64x2.mul (v128.load64_splat (i32.const 3224)) (local.get $z1hi))))))))
            ;; a jumped lane's values: + (path − no-jump value), from the history pass
            (local.set $jump (v128.load offset=64 (local.get $h)))
            (if (v128.any_true (local.get $jump))
              (then
                (local.set $x (i64x2.extend_low_i32x4_s (local.get $jump)))
                (local.set $d (i64x2.extend_high_i32x4_s (local.get $jump)))
                (local.set $iLo (v128.bitselect (f64x2.add (local.get $iLo) (v128.load offset=80 (local.get $h))) (local.get $iLo) (local.get $x)))
                (local.set $iHi (v128.bitselect (f64x2.add (local.get $iHi) (v128.load offset=96 (local.get $h))) (local.get $iHi) (local.get $d)))
                (if (local.get $hasQ)
                  (then
                    (local.set $qLo (v128.bitselect (f64x2.add (local.get $qLo) (v128.load offset=112 (local.get $h))) (local.get $qLo) (local.get $x)))
                    (local.set $qHi (v128.bitselect (f64x2.add (local.get $qHi) (v128.load offset=128 (local.get $h))) (local.get $qHi) (local.get $d)))))))
            ;; the projection and the decision (P20 cos, P21 sin, P22 threshold)
            (local.set $vLo (f64x2.add (f64x2.mul (local.get $iLo) (v128.load64_splat (i32.const 3232)))
                                       (f64x2.mul (local.get $qLo) (v128.load64_splat (i32.const 3240)))))
            (local.set $vHi (f64x2.add (f64x2.mul (local.get $iHi) (v128.load64_splat (i32.const 3232)))
                                       (f64x2.mul (local.get $qHi) (v128.load64_splat (i32.const 3240)))))
            (local.set $x (v128.load64_splat (i32.const 3248)))
            (if (local.get $flip)
              (then (local.set $out (i8x16.shuffle 0 1 2 3 8 9 10 11 16 17 18 19 24 25 26 27
                      (f64x2.lt (local.get $vLo) (local.get $x)) (f64x2.lt (local.get $vHi) (local.get $x)))))
              (else (local.set $out (i8x16.shuffle 0 1 2 3 8 9 10 11 16 17 18 19 24 25 26 27
                      (f64x2.gt (local.get $vLo) (local.get $x)) (f64x2.gt (local.get $vHi) (local.get $x))))))
            (local.set $sumState (i32x4.sub (local.get $sumState) (local.get $mInt)))
            (local.set $sumOutcome (i32x4.sub (local.get $sumOutcome) (local.get $out)))
            (local.set $sumBoth (i32x4.sub (local.get $sumBoth) (v128.and (local.get $mInt) (local.get $out))))
            ;; wrong shots (rare): their causes in scalar code
            (local.set $wrong (v128.xor (local.get $out)
              (v128.bitselect (v128.load (i32.const 5296)) (v128.load (i32.const 5280)) (local.get $mInt))))
            (if (local.tee $bits (i32x4.bitmask (local.get $wrong)))
              (then
                (v128.store (i32.const 4816) (local.get $jcv)) (v128.store (i32.const 4848) (local.get $mInit))
                (v128.store (i32.const 4864) (local.get $mInt)) (v128.store (i32.const 4880) (local.get $mPrep))
                (loop $each
                  (call $quadCause (i32.ctz (local.get $bits)))
                  (br_if $each (local.tee $bits (i32.and (local.get $bits) (i32.sub (local.get $bits) (i32.const 1))))))))
            ;; the ambiguous band (P23): discarded[s] at result 21+s, discardedWrong[s] at 23+s
            (if (local.get $hasBand)
              (then
                (local.set $d (v128.load64_splat (i32.const 3256)))
                (local.set $ambiguous (i8x16.shuffle 0 1 2 3 8 9 10 11 16 17 18 19 24 25 26 27
                  (f64x2.lt (f64x2.abs (f64x2.sub (local.get $vLo) (local.get $x))) (local.get $d))
                  (f64x2.lt (f64x2.abs (f64x2.sub (local.get $vHi) (local.get $x))) (local.get $d))))
                (v128.store (i32.const 4560) (i32x4.sub (v128.load (i32.const 4560)) (v128.andnot (local.get $ambiguous) (local.get $mInt))))
                (v128.store (i32.const 4576) (i32x4.sub (v128.load (i32.const 4576)) (v128.and (local.get $ambiguous) (local.get $mInt))))
                (local.set $ambiguous (v128.and (local.get $ambiguous) (local.get $wrong)))
                (v128.store (i32.const 4592) (i32x4.sub (v128.load (i32.const 4592)) (v128.andnot (local.get $ambiguous) (local.get $mInt))))
                (v128.store (i32.const 4608) (i32x4.sub (v128.load (i32.const 4608)) (v128.and (local.get $ambiguous) (local.get $mInt))))))
            ;; the clean shots per state, kept with the values for the sums
            (local.set $clean (v128.and (v128.and (i32x4.eq (local.get $mPrep) (local.get $mInt)) (i32x4.eq (local.get $mInit) (local.get $mInt)))
                                        (i32x4.eq (local.get $jcv) (v128.const i32x4 0 0 0 0))))
            (local.set $w1 (v128.and (local.get $clean) (local.get $mInt)))
            (local.set $w0 (v128.andnot (local.get $clean) (local.get $mInt)))
            (v128.store (local.get $v) (local.get $vLo)) (v128.store offset=16 (local.get $v) (local.get $vHi))
            (v128.store offset=32 (local.get $v) (local.get $w0)) (v128.store offset=48 (local.get $v) (local.get $w1))
            (local.set $h (i32.add (local.get $h) (i32.const 144)))
            (local.set $at (i32.add (local.get $at) (i32.shl (local.get $nCols) (i32.const 5))))
            (local.set $v (i32.add (local.get $v) (i32.const 64)))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $value)))
        ;; the shifted sums of the clean values per state, in shot order
        (local.set $v (i32.const 34816))
        (local.set $j (i32.const 0))
        (block $end_sum
          (loop $sum
            (br_if $end_sum (i32.ge_s (local.get $j) (local.get $count)))
            (local.set $vLo (v128.load (local.get $v))) (local.set $vHi (v128.load offset=16 (local.get $v)))
            (local.set $w0 (v128.load offset=32 (local.get $v))) (local.set $w1 (v128.load offset=48 (local.get $v)))
            (if (local.get $shifting)
              (then
                ;; a lane's shift is its state's first clean value
                (local.set $x (v128.and (i32x4.eq (local.get $n0) (v128.const i32x4 0 0 0 0)) (local.get $w0)))
                (local.set $sh0lo (v128.bitselect (local.get $vLo) (local.get $sh0lo) (i64x2.extend_low_i32x4_s (local.get $x))))
                (local.set $sh0hi (v128.bitselect (local.get $vHi) (local.get $sh0hi) (i64x2.extend_high_i32x4_s (local.get $x))))
                (local.set $x (v128.and (i32x4.eq (local.get $n1) (v128.const i32x4 0 0 0 0)) (local.get $w1)))
                (local.set $sh1lo (v128.bitselect (local.get $vLo) (local.get $sh1lo) (i64x2.extend_low_i32x4_s (local.get $x))))
                (local.set $sh1hi (v128.bitselect (local.get $vHi) (local.get $sh1hi) (i64x2.extend_high_i32x4_s (local.get $x))))))
            ;; e = w·d with w as 0.0 or 1.0 (the mask's bits and those of 1.0)
                    (local.set $d (f64x2.sub (local.get $vLo) (local.get $sh0lo)))
            (local.set $e (f64x2.mul (v128.and (i64x2.extend_low_i32x4_s (local.get $w0)) (local.get $one)) (local.get $d)))
            (local.set $s10lo (f64x2.add (local.get $s10lo) (local.get $e)))
            (local.set $s20lo (f64x2.add (local.get $s20lo) (f64x2.mul (local.get $e) (local.get $d))))
            (local.set $d (f64x2.sub (local.get $vHi) (local.get $sh0hi)))
            (local.set $e (f64x2.mul (v128.and (i64x2.extend_high_i32x4_s (local.get $w0)) (local.get $one)) (local.get $d)))
            (local.set $s10hi (f64x2.add (local.get $s10hi) (local.get $e)))
            (local.set $s20hi (f64x2.add (local.get $s20hi) (f64x2.mul (local.get $e) (local.get $d))))
            (local.set $d (f64x2.sub (local.get $vLo) (local.get $sh1lo)))
            (local.set $e (f64x2.mul (v128.and (i64x2.extend_low_i32x4_s (local.get $w1)) (local.get $one)) (local.get $d)))
            (local.set $s11lo (f64x2.add (local.get $s11lo) (local.get $e)))
            (local.set $s21lo (f64x2.add (local.get $s21lo) (f64x2.mul (local.get $e) (local.get $d))))
            (local.set $d (f64x2.sub (local.get $vHi) (local.get $sh1hi)))
            (local.set $e (f64x2.mul (v128.and (i64x2.extend_high_i32x4_s (local.get $w1)) (local.get $one)) (local.get $d)))
            (local.set $s11hi (f64x2.add (local.get $s11hi) (local.get $e)))
            (local.set $s21hi (f64x2.add (local.get $s21hi) (f64x2.mul (local.get $e) (local.get $d))))
            (local.set $n0 (i32x4.sub (local.get $n0) (local.get $w0)))
            (local.set $n1 (i32x4.sub (local.get $n1) (local.get $w1)))
            (if (local.get $shifting)
              (then (local.set $shifting (i32.eqz (i32.and (i32x4.all_true (local.get $n0)) (i32x4.all_true (local.get $n1)))))))
            (local.set $v (i32.add (local.get $v) (i32.const 64)))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $sum)))
        (local.set $i (i32.add (local.get $i) (local.get $count)))
        (br $chunk)))
    (v128.store (i32.const 4096) (local.get $a0)) (v128.store (i32.const 4112) (local.get $a1))
    (v128.store (i32.const 4128) (local.get $a2)) (v128.store (i32.const 4144) (local.get $a3))
    (v128.store (i32.const 4160) (local.get $b0)) (v128.store (i32.const 4176) (local.get $b1))
    (v128.store (i32.const 4192) (local.get $b2)) (v128.store (i32.const 4208) (local.get $b3))
    (v128.store (i32.const 4224) (local.get $sumState)) (v128.store (i32.const 4240) (local.get $sumOutcome))
    (v128.store (i32.const 4256) (local.get $sumBoth)) (v128.store (i32.const 4272) (local.get $n0))
    (v128.store (i32.const 4288) (local.get $n1))
    (v128.store (i32.const 4624) (local.get $s10lo)) (v128.store (i32.const 4640) (local.get $s10hi))
    (v128.store (i32.const 4656) (local.get $s11lo)) (v128.store (i32.const 4672) (local.get $s11hi))
    (v128.store (i32.const 4688) (local.get $s20lo)) (v128.store (i32.const 4704) (local.get $s20hi))
    (v128.store (i32.const 4720) (local.get $s21lo)) (v128.store (i32.const 4736) (local.get $s21hi))
    (v128.store (i32.const 4752) (local.get $sh0lo)) (v128.store (i32.const 4768) (local.get $sh0hi))
    (v128.store (i32.const 4784) (local.get $sh1lo)) (v128.store (i32.const 4800) (local.get $sh1hi)))
)
