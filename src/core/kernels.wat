;; Colspace compute kernels in WebAssembly with 128-bit SIMD (two doubles per operation).
;;
;; Each kernel is the same arithmetic as its JavaScript twin in refine.ts, written for two rows at
;; a time; per-row results (the compensated residual s + comp) are bit-for-bit those of the
;; JavaScript code, and sums over rows are kept in two lanes (even and odd rows) that are joined
;; with an error-free TwoSum at the end. Pointers are byte offsets into the module's memory and
;; every array is 16-byte aligned (the caller, kernels.ts, lays them out).
;;
;; Build: `npm run build:wasm` (scripts/build-wasm.mjs, with the wabt package) writes
;; src/core/kernels.wasm.ts; test/kernels.test.ts checks that file against this source.
(module
  ;; The memory is given by the caller: one per factorization, sized once (it never grows, so
  ;; JavaScript views of it stay valid).
  (import "env" "memory" (memory 1))

  ;; fused(col, lo, scale, alpha, s, comp, vh, vl, m, c0) -> c0 + Σ a_i·(vh_i + vl_i)
  ;; One pass over column a = col·scale (+ lo, when lo ≠ 0) doing both halves of a refinement
  ;; residual, exactly as fusedColumnPass in refine.ts:
  ;;   (s, comp) += a·alpha   (TwoSum on s, TwoProduct error and TwoSum error into comp)
  ;;   returns c0 + aᵀv, compensated (Dot2), with v = vh + vl already split into Dekker halves.
  (func (export "fused")
    (param $col i32) (param $lo i32) (param $scale f64) (param $alpha f64)
    (param $s i32) (param $comp i32) (param $vh i32) (param $vl i32) (param $m i32) (param $c0 f64)
    (result f64)
    (local $i i32) (local $off i32) (local $end i32)
    (local $sc v128) (local $al v128) (local $xh v128) (local $xl v128) (local $split v128)
    (local $a v128) (local $t v128) (local $ah v128) (local $alo v128) (local $p v128)
    (local $si v128) (local $sn v128) (local $bb v128)
    (local $bh v128) (local $bl v128) (local $q v128) (local $dn v128) (local $cc v128)
    (local $ds v128) (local $de v128) (local $l v128)
    (local $x f64) (local $y f64) (local $e f64) (local $ta f64)
    (local.set $sc (f64x2.splat (local.get $scale)))
    (local.set $al (f64x2.splat (local.get $alpha)))
    (local.set $split (f64x2.splat (f64.const 134217729)))
    ;; Dekker halves of alpha
    (local.set $ta (f64.mul (f64.const 134217729) (local.get $alpha)))
    (local.set $x (f64.sub (local.get $ta) (f64.sub (local.get $ta) (local.get $alpha))))
    (local.set $xh (f64x2.splat (local.get $x)))
    (local.set $xl (f64x2.splat (f64.sub (local.get $alpha) (local.get $x))))
    (local.set $ds (f64x2.replace_lane 0 (f64x2.splat (f64.const 0)) (local.get $c0)))
    (local.set $de (f64x2.splat (f64.const 0)))
    (local.set $end (i32.and (local.get $m) (i32.const -2)))
    (block $done
      (loop $rows
        (br_if $done (i32.ge_u (local.get $i) (local.get $end)))
        (local.set $off (i32.shl (local.get $i) (i32.const 3)))
        (local.set $a (f64x2.mul (v128.load (i32.add (local.get $col) (local.get $off))) (local.get $sc)))
        (local.set $t (f64x2.mul (local.get $split) (local.get $a)))
        (local.set $ah (f64x2.sub (local.get $t) (f64x2.sub (local.get $t) (local.get $a))))
        (local.set $alo (f64x2.sub (local.get $a) (local.get $ah)))
        ;; (s, comp) += a·alpha
        (local.set $p (f64x2.mul (local.get $a) (local.get $al)))
        (local.set $si (v128.load (i32.add (local.get $s) (local.get $off))))
        (local.set $sn (f64x2.add (local.get $si) (local.get $p)))
        (local.set $bb (f64x2.sub (local.get $sn) (local.get $si)))
        (v128.store (i32.add (local.get $s) (local.get $off)) (local.get $sn))
        (v128.store (i32.add (local.get $comp) (local.get $off))
          (f64x2.add
            (v128.load (i32.add (local.get $comp) (local.get $off)))
            (f64x2.add
              (f64x2.add
                (f64x2.sub (local.get $si) (f64x2.sub (local.get $sn) (local.get $bb)))
                (f64x2.sub (local.get $p) (local.get $bb)))
              (f64x2.add
                (f64x2.add
                  (f64x2.add
                    (f64x2.sub (f64x2.mul (local.get $ah) (local.get $xh)) (local.get $p))
                    (f64x2.mul (local.get $ah) (local.get $xl)))
                  (f64x2.mul (local.get $alo) (local.get $xh)))
                (f64x2.mul (local.get $alo) (local.get $xl))))))
        ;; (ds, de) += a·v
        (local.set $bh (v128.load (i32.add (local.get $vh) (local.get $off))))
        (local.set $bl (v128.load (i32.add (local.get $vl) (local.get $off))))
        (local.set $q (f64x2.mul (local.get $a) (f64x2.add (local.get $bh) (local.get $bl))))
        (local.set $dn (f64x2.add (local.get $ds) (local.get $q)))
        (local.set $cc (f64x2.sub (local.get $dn) (local.get $ds)))
        (local.set $de
          (f64x2.add (local.get $de)
            (f64x2.add
              (f64x2.add
                (f64x2.sub (local.get $ds) (f64x2.sub (local.get $dn) (local.get $cc)))
                (f64x2.sub (local.get $q) (local.get $cc)))
              (f64x2.add
                (f64x2.add
                  (f64x2.add
                    (f64x2.sub (f64x2.mul (local.get $ah) (local.get $bh)) (local.get $q))
                    (f64x2.mul (local.get $ah) (local.get $bl)))
                  (f64x2.mul (local.get $alo) (local.get $bh)))
                (f64x2.mul (local.get $alo) (local.get $bl))))))
        (local.set $ds (local.get $dn))
        (local.set $i (i32.add (local.get $i) (i32.const 2)))
        (br $rows)))
    ;; odd last row: the same formulas on one lane (the other lane's inputs are zero)
    (if (i32.lt_u (local.get $end) (local.get $m))
      (then
        (local.set $off (i32.shl (local.get $end) (i32.const 3)))
        (local.set $a (f64x2.mul (v128.load64_zero (i32.add (local.get $col) (local.get $off))) (local.get $sc)))
        (local.set $t (f64x2.mul (local.get $split) (local.get $a)))
        (local.set $ah (f64x2.sub (local.get $t) (f64x2.sub (local.get $t) (local.get $a))))
        (local.set $alo (f64x2.sub (local.get $a) (local.get $ah)))
        (local.set $p (f64x2.mul (local.get $a) (local.get $al)))
        (local.set $si (v128.load64_zero (i32.add (local.get $s) (local.get $off))))
        (local.set $sn (f64x2.add (local.get $si) (local.get $p)))
        (local.set $bb (f64x2.sub (local.get $sn) (local.get $si)))
        (f64.store (i32.add (local.get $s) (local.get $off)) (f64x2.extract_lane 0 (local.get $sn)))
        (f64.store (i32.add (local.get $comp) (local.get $off))
          (f64x2.extract_lane 0
            (f64x2.add
              (v128.load64_zero (i32.add (local.get $comp) (local.get $off)))
              (f64x2.add
                (f64x2.add
                  (f64x2.sub (local.get $si) (f64x2.sub (local.get $sn) (local.get $bb)))
                  (f64x2.sub (local.get $p) (local.get $bb)))
                (f64x2.add
                  (f64x2.add
                    (f64x2.add
                      (f64x2.sub (f64x2.mul (local.get $ah) (local.get $xh)) (local.get $p))
                      (f64x2.mul (local.get $ah) (local.get $xl)))
                    (f64x2.mul (local.get $alo) (local.get $xh)))
                  (f64x2.mul (local.get $alo) (local.get $xl)))))))
        (local.set $bh (v128.load64_zero (i32.add (local.get $vh) (local.get $off))))
        (local.set $bl (v128.load64_zero (i32.add (local.get $vl) (local.get $off))))
        (local.set $q (f64x2.mul (local.get $a) (f64x2.add (local.get $bh) (local.get $bl))))
        (local.set $dn (f64x2.add (local.get $ds) (local.get $q)))
        (local.set $cc (f64x2.sub (local.get $dn) (local.get $ds)))
        (local.set $de
          (f64x2.add (local.get $de)
            (f64x2.add
              (f64x2.add
                (f64x2.sub (local.get $ds) (f64x2.sub (local.get $dn) (local.get $cc)))
                (f64x2.sub (local.get $q) (local.get $cc)))
              (f64x2.add
                (f64x2.add
                  (f64x2.add
                    (f64x2.sub (f64x2.mul (local.get $ah) (local.get $bh)) (local.get $q))
                    (f64x2.mul (local.get $ah) (local.get $bl)))
                  (f64x2.mul (local.get $alo) (local.get $bh)))
                (f64x2.mul (local.get $alo) (local.get $bl))))))
        (local.set $ds (local.get $dn))))
    ;; low parts: products 2^-53 smaller, in working precision (as in refine.ts)
    (if (local.get $lo)
      (then
        (local.set $i (i32.const 0))
        (block $ldone
          (loop $lrows
            (br_if $ldone (i32.ge_u (local.get $i) (local.get $m)))
            (local.set $off (i32.shl (local.get $i) (i32.const 3)))
            (local.set $x (f64.load (i32.add (local.get $lo) (local.get $off))))
            (f64.store (i32.add (local.get $comp) (local.get $off))
              (f64.add (f64.load (i32.add (local.get $comp) (local.get $off))) (f64.mul (local.get $x) (local.get $alpha))))
            (local.set $e (f64.add (local.get $e)
              (f64.mul (local.get $x)
                (f64.add (f64.load (i32.add (local.get $vh) (local.get $off))) (f64.load (i32.add (local.get $vl) (local.get $off)))))))
            (local.set $i (i32.add (local.get $i) (i32.const 1)))
            (br $lrows)))))
    ;; join the lanes: TwoSum of the two running sums, then all the error terms
    (local.set $x (f64x2.extract_lane 0 (local.get $ds)))
    (local.set $y (f64x2.extract_lane 1 (local.get $ds)))
    (local.set $ta (f64.add (local.get $x) (local.get $y)))
    (local.set $t (f64x2.splat (f64.sub (local.get $ta) (local.get $x)))) ;; bb
    (f64.add (local.get $ta)
      (f64.add
        (f64.add
          (f64.sub (local.get $x) (f64.sub (local.get $ta) (f64x2.extract_lane 0 (local.get $t))))
          (f64.sub (local.get $y) (f64x2.extract_lane 0 (local.get $t))))
        (f64.add
          (f64.add (f64x2.extract_lane 0 (local.get $de)) (f64x2.extract_lane 1 (local.get $de)))
          (local.get $e))))
  )

  ;; group(a, v0, v1, v2, v3, r0, m, t, c, transpose)
  ;; Apply the block reflector I − V T Vᵀ of four Householder vectors to the column c (byte
  ;; offsets; v0…v3 are the byte offsets of the four vectors' columns, r0 the row of the first
  ;; vector's implicit 1, t the 4 × 4 upper triangular T, column-major): c ← c − V·Tᵀ·(Vᵀc) when
  ;; `transpose`, else c ← c − V·T·(Vᵀc). Same as applyGroup in qr.ts, with the long loops over
  ;; rows two at a time.
  (func (export "group")
    (param $v0 i32) (param $v1 i32) (param $v2 i32) (param $v3 i32) (param $r0 i32) (param $m i32)
    (param $t i32) (param $c i32) (param $transpose i32)
    (local $i i32) (local $o i32) (local $end i32)
    (local $c0 f64) (local $c1 f64) (local $c2 f64) (local $c3 f64)
    (local $w0 f64) (local $w1 f64) (local $w2 f64) (local $w3 f64)
    (local $u0 f64) (local $u1 f64) (local $u2 f64) (local $u3 f64)
    (local $W0 v128) (local $W1 v128) (local $W2 v128) (local $W3 v128) (local $x v128)
    (local $o0 i32)
    (local.set $o0 (i32.shl (local.get $r0) (i32.const 3)))
    ;; head rows r0 … r0+3 (V is unit lower triangular there)
    (local.set $c0 (f64.load (i32.add (local.get $c) (local.get $o0))))
    (local.set $c1 (f64.load offset=8 (i32.add (local.get $c) (local.get $o0))))
    (local.set $c2 (f64.load offset=16 (i32.add (local.get $c) (local.get $o0))))
    (local.set $c3 (f64.load offset=24 (i32.add (local.get $c) (local.get $o0))))
    (local.set $w0 (f64.add (f64.add (f64.add (local.get $c0)
      (f64.mul (f64.load offset=8 (i32.add (local.get $v0) (local.get $o0))) (local.get $c1)))
      (f64.mul (f64.load offset=16 (i32.add (local.get $v0) (local.get $o0))) (local.get $c2)))
      (f64.mul (f64.load offset=24 (i32.add (local.get $v0) (local.get $o0))) (local.get $c3))))
    (local.set $w1 (f64.add (f64.add (local.get $c1)
      (f64.mul (f64.load offset=16 (i32.add (local.get $v1) (local.get $o0))) (local.get $c2)))
      (f64.mul (f64.load offset=24 (i32.add (local.get $v1) (local.get $o0))) (local.get $c3))))
    (local.set $w2 (f64.add (local.get $c2)
      (f64.mul (f64.load offset=24 (i32.add (local.get $v2) (local.get $o0))) (local.get $c3))))
    (local.set $w3 (local.get $c3))
    ;; tail rows r0+4 … m−1: W = Vᵀc in two lanes
    (local.set $i (i32.add (local.get $r0) (i32.const 4)))
    (local.set $end (i32.sub (local.get $m) (i32.const 1)))
    (block $d1 (loop $l1
      (br_if $d1 (i32.ge_s (local.get $i) (local.get $end)))
      (local.set $o (i32.shl (local.get $i) (i32.const 3)))
      (local.set $x (v128.load (i32.add (local.get $c) (local.get $o))))
      (local.set $W0 (f64x2.add (local.get $W0) (f64x2.mul (v128.load (i32.add (local.get $v0) (local.get $o))) (local.get $x))))
      (local.set $W1 (f64x2.add (local.get $W1) (f64x2.mul (v128.load (i32.add (local.get $v1) (local.get $o))) (local.get $x))))
      (local.set $W2 (f64x2.add (local.get $W2) (f64x2.mul (v128.load (i32.add (local.get $v2) (local.get $o))) (local.get $x))))
      (local.set $W3 (f64x2.add (local.get $W3) (f64x2.mul (v128.load (i32.add (local.get $v3) (local.get $o))) (local.get $x))))
      (local.set $i (i32.add (local.get $i) (i32.const 2)))
      (br $l1)))
    (if (i32.lt_s (local.get $i) (local.get $m))
      (then
        (local.set $o (i32.shl (local.get $i) (i32.const 3)))
        (local.set $x (v128.load64_zero (i32.add (local.get $c) (local.get $o))))
        (local.set $W0 (f64x2.add (local.get $W0) (f64x2.mul (v128.load64_zero (i32.add (local.get $v0) (local.get $o))) (local.get $x))))
        (local.set $W1 (f64x2.add (local.get $W1) (f64x2.mul (v128.load64_zero (i32.add (local.get $v1) (local.get $o))) (local.get $x))))
        (local.set $W2 (f64x2.add (local.get $W2) (f64x2.mul (v128.load64_zero (i32.add (local.get $v2) (local.get $o))) (local.get $x))))
        (local.set $W3 (f64x2.add (local.get $W3) (f64x2.mul (v128.load64_zero (i32.add (local.get $v3) (local.get $o))) (local.get $x))))))
    (local.set $w0 (f64.add (local.get $w0) (f64.add (f64x2.extract_lane 0 (local.get $W0)) (f64x2.extract_lane 1 (local.get $W0)))))
    (local.set $w1 (f64.add (local.get $w1) (f64.add (f64x2.extract_lane 0 (local.get $W1)) (f64x2.extract_lane 1 (local.get $W1)))))
    (local.set $w2 (f64.add (local.get $w2) (f64.add (f64x2.extract_lane 0 (local.get $W2)) (f64x2.extract_lane 1 (local.get $W2)))))
    (local.set $w3 (f64.add (local.get $w3) (f64.add (f64x2.extract_lane 0 (local.get $W3)) (f64x2.extract_lane 1 (local.get $W3)))))
    ;; u = Tᵀw (transpose) or T w; T(row, col) at t + 8·(4·col + row)
    (if (local.get $transpose)
      (then
        (local.set $u0 (f64.mul (f64.load offset=0 (local.get $t)) (local.get $w0)))
        (local.set $u1 (f64.add (f64.mul (f64.load offset=32 (local.get $t)) (local.get $w0))
                                (f64.mul (f64.load offset=40 (local.get $t)) (local.get $w1))))
        (local.set $u2 (f64.add (f64.add (f64.mul (f64.load offset=64 (local.get $t)) (local.get $w0))
                                         (f64.mul (f64.load offset=72 (local.get $t)) (local.get $w1)))
                                (f64.mul (f64.load offset=80 (local.get $t)) (local.get $w2))))
        (local.set $u3 (f64.add (f64.add (f64.add (f64.mul (f64.load offset=96 (local.get $t)) (local.get $w0))
                                                  (f64.mul (f64.load offset=104 (local.get $t)) (local.get $w1)))
                                         (f64.mul (f64.load offset=112 (local.get $t)) (local.get $w2)))
                                (f64.mul (f64.load offset=120 (local.get $t)) (local.get $w3)))))
      (else
        (local.set $u0 (f64.add (f64.add (f64.add (f64.mul (f64.load offset=0 (local.get $t)) (local.get $w0))
                                                  (f64.mul (f64.load offset=32 (local.get $t)) (local.get $w1)))
                                         (f64.mul (f64.load offset=64 (local.get $t)) (local.get $w2)))
                                (f64.mul (f64.load offset=96 (local.get $t)) (local.get $w3))))
        (local.set $u1 (f64.add (f64.add (f64.mul (f64.load offset=40 (local.get $t)) (local.get $w1))
                                         (f64.mul (f64.load offset=72 (local.get $t)) (local.get $w2)))
                                (f64.mul (f64.load offset=104 (local.get $t)) (local.get $w3))))
        (local.set $u2 (f64.add (f64.mul (f64.load offset=80 (local.get $t)) (local.get $w2))
                                (f64.mul (f64.load offset=112 (local.get $t)) (local.get $w3))))
        (local.set $u3 (f64.mul (f64.load offset=120 (local.get $t)) (local.get $w3)))))
    ;; c −= V u: head rows, then the tail two at a time
    (f64.store (i32.add (local.get $c) (local.get $o0)) (f64.sub (local.get $c0) (local.get $u0)))
    (f64.store offset=8 (i32.add (local.get $c) (local.get $o0))
      (f64.sub (f64.sub (local.get $c1) (f64.mul (f64.load offset=8 (i32.add (local.get $v0) (local.get $o0))) (local.get $u0))) (local.get $u1)))
    (f64.store offset=16 (i32.add (local.get $c) (local.get $o0))
      (f64.sub (f64.sub (f64.sub (local.get $c2)
        (f64.mul (f64.load offset=16 (i32.add (local.get $v0) (local.get $o0))) (local.get $u0)))
        (f64.mul (f64.load offset=16 (i32.add (local.get $v1) (local.get $o0))) (local.get $u1))) (local.get $u2)))
    (f64.store offset=24 (i32.add (local.get $c) (local.get $o0))
      (f64.sub (f64.sub (f64.sub (f64.sub (local.get $c3)
        (f64.mul (f64.load offset=24 (i32.add (local.get $v0) (local.get $o0))) (local.get $u0)))
        (f64.mul (f64.load offset=24 (i32.add (local.get $v1) (local.get $o0))) (local.get $u1)))
        (f64.mul (f64.load offset=24 (i32.add (local.get $v2) (local.get $o0))) (local.get $u2))) (local.get $u3)))
    (local.set $W0 (f64x2.splat (local.get $u0)))
    (local.set $W1 (f64x2.splat (local.get $u1)))
    (local.set $W2 (f64x2.splat (local.get $u2)))
    (local.set $W3 (f64x2.splat (local.get $u3)))
    (local.set $i (i32.add (local.get $r0) (i32.const 4)))
    (block $d2 (loop $l2
      (br_if $d2 (i32.ge_s (local.get $i) (local.get $end)))
      (local.set $o (i32.shl (local.get $i) (i32.const 3)))
      (v128.store (i32.add (local.get $c) (local.get $o))
        (f64x2.sub (v128.load (i32.add (local.get $c) (local.get $o)))
          (f64x2.add (f64x2.add (f64x2.add
            (f64x2.mul (v128.load (i32.add (local.get $v0) (local.get $o))) (local.get $W0))
            (f64x2.mul (v128.load (i32.add (local.get $v1) (local.get $o))) (local.get $W1)))
            (f64x2.mul (v128.load (i32.add (local.get $v2) (local.get $o))) (local.get $W2)))
            (f64x2.mul (v128.load (i32.add (local.get $v3) (local.get $o))) (local.get $W3)))))
      (local.set $i (i32.add (local.get $i) (i32.const 2)))
      (br $l2)))
    (if (i32.lt_s (local.get $i) (local.get $m))
      (then
        (local.set $o (i32.shl (local.get $i) (i32.const 3)))
        (f64.store (i32.add (local.get $c) (local.get $o))
          (f64.sub (f64.load (i32.add (local.get $c) (local.get $o)))
            (f64.add (f64.add (f64.add
              (f64.mul (f64.load (i32.add (local.get $v0) (local.get $o))) (local.get $u0))
              (f64.mul (f64.load (i32.add (local.get $v1) (local.get $o))) (local.get $u1)))
              (f64.mul (f64.load (i32.add (local.get $v2) (local.get $o))) (local.get $u2)))
              (f64.mul (f64.load (i32.add (local.get $v3) (local.get $o))) (local.get $u3)))))))
  )
)
