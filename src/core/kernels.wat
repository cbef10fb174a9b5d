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

  ;; gram(panel, lo, nk, rows, ld, scales, v, h, l, w, s1h, s1l, s2h, s2l)
  ;; The fast Gram matrix of gram.ts over one panel of rows: column k of the panel is
  ;; panel[k·ld + i]·scales[k] (+ lo[k·ld + i] when lo ≠ 0), i < rows. Rows are taken in blocks of
  ;; 32, each value split exactly as h + l on the block's 24-bit grid, and the sums
  ;; Σ h h' (exact) and Σ (a l' + l h') (+ low parts) of every pair a ≤ b are added into the
  ;; double-double accumulators (s1h, s1l) and (s2h, s2l), nk × nk column-major, at (a, b).
  ;; v, h, l, w are block buffers of 32·nk doubles. Same arithmetic as splitGram, rows two at a
  ;; time (the exact sums are identical; the cross sums round in another order, within the bound).
  (func (export "gram")
    (param $panel i32) (param $lo i32) (param $nk i32) (param $rows i32) (param $ld i32)
    (param $scales i32) (param $v i32) (param $h i32) (param $l i32) (param $w i32)
    (param $s1h i32) (param $s1l i32) (param $s2h i32) (param $s2l i32)
    (local $i0 i32) (local $nb i32) (local $k i32) (local $i i32) (local $src i32) (local $o i32)
    (local $a i32) (local $b i32) (local $a1 i32) (local $b1 i32)
    (local $oa i32) (local $oa1 i32) (local $ob i32) (local $ob1 i32)
    (local $sc f64) (local $x f64) (local $mx f64) (local $sigma f64) (local $hi f64) (local $g i32)
    (local $E00 v128) (local $E01 v128) (local $E10 v128) (local $E11 v128)
    (local $C00 v128) (local $C01 v128) (local $C10 v128) (local $C11 v128)
    (local $va v128) (local $ha v128) (local $la v128) (local $va1 v128) (local $ha1 v128) (local $la1 v128)
    (local $hb v128) (local $lb v128) (local $hb1 v128) (local $lb1 v128)
    (block $pdone (loop $blocks
      (br_if $pdone (i32.ge_s (local.get $i0) (local.get $rows)))
      (local.set $nb (i32.sub (local.get $rows) (local.get $i0)))
      (if (i32.gt_s (local.get $nb) (i32.const 32)) (then (local.set $nb (i32.const 32))))
      ;; split every column of the block
      (local.set $k (i32.const 0))
      (block $kdone (loop $cols
        (br_if $kdone (i32.ge_s (local.get $k) (local.get $nk)))
        (local.set $src (i32.shl (i32.add (i32.mul (local.get $k) (local.get $ld)) (local.get $i0)) (i32.const 3)))
        (local.set $o (i32.shl (i32.mul (local.get $k) (i32.const 32)) (i32.const 3)))
        (local.set $sc (f64.load (i32.add (local.get $scales) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $mx (f64.const 0))
        (local.set $i (i32.const 0))
        ;; a full block without low parts: the copy and the maximum two rows at a time
        (if (i32.and (i32.eq (local.get $nb) (i32.const 32)) (i32.eqz (local.get $lo)))
          (then
            (local.set $va (f64x2.splat (local.get $sc)))
            (local.set $ha (v128.const i64x2 0 0))
            (block $d1v (loop $l1v
              (br_if $d1v (i32.ge_s (local.get $i) (i32.const 32)))
              (local.set $la (f64x2.mul (v128.load (i32.add (local.get $panel) (i32.add (local.get $src) (i32.shl (local.get $i) (i32.const 3))))) (local.get $va)))
              (v128.store (i32.add (local.get $v) (i32.add (local.get $o) (i32.shl (local.get $i) (i32.const 3)))) (local.get $la))
              (local.set $ha (f64x2.max (local.get $ha) (f64x2.abs (local.get $la))))
              (local.set $i (i32.add (local.get $i) (i32.const 2)))
              (br $l1v)))
            (local.set $mx (f64.max (f64x2.extract_lane 0 (local.get $ha)) (f64x2.extract_lane 1 (local.get $ha))))))
        (block $d1 (loop $l1
          (br_if $d1 (i32.ge_s (local.get $i) (i32.const 32)))
          (local.set $x (f64.const 0))
          (if (i32.lt_s (local.get $i) (local.get $nb))
            (then (local.set $x (f64.mul (f64.load (i32.add (local.get $panel) (i32.add (local.get $src) (i32.shl (local.get $i) (i32.const 3))))) (local.get $sc)))))
          (f64.store (i32.add (local.get $v) (i32.add (local.get $o) (i32.shl (local.get $i) (i32.const 3)))) (local.get $x))
          (local.set $mx (f64.max (local.get $mx) (f64.abs (local.get $x))))
          (if (local.get $lo)
            (then
              (local.set $x (f64.const 0))
              (if (i32.lt_s (local.get $i) (local.get $nb))
                (then (local.set $x (f64.load (i32.add (local.get $lo) (i32.add (local.get $src) (i32.shl (local.get $i) (i32.const 3))))))))
              (f64.store (i32.add (local.get $w) (i32.add (local.get $o) (i32.shl (local.get $i) (i32.const 3)))) (local.get $x))))
          (local.set $i (i32.add (local.get $i) (i32.const 1)))
          (br $l1)))
        ;; grid exponent g = max(E − 24, −1000) with max < 2^E; σ = 1.5·2^(g+52)
        (local.set $g (i32.wrap_i64 (i64.and (i64.shr_u (i64.reinterpret_f64 (local.get $mx)) (i64.const 52)) (i64.const 2047))))
        (local.set $g (i32.sub (if (result i32) (local.get $g) (then (i32.sub (local.get $g) (i32.const 1022))) (else (i32.const -1022))) (i32.const 24)))
        (if (i32.lt_s (local.get $g) (i32.const -1000)) (then (local.set $g (i32.const -1000))))
        (local.set $sigma (f64.mul (f64.const 1.5)
          (f64.reinterpret_i64 (i64.shl (i64.extend_i32_s (i32.add (local.get $g) (i32.const 1075))) (i64.const 52)))))
        (local.set $i (i32.const 0))
        (local.set $hb (f64x2.splat (local.get $sigma)))
        (block $d2 (loop $l2
          (br_if $d2 (i32.ge_s (local.get $i) (i32.const 32)))
          (local.set $la (v128.load (i32.add (local.get $v) (i32.add (local.get $o) (i32.shl (local.get $i) (i32.const 3))))))
          (local.set $ha (f64x2.sub (f64x2.add (local.get $la) (local.get $hb)) (local.get $hb)))
          (v128.store (i32.add (local.get $h) (i32.add (local.get $o) (i32.shl (local.get $i) (i32.const 3)))) (local.get $ha))
          (v128.store (i32.add (local.get $l) (i32.add (local.get $o) (i32.shl (local.get $i) (i32.const 3)))) (f64x2.sub (local.get $la) (local.get $ha)))
          (local.set $i (i32.add (local.get $i) (i32.const 2)))
          (br $l2)))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $cols)))
      ;; 2 × 2 tiles of pairs over the block
      (local.set $b (i32.const 0))
      (block $bdone (loop $bl
        (br_if $bdone (i32.ge_s (local.get $b) (local.get $nk)))
        (local.set $b1 (i32.add (local.get $b) (i32.const 1)))
        (if (i32.ge_s (local.get $b1) (local.get $nk)) (then (local.set $b1 (local.get $b))))
        (local.set $a (i32.const 0))
        (block $adone (loop $al
          (br_if $adone (i32.gt_s (local.get $a) (local.get $b)))
          (local.set $a1 (i32.add (local.get $a) (i32.const 1)))
          (if (i32.ge_s (local.get $a1) (local.get $nk)) (then (local.set $a1 (local.get $a))))
          (local.set $oa (i32.shl (local.get $a) (i32.const 8)))   ;; a·32·8
          (local.set $oa1 (i32.shl (local.get $a1) (i32.const 8)))
          (local.set $ob (i32.shl (local.get $b) (i32.const 8)))
          (local.set $ob1 (i32.shl (local.get $b1) (i32.const 8)))
          (local.set $E00 (v128.const i64x2 0 0)) (local.set $E01 (v128.const i64x2 0 0))
          (local.set $E10 (v128.const i64x2 0 0)) (local.set $E11 (v128.const i64x2 0 0))
          (local.set $C00 (v128.const i64x2 0 0)) (local.set $C01 (v128.const i64x2 0 0))
          (local.set $C10 (v128.const i64x2 0 0)) (local.set $C11 (v128.const i64x2 0 0))
          (local.set $i (i32.const 0))
          (block $d3 (loop $l3
            (br_if $d3 (i32.ge_s (local.get $i) (i32.const 256)))
            (local.set $va (v128.load (i32.add (local.get $v) (i32.add (local.get $oa) (local.get $i)))))
            (local.set $ha (v128.load (i32.add (local.get $h) (i32.add (local.get $oa) (local.get $i)))))
            (local.set $la (v128.load (i32.add (local.get $l) (i32.add (local.get $oa) (local.get $i)))))
            (local.set $va1 (v128.load (i32.add (local.get $v) (i32.add (local.get $oa1) (local.get $i)))))
            (local.set $ha1 (v128.load (i32.add (local.get $h) (i32.add (local.get $oa1) (local.get $i)))))
            (local.set $la1 (v128.load (i32.add (local.get $l) (i32.add (local.get $oa1) (local.get $i)))))
            (local.set $hb (v128.load (i32.add (local.get $h) (i32.add (local.get $ob) (local.get $i)))))
            (local.set $lb (v128.load (i32.add (local.get $l) (i32.add (local.get $ob) (local.get $i)))))
            (local.set $hb1 (v128.load (i32.add (local.get $h) (i32.add (local.get $ob1) (local.get $i)))))
            (local.set $lb1 (v128.load (i32.add (local.get $l) (i32.add (local.get $ob1) (local.get $i)))))
            (local.set $E00 (f64x2.add (local.get $E00) (f64x2.mul (local.get $ha) (local.get $hb))))
            (local.set $E01 (f64x2.add (local.get $E01) (f64x2.mul (local.get $ha) (local.get $hb1))))
            (local.set $E10 (f64x2.add (local.get $E10) (f64x2.mul (local.get $ha1) (local.get $hb))))
            (local.set $E11 (f64x2.add (local.get $E11) (f64x2.mul (local.get $ha1) (local.get $hb1))))
            (local.set $C00 (f64x2.add (local.get $C00) (f64x2.add (f64x2.mul (local.get $va) (local.get $lb)) (f64x2.mul (local.get $la) (local.get $hb)))))
            (local.set $C01 (f64x2.add (local.get $C01) (f64x2.add (f64x2.mul (local.get $va) (local.get $lb1)) (f64x2.mul (local.get $la) (local.get $hb1)))))
            (local.set $C10 (f64x2.add (local.get $C10) (f64x2.add (f64x2.mul (local.get $va1) (local.get $lb)) (f64x2.mul (local.get $la1) (local.get $hb)))))
            (local.set $C11 (f64x2.add (local.get $C11) (f64x2.add (f64x2.mul (local.get $va1) (local.get $lb1)) (f64x2.mul (local.get $la1) (local.get $hb1)))))
            (local.set $i (i32.add (local.get $i) (i32.const 16)))
            (br $l3)))
          (if (local.get $lo)
            (then
              (local.set $i (i32.const 0))
              (block $d4 (loop $l4
                (br_if $d4 (i32.ge_s (local.get $i) (i32.const 256)))
                (local.set $va (v128.load (i32.add (local.get $v) (i32.add (local.get $oa) (local.get $i)))))
                (local.set $la (v128.load (i32.add (local.get $w) (i32.add (local.get $oa) (local.get $i)))))
                (local.set $va1 (v128.load (i32.add (local.get $v) (i32.add (local.get $oa1) (local.get $i)))))
                (local.set $la1 (v128.load (i32.add (local.get $w) (i32.add (local.get $oa1) (local.get $i)))))
                (local.set $hb (v128.load (i32.add (local.get $v) (i32.add (local.get $ob) (local.get $i)))))
                (local.set $lb (v128.load (i32.add (local.get $w) (i32.add (local.get $ob) (local.get $i)))))
                (local.set $hb1 (v128.load (i32.add (local.get $v) (i32.add (local.get $ob1) (local.get $i)))))
                (local.set $lb1 (v128.load (i32.add (local.get $w) (i32.add (local.get $ob1) (local.get $i)))))
                (local.set $C00 (f64x2.add (local.get $C00) (f64x2.add (f64x2.mul (local.get $va) (local.get $lb)) (f64x2.mul (local.get $la) (local.get $hb)))))
                (local.set $C01 (f64x2.add (local.get $C01) (f64x2.add (f64x2.mul (local.get $va) (local.get $lb1)) (f64x2.mul (local.get $la) (local.get $hb1)))))
                (local.set $C10 (f64x2.add (local.get $C10) (f64x2.add (f64x2.mul (local.get $va1) (local.get $lb)) (f64x2.mul (local.get $la1) (local.get $hb)))))
                (local.set $C11 (f64x2.add (local.get $C11) (f64x2.add (f64x2.mul (local.get $va1) (local.get $lb1)) (f64x2.mul (local.get $la1) (local.get $hb1)))))
                (local.set $i (i32.add (local.get $i) (i32.const 16)))
                (br $l4)))))
          (call $acc (local.get $s1h) (local.get $s1l) (local.get $s2h) (local.get $s2l)
            (i32.add (i32.mul (local.get $b) (local.get $nk)) (local.get $a)) (local.get $E00) (local.get $C00))
          (if (i32.ne (local.get $b1) (local.get $b))
            (then (call $acc (local.get $s1h) (local.get $s1l) (local.get $s2h) (local.get $s2l)
              (i32.add (i32.mul (local.get $b1) (local.get $nk)) (local.get $a)) (local.get $E01) (local.get $C01))))
          (if (i32.ne (local.get $a1) (local.get $a))
            (then (call $acc (local.get $s1h) (local.get $s1l) (local.get $s2h) (local.get $s2l)
              (i32.add (i32.mul (local.get $b) (local.get $nk)) (local.get $a1)) (local.get $E10) (local.get $C10))))
          (if (i32.and (i32.ne (local.get $a1) (local.get $a)) (i32.ne (local.get $b1) (local.get $b)))
            (then (call $acc (local.get $s1h) (local.get $s1l) (local.get $s2h) (local.get $s2l)
              (i32.add (i32.mul (local.get $b1) (local.get $nk)) (local.get $a1)) (local.get $E11) (local.get $C11))))
          (local.set $a (i32.add (local.get $a) (i32.const 2)))
          (br $al)))
        (local.set $b (i32.add (local.get $b) (i32.const 2)))
        (br $bl)))
      (local.set $i0 (i32.add (local.get $i0) (i32.const 32)))
      (br $blocks)))
  )

  ;; (s1h, s1l)[at] += e0 + e1 (the two lanes' exact sums; their sum is exact too) with TwoSum,
  ;; (s2h, s2l)[at] += c0 + c1 with TwoSum.
  (func $acc (param $s1h i32) (param $s1l i32) (param $s2h i32) (param $s2l i32) (param $at i32) (param $E v128) (param $C v128)
    (local $p i32) (local $s f64) (local $e f64) (local $t f64) (local $bb f64)
    (local.set $p (i32.shl (local.get $at) (i32.const 3)))
    (local.set $e (f64.add (f64x2.extract_lane 0 (local.get $E)) (f64x2.extract_lane 1 (local.get $E))))
    (local.set $s (f64.load (i32.add (local.get $s1h) (local.get $p))))
    (local.set $t (f64.add (local.get $s) (local.get $e)))
    (local.set $bb (f64.sub (local.get $t) (local.get $s)))
    (f64.store (i32.add (local.get $s1l) (local.get $p))
      (f64.add (f64.load (i32.add (local.get $s1l) (local.get $p)))
        (f64.add (f64.sub (local.get $s) (f64.sub (local.get $t) (local.get $bb))) (f64.sub (local.get $e) (local.get $bb)))))
    (f64.store (i32.add (local.get $s1h) (local.get $p)) (local.get $t))
    (local.set $e (f64.add (f64x2.extract_lane 0 (local.get $C)) (f64x2.extract_lane 1 (local.get $C))))
    (local.set $s (f64.load (i32.add (local.get $s2h) (local.get $p))))
    (local.set $t (f64.add (local.get $s) (local.get $e)))
    (local.set $bb (f64.sub (local.get $t) (local.get $s)))
    (f64.store (i32.add (local.get $s2l) (local.get $p))
      (f64.add (f64.load (i32.add (local.get $s2l) (local.get $p)))
        (f64.add (f64.sub (local.get $s) (f64.sub (local.get $t) (local.get $bb))) (f64.sub (local.get $e) (local.get $bb)))))
    (f64.store (i32.add (local.get $s2h) (local.get $p)) (local.get $t))
  )

  ;; dot2(col, lo, scale, vh, vl, m, c0, out, vlo): out[0] + out[1] = c0 + Σ a_i·(vh_i + vl_i + vlo_i)
  ;; as a double-double, compensated (Dot2), with a = col·scale (+ lo) and vlo (when ≠ 0) a low part
  ;; of v taken in working precision: the second half of `fused` alone (JavaScript twin: dot2 in
  ;; refine.ts).
  (func (export "dot2")
    (param $col i32) (param $lo i32) (param $scale f64) (param $vh i32) (param $vl i32) (param $m i32) (param $c0 f64)
    (param $out i32) (param $vlo i32)
    (local $i i32) (local $off i32) (local $end i32)
    (local $sc v128) (local $split v128) (local $a v128) (local $t v128) (local $ah v128) (local $alo v128)
    (local $bh v128) (local $bl v128) (local $q v128) (local $dn v128) (local $cc v128) (local $ds v128) (local $de v128)
    (local $x f64) (local $y f64) (local $e f64) (local $ta f64) (local $bb f64)
    (local.set $sc (f64x2.splat (local.get $scale)))
    (local.set $split (f64x2.splat (f64.const 134217729)))
    (local.set $ds (f64x2.replace_lane 0 (f64x2.splat (f64.const 0)) (local.get $c0)))
    (local.set $end (i32.and (local.get $m) (i32.const -2)))
    (block $done
      (loop $rows
        (br_if $done (i32.ge_u (local.get $i) (local.get $m)))
        (local.set $off (i32.shl (local.get $i) (i32.const 3)))
        (if (i32.lt_u (local.get $i) (local.get $end))
          (then
            (local.set $a (f64x2.mul (v128.load (i32.add (local.get $col) (local.get $off))) (local.get $sc)))
            (local.set $bh (v128.load (i32.add (local.get $vh) (local.get $off))))
            (local.set $bl (v128.load (i32.add (local.get $vl) (local.get $off)))))
          (else
            (local.set $a (f64x2.mul (v128.load64_zero (i32.add (local.get $col) (local.get $off))) (local.get $sc)))
            (local.set $bh (v128.load64_zero (i32.add (local.get $vh) (local.get $off))))
            (local.set $bl (v128.load64_zero (i32.add (local.get $vl) (local.get $off))))))
        (local.set $t (f64x2.mul (local.get $split) (local.get $a)))
        (local.set $ah (f64x2.sub (local.get $t) (f64x2.sub (local.get $t) (local.get $a))))
        (local.set $alo (f64x2.sub (local.get $a) (local.get $ah)))
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
    (if (local.get $lo)
      (then
        (local.set $i (i32.const 0))
        (block $ldone
          (loop $lrows
            (br_if $ldone (i32.ge_u (local.get $i) (local.get $m)))
            (local.set $off (i32.shl (local.get $i) (i32.const 3)))
            (local.set $e (f64.add (local.get $e)
              (f64.mul (f64.load (i32.add (local.get $lo) (local.get $off)))
                (f64.add (f64.load (i32.add (local.get $vh) (local.get $off))) (f64.load (i32.add (local.get $vl) (local.get $off)))))))
            (local.set $i (i32.add (local.get $i) (i32.const 1)))
            (br $lrows)))))
    (if (local.get $vlo)
      (then
        (local.set $i (i32.const 0))
        (block $vdone
          (loop $vrows
            (br_if $vdone (i32.ge_u (local.get $i) (local.get $m)))
            (local.set $off (i32.shl (local.get $i) (i32.const 3)))
            (local.set $e (f64.add (local.get $e)
              (f64.mul
                (f64.mul (f64.load (i32.add (local.get $col) (local.get $off))) (local.get $scale))
                (f64.load (i32.add (local.get $vlo) (local.get $off))))))
            (local.set $i (i32.add (local.get $i) (i32.const 1)))
            (br $vrows)))))
    (local.set $x (f64x2.extract_lane 0 (local.get $ds)))
    (local.set $y (f64x2.extract_lane 1 (local.get $ds)))
    (local.set $ta (f64.add (local.get $x) (local.get $y)))
    (local.set $bb (f64.sub (local.get $ta) (local.get $x)))
    (local.set $e
      (f64.add
        (f64.add (f64.sub (local.get $x) (f64.sub (local.get $ta) (local.get $bb))) (f64.sub (local.get $y) (local.get $bb)))
        (f64.add (f64.add (f64x2.extract_lane 0 (local.get $de)) (f64x2.extract_lane 1 (local.get $de))) (local.get $e))))
    ;; (ta, e) → normalized double-double (FastTwoSum)
    (local.set $x (f64.add (local.get $ta) (local.get $e)))
    (f64.store (local.get $out) (local.get $x))
    (f64.store offset=8 (local.get $out) (f64.sub (local.get $e) (f64.sub (local.get $x) (local.get $ta))))
  )

  ;; axpy2(col, lo, scale, alpha, alphaLo, s, comp, m)
  ;; (s, comp) += a·(alpha + alphaLo) with a = col·scale (+ lo): TwoSum on s, the TwoProduct error of
  ;; a·alpha and the TwoSum error into comp, and the small products a·alphaLo and lo·alpha (2^-53
  ;; smaller) added to comp in working precision. The first half of `fused` plus the low part of
  ;; alpha (JavaScript twin: axpy2 in refine.ts).
  (func (export "axpy2")
    (param $col i32) (param $lo i32) (param $scale f64) (param $alpha f64) (param $alphaLo f64)
    (param $s i32) (param $comp i32) (param $m i32)
    (local $i i32) (local $off i32) (local $end i32)
    (local $sc v128) (local $al v128) (local $all v128) (local $xh v128) (local $xl v128) (local $split v128)
    (local $a v128) (local $t v128) (local $ah v128) (local $alo v128) (local $p v128)
    (local $si v128) (local $sn v128) (local $bb v128) (local $c v128) (local $lov v128)
    (local $x f64) (local $ta f64)
    (local.set $sc (f64x2.splat (local.get $scale)))
    (local.set $al (f64x2.splat (local.get $alpha)))
    (local.set $all (f64x2.splat (local.get $alphaLo)))
    (local.set $split (f64x2.splat (f64.const 134217729)))
    (local.set $ta (f64.mul (f64.const 134217729) (local.get $alpha)))
    (local.set $x (f64.sub (local.get $ta) (f64.sub (local.get $ta) (local.get $alpha))))
    (local.set $xh (f64x2.splat (local.get $x)))
    (local.set $xl (f64x2.splat (f64.sub (local.get $alpha) (local.get $x))))
    (local.set $end (i32.and (local.get $m) (i32.const -2)))
    (block $done
      (loop $rows
        (br_if $done (i32.ge_u (local.get $i) (local.get $m)))
        (local.set $off (i32.shl (local.get $i) (i32.const 3)))
        (if (i32.lt_u (local.get $i) (local.get $end))
          (then
            (local.set $a (f64x2.mul (v128.load (i32.add (local.get $col) (local.get $off))) (local.get $sc)))
            (local.set $si (v128.load (i32.add (local.get $s) (local.get $off))))
            (local.set $c (v128.load (i32.add (local.get $comp) (local.get $off))))
            (local.set $lov (v128.const i64x2 0 0))
            (if (local.get $lo) (then (local.set $lov (v128.load (i32.add (local.get $lo) (local.get $off)))))))
          (else
            (local.set $a (f64x2.mul (v128.load64_zero (i32.add (local.get $col) (local.get $off))) (local.get $sc)))
            (local.set $si (v128.load64_zero (i32.add (local.get $s) (local.get $off))))
            (local.set $c (v128.load64_zero (i32.add (local.get $comp) (local.get $off))))
            (local.set $lov (v128.const i64x2 0 0))
            (if (local.get $lo) (then (local.set $lov (v128.load64_zero (i32.add (local.get $lo) (local.get $off))))))))
        (local.set $t (f64x2.mul (local.get $split) (local.get $a)))
        (local.set $ah (f64x2.sub (local.get $t) (f64x2.sub (local.get $t) (local.get $a))))
        (local.set $alo (f64x2.sub (local.get $a) (local.get $ah)))
        (local.set $p (f64x2.mul (local.get $a) (local.get $al)))
        (local.set $sn (f64x2.add (local.get $si) (local.get $p)))
        (local.set $bb (f64x2.sub (local.get $sn) (local.get $si)))
        (local.set $c
          (f64x2.add
            (f64x2.add (local.get $c)
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
                  (f64x2.mul (local.get $alo) (local.get $xl)))))
            (f64x2.add (f64x2.mul (local.get $a) (local.get $all)) (f64x2.mul (local.get $lov) (local.get $al)))))
        (if (i32.lt_u (local.get $i) (local.get $end))
          (then
            (v128.store (i32.add (local.get $s) (local.get $off)) (local.get $sn))
            (v128.store (i32.add (local.get $comp) (local.get $off)) (local.get $c)))
          (else
            (f64.store (i32.add (local.get $s) (local.get $off)) (f64x2.extract_lane 0 (local.get $sn)))
            (f64.store (i32.add (local.get $comp) (local.get $off)) (f64x2.extract_lane 0 (local.get $c)))))
        (local.set $i (i32.add (local.get $i) (i32.const 2)))
        (br $rows)))
  )

  ;; lev(panel, nk, rows, ld, scales, R, z, h)
  ;; Leverage of a panel of rows: with x_k = panel[k·ld + i]·scales[k], solve zᵀR = xᵀ row by row
  ;; (z_k = (x_k − Σ_{l<k} R(l,k)·z_l) · (1/R(k,k)), R column-major nk × nk) and set
  ;; h[i] = Σ_k z_k²; z is scratch of nk·ld doubles. The same operations in the same order for
  ;; each row as leverageUsed in fit.ts (column by column, one R(l,k)·z_l update at a time over all
  ;; rows), two rows at a time; rows are rounded up to even, so ld must be even and the panel's
  ;; spare row finite.
  (func (export "lev")
    (param $panel i32) (param $nk i32) (param $rows i32) (param $ld i32) (param $scales i32)
    (param $R i32) (param $z i32) (param $h i32)
    (local $k i32) (local $l i32) (local $i i32) (local $end i32) (local $zk i32) (local $zl i32) (local $rk i32) (local $src i32)
    (local $v v128) (local $sc v128) (local $inv v128) (local $r v128) (local $rl f64)
    (local $r1 f64) (local $r2 f64) (local $r3 f64) (local $r4 f64) (local $q1 v128) (local $q2 v128) (local $q3 v128) (local $q4 v128)
    (local $z1 i32) (local $z2 i32) (local $z3 i32) (local $z4 i32)
    (local.set $end (i32.shl (i32.and (i32.add (local.get $rows) (i32.const 1)) (i32.const -2)) (i32.const 3)))
    ;; h = 0
    (local.set $i (i32.const 0))
    (block $d0 (loop $l0
      (br_if $d0 (i32.ge_s (local.get $i) (local.get $end)))
      (v128.store (i32.add (local.get $h) (local.get $i)) (v128.const i64x2 0 0))
      (local.set $i (i32.add (local.get $i) (i32.const 16)))
      (br $l0)))
    (block $dk (loop $lk
      (br_if $dk (i32.ge_s (local.get $k) (local.get $nk)))
      (local.set $zk (i32.add (local.get $z) (i32.shl (i32.mul (local.get $k) (local.get $ld)) (i32.const 3))))
      (local.set $src (i32.add (local.get $panel) (i32.shl (i32.mul (local.get $k) (local.get $ld)) (i32.const 3))))
      (local.set $rk (i32.add (local.get $R) (i32.shl (i32.mul (local.get $k) (local.get $nk)) (i32.const 3))))
      ;; z_k = x_k
      (local.set $sc (f64x2.splat (f64.load (i32.add (local.get $scales) (i32.shl (local.get $k) (i32.const 3))))))
      (local.set $i (i32.const 0))
      (block $d1 (loop $l1
        (br_if $d1 (i32.ge_s (local.get $i) (local.get $end)))
        (v128.store (i32.add (local.get $zk) (local.get $i)) (f64x2.mul (v128.load (i32.add (local.get $src) (local.get $i))) (local.get $sc)))
        (local.set $i (i32.add (local.get $i) (i32.const 16)))
        (br $l1)))
      ;; z_k −= R(l,k)·z_l for l < k, four l at a time while those four R(l,k) are nonzero (the
      ;; same subtractions in the same order, z_k kept in a register), else one at a time skipping
      ;; zero R(l,k), as the JavaScript does
      (local.set $l (i32.const 0))
      (block $d4 (loop $l4
        (br_if $d4 (i32.gt_s (i32.add (local.get $l) (i32.const 4)) (local.get $k)))
        (local.set $r1 (f64.load (i32.add (local.get $rk) (i32.shl (local.get $l) (i32.const 3)))))
        (local.set $r2 (f64.load offset=8 (i32.add (local.get $rk) (i32.shl (local.get $l) (i32.const 3)))))
        (local.set $r3 (f64.load offset=16 (i32.add (local.get $rk) (i32.shl (local.get $l) (i32.const 3)))))
        (local.set $r4 (f64.load offset=24 (i32.add (local.get $rk) (i32.shl (local.get $l) (i32.const 3)))))
        (br_if $d4 (i32.or (i32.or (f64.eq (local.get $r1) (f64.const 0)) (f64.eq (local.get $r2) (f64.const 0)))
                           (i32.or (f64.eq (local.get $r3) (f64.const 0)) (f64.eq (local.get $r4) (f64.const 0)))))
        (local.set $q1 (f64x2.splat (local.get $r1)))
        (local.set $q2 (f64x2.splat (local.get $r2)))
        (local.set $q3 (f64x2.splat (local.get $r3)))
        (local.set $q4 (f64x2.splat (local.get $r4)))
        (local.set $z1 (i32.add (local.get $z) (i32.shl (i32.mul (local.get $l) (local.get $ld)) (i32.const 3))))
        (local.set $z2 (i32.add (local.get $z1) (i32.shl (local.get $ld) (i32.const 3))))
        (local.set $z3 (i32.add (local.get $z2) (i32.shl (local.get $ld) (i32.const 3))))
        (local.set $z4 (i32.add (local.get $z3) (i32.shl (local.get $ld) (i32.const 3))))
        (local.set $i (i32.const 0))
        (block $d5 (loop $l5
          (br_if $d5 (i32.ge_s (local.get $i) (local.get $end)))
          (v128.store (i32.add (local.get $zk) (local.get $i))
            (f64x2.sub
              (f64x2.sub
                (f64x2.sub
                  (f64x2.sub (v128.load (i32.add (local.get $zk) (local.get $i)))
                    (f64x2.mul (local.get $q1) (v128.load (i32.add (local.get $z1) (local.get $i)))))
                  (f64x2.mul (local.get $q2) (v128.load (i32.add (local.get $z2) (local.get $i)))))
                (f64x2.mul (local.get $q3) (v128.load (i32.add (local.get $z3) (local.get $i)))))
              (f64x2.mul (local.get $q4) (v128.load (i32.add (local.get $z4) (local.get $i))))))
          (local.set $i (i32.add (local.get $i) (i32.const 16)))
          (br $l5)))
        (local.set $l (i32.add (local.get $l) (i32.const 4)))
        (br $l4)))
      (block $dl (loop $ll
        (br_if $dl (i32.ge_s (local.get $l) (local.get $k)))
        (local.set $rl (f64.load (i32.add (local.get $rk) (i32.shl (local.get $l) (i32.const 3)))))
        (if (f64.ne (local.get $rl) (f64.const 0))
          (then
            (local.set $r (f64x2.splat (local.get $rl)))
            (local.set $zl (i32.add (local.get $z) (i32.shl (i32.mul (local.get $l) (local.get $ld)) (i32.const 3))))
            (local.set $i (i32.const 0))
            (block $d2 (loop $l2
              (br_if $d2 (i32.ge_s (local.get $i) (local.get $end)))
              (v128.store (i32.add (local.get $zk) (local.get $i))
                (f64x2.sub (v128.load (i32.add (local.get $zk) (local.get $i)))
                  (f64x2.mul (local.get $r) (v128.load (i32.add (local.get $zl) (local.get $i))))))
              (local.set $i (i32.add (local.get $i) (i32.const 16)))
              (br $l2)))))
        (local.set $l (i32.add (local.get $l) (i32.const 1)))
        (br $ll)))
      ;; z_k ·= 1/R(k,k); h += z_k²
      (local.set $inv (f64x2.splat (f64.div (f64.const 1) (f64.load (i32.add (local.get $rk) (i32.shl (local.get $k) (i32.const 3)))))))
      (local.set $i (i32.const 0))
      (block $d3 (loop $l3
        (br_if $d3 (i32.ge_s (local.get $i) (local.get $end)))
        (local.set $v (f64x2.mul (v128.load (i32.add (local.get $zk) (local.get $i))) (local.get $inv)))
        (v128.store (i32.add (local.get $zk) (local.get $i)) (local.get $v))
        (v128.store (i32.add (local.get $h) (local.get $i))
          (f64x2.add (v128.load (i32.add (local.get $h) (local.get $i))) (f64x2.mul (local.get $v) (local.get $v))))
        (local.set $i (i32.add (local.get $i) (i32.const 16)))
        (br $l3)))
      (local.set $k (i32.add (local.get $k) (i32.const 1)))
      (br $lk)))
  )

)
