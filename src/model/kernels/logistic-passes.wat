;; The passes over the training rows of logistic's newton-cg solver (src/model/logistic-rows.ts),
;; two lanes at a time. All pointers are byte offsets into this module's memory; x is the
;; row-major n × p matrix (row i at x + 8·i·p), every vector is f64.
;;
;;   scores(x, n, p, theta, z)           z_i = x_i·θ[0..p) + θ_p
;;   gradient(x, n, p, r, w, grad, diag) grad = Σ r_i·x_i (and r_i in grad_p), diag = Σ w_i·x_i² (w_i in diag_p)
;;   hessian(x, n, p, v, d, out)         out = Σ v_i·(x_i·d[0..p) + d_p)·x_i, the sum of the weights in out_p
;;
;; Every sum is formed in the order of the plain JavaScript loops in logistic-rows.ts, one
;; rounding per operation and no fused multiply-add, so both give the same bits:
;;   a dot product keeps four partial sums s_k over the columns j ≡ k (mod 4) (the columns past the
;;   last whole four go to s_0) and returns (s_0 + s_1) + (s_2 + s_3);
;;   rows are taken four at a time: per column, acc += (a_0·x_0 + a_1·x_1) + (a_2·x_2 + a_3·x_3);
;;   the last n mod 4 rows one at a time: acc += a·x (and (w·x)·x for the diagonal).
(module
  (memory (export "memory") 1)

  (func $dot (param $x i32) (param $d i32) (param $p i32) (result f64)
    (local $a v128) (local $b v128) (local $end i32) (local $s0 f64)
    (local.set $end (i32.add (local.get $x) (i32.shl (i32.and (local.get $p) (i32.const -4)) (i32.const 3))))
    (block $done
      (loop $four
        (br_if $done (i32.ge_u (local.get $x) (local.get $end)))
        (local.set $a (f64x2.add (local.get $a) (f64x2.mul (v128.load (local.get $x)) (v128.load (local.get $d)))))
        (local.set $b
          (f64x2.add (local.get $b) (f64x2.mul (v128.load offset=16 (local.get $x)) (v128.load offset=16 (local.get $d)))))
        (local.set $x (i32.add (local.get $x) (i32.const 32)))
        (local.set $d (i32.add (local.get $d) (i32.const 32)))
        (br $four)))
    (local.set $s0 (f64x2.extract_lane 0 (local.get $a)))
    (local.set $end (i32.add (local.get $end) (i32.shl (i32.and (local.get $p) (i32.const 3)) (i32.const 3))))
    (block $done
      (loop $one
        (br_if $done (i32.ge_u (local.get $x) (local.get $end)))
        (local.set $s0 (f64.add (local.get $s0) (f64.mul (f64.load (local.get $x)) (f64.load (local.get $d)))))
        (local.set $x (i32.add (local.get $x) (i32.const 8)))
        (local.set $d (i32.add (local.get $d) (i32.const 8)))
        (br $one)))
    (f64.add
      (f64.add (local.get $s0) (f64x2.extract_lane 1 (local.get $a)))
      (f64.add (f64x2.extract_lane 0 (local.get $b)) (f64x2.extract_lane 1 (local.get $b)))))

  (func (export "scores") (param $x i32) (param $n i32) (param $p i32) (param $theta i32) (param $z i32)
    (local $row i32) (local $end i32) (local $tp f64)
    (local.set $row (i32.shl (local.get $p) (i32.const 3)))
    (local.set $tp (f64.load (i32.add (local.get $theta) (local.get $row))))
    (local.set $end (i32.add (local.get $z) (i32.shl (local.get $n) (i32.const 3))))
    (block $done
      (loop $rows
        (br_if $done (i32.ge_u (local.get $z) (local.get $end)))
        (f64.store (local.get $z) (f64.add (call $dot (local.get $x) (local.get $theta) (local.get $p)) (local.get $tp)))
        (local.set $x (i32.add (local.get $x) (local.get $row)))
        (local.set $z (i32.add (local.get $z) (i32.const 8)))
        (br $rows))))

  ;; acc[j] += (a0·x0[j] + a1·x1[j]) + (a2·x2[j] + a3·x3[j]) for j < p; with $square the terms are (a·x)·x.
  (func $sweep4 (param $acc i32) (param $p i32) (param $x0 i32) (param $a0 f64) (param $a1 f64) (param $a2 f64) (param $a3 f64)
    (param $square i32)
    (local $x1 i32) (local $x2 i32) (local $x3 i32) (local $end i32)
    (local $v0 v128) (local $v1 v128) (local $v2 v128) (local $v3 v128)
    (local $c0 v128) (local $c1 v128) (local $c2 v128) (local $c3 v128)
    (local.set $x1 (i32.add (local.get $x0) (i32.shl (local.get $p) (i32.const 3))))
    (local.set $x2 (i32.add (local.get $x1) (i32.shl (local.get $p) (i32.const 3))))
    (local.set $x3 (i32.add (local.get $x2) (i32.shl (local.get $p) (i32.const 3))))
    (local.set $c0 (f64x2.splat (local.get $a0)))
    (local.set $c1 (f64x2.splat (local.get $a1)))
    (local.set $c2 (f64x2.splat (local.get $a2)))
    (local.set $c3 (f64x2.splat (local.get $a3)))
    (local.set $end (i32.add (local.get $acc) (i32.shl (i32.and (local.get $p) (i32.const -2)) (i32.const 3))))
    (block $done
      (loop $two
        (br_if $done (i32.ge_u (local.get $acc) (local.get $end)))
        (local.set $v0 (f64x2.mul (local.get $c0) (v128.load (local.get $x0))))
        (local.set $v1 (f64x2.mul (local.get $c1) (v128.load (local.get $x1))))
        (local.set $v2 (f64x2.mul (local.get $c2) (v128.load (local.get $x2))))
        (local.set $v3 (f64x2.mul (local.get $c3) (v128.load (local.get $x3))))
        (if (local.get $square)
          (then
            (local.set $v0 (f64x2.mul (local.get $v0) (v128.load (local.get $x0))))
            (local.set $v1 (f64x2.mul (local.get $v1) (v128.load (local.get $x1))))
            (local.set $v2 (f64x2.mul (local.get $v2) (v128.load (local.get $x2))))
            (local.set $v3 (f64x2.mul (local.get $v3) (v128.load (local.get $x3))))))
        (v128.store (local.get $acc)
          (f64x2.add (v128.load (local.get $acc))
            (f64x2.add (f64x2.add (local.get $v0) (local.get $v1)) (f64x2.add (local.get $v2) (local.get $v3)))))
        (local.set $acc (i32.add (local.get $acc) (i32.const 16)))
        (local.set $x0 (i32.add (local.get $x0) (i32.const 16)))
        (local.set $x1 (i32.add (local.get $x1) (i32.const 16)))
        (local.set $x2 (i32.add (local.get $x2) (i32.const 16)))
        (local.set $x3 (i32.add (local.get $x3) (i32.const 16)))
        (br $two)))
    ;; an odd last column
    (if (i32.and (local.get $p) (i32.const 1))
      (then
        (local.set $v0 (f64x2.mul (local.get $c0) (v128.load64_zero (local.get $x0))))
        (local.set $v1 (f64x2.mul (local.get $c1) (v128.load64_zero (local.get $x1))))
        (local.set $v2 (f64x2.mul (local.get $c2) (v128.load64_zero (local.get $x2))))
        (local.set $v3 (f64x2.mul (local.get $c3) (v128.load64_zero (local.get $x3))))
        (if (local.get $square)
          (then
            (local.set $v0 (f64x2.mul (local.get $v0) (v128.load64_zero (local.get $x0))))
            (local.set $v1 (f64x2.mul (local.get $v1) (v128.load64_zero (local.get $x1))))
            (local.set $v2 (f64x2.mul (local.get $v2) (v128.load64_zero (local.get $x2))))
            (local.set $v3 (f64x2.mul (local.get $v3) (v128.load64_zero (local.get $x3))))))
        (f64.store (local.get $acc)
          (f64.add (f64.load (local.get $acc))
            (f64x2.extract_lane 0
              (f64x2.add (f64x2.add (local.get $v0) (local.get $v1)) (f64x2.add (local.get $v2) (local.get $v3)))))))))

  ;; acc[j] += a·x[j] for j < p; with $square, acc[j] += (a·x[j])·x[j].
  (func $sweep1 (param $acc i32) (param $p i32) (param $x i32) (param $a f64) (param $square i32)
    (local $end i32) (local $v f64)
    (local.set $end (i32.add (local.get $acc) (i32.shl (local.get $p) (i32.const 3))))
    (block $done
      (loop $one
        (br_if $done (i32.ge_u (local.get $acc) (local.get $end)))
        (local.set $v (f64.mul (local.get $a) (f64.load (local.get $x))))
        (if (local.get $square) (then (local.set $v (f64.mul (local.get $v) (f64.load (local.get $x))))))
        (f64.store (local.get $acc) (f64.add (f64.load (local.get $acc)) (local.get $v)))
        (local.set $acc (i32.add (local.get $acc) (i32.const 8)))
        (local.set $x (i32.add (local.get $x) (i32.const 8)))
        (br $one))))

  (func $zero (param $at i32) (param $count i32)
    (memory.fill (local.get $at) (i32.const 0) (i32.shl (local.get $count) (i32.const 3))))

  (func (export "gradient") (param $x i32) (param $n i32) (param $p i32) (param $r i32) (param $w i32) (param $grad i32)
    (param $diag i32)
    (local $i i32) (local $k i32) (local $row i32) (local $last i32) (local $gp f64) (local $dp f64)
    (call $zero (local.get $grad) (i32.add (local.get $p) (i32.const 1)))
    (call $zero (local.get $diag) (i32.add (local.get $p) (i32.const 1)))
    (local.set $row (i32.shl (local.get $p) (i32.const 3)))
    (block $done
      (loop $fours
        (br_if $done (i32.gt_u (i32.add (local.get $i) (i32.const 4)) (local.get $n)))
        (call $sweep4 (local.get $grad) (local.get $p) (local.get $x)
          (f64.load (local.get $r)) (f64.load offset=8 (local.get $r)) (f64.load offset=16 (local.get $r)) (f64.load offset=24 (local.get $r))
          (i32.const 0))
        (call $sweep4 (local.get $diag) (local.get $p) (local.get $x)
          (f64.load (local.get $w)) (f64.load offset=8 (local.get $w)) (f64.load offset=16 (local.get $w)) (f64.load offset=24 (local.get $w))
          (i32.const 1))
        (local.set $k (i32.const 0))
        (block $sums_done
          (loop $sums
            (br_if $sums_done (i32.ge_u (local.get $k) (i32.const 32)))
            (local.set $gp (f64.add (local.get $gp) (f64.load (i32.add (local.get $r) (local.get $k)))))
            (local.set $dp (f64.add (local.get $dp) (f64.load (i32.add (local.get $w) (local.get $k)))))
            (local.set $k (i32.add (local.get $k) (i32.const 8)))
            (br $sums)))
        (local.set $x (i32.add (local.get $x) (i32.shl (local.get $row) (i32.const 2))))
        (local.set $r (i32.add (local.get $r) (i32.const 32)))
        (local.set $w (i32.add (local.get $w) (i32.const 32)))
        (local.set $i (i32.add (local.get $i) (i32.const 4)))
        (br $fours)))
    ;; the last rows: each row's gradient terms, then each row's diagonal terms, as the plain loop
    (local.set $last (i32.sub (local.get $n) (local.get $i)))
    (local.set $k (i32.const 0))
    (block $done
      (loop $one
        (br_if $done (i32.ge_u (local.get $k) (local.get $last)))
        (call $sweep1 (local.get $grad) (local.get $p) (i32.add (local.get $x) (i32.mul (local.get $k) (local.get $row)))
          (f64.load (i32.add (local.get $r) (i32.shl (local.get $k) (i32.const 3)))) (i32.const 0))
        (call $sweep1 (local.get $diag) (local.get $p) (i32.add (local.get $x) (i32.mul (local.get $k) (local.get $row)))
          (f64.load (i32.add (local.get $w) (i32.shl (local.get $k) (i32.const 3)))) (i32.const 1))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $one)))
    (local.set $k (i32.const 0))
    (block $done
      (loop $one
        (br_if $done (i32.ge_u (local.get $k) (local.get $last)))
        (local.set $gp (f64.add (local.get $gp) (f64.load (i32.add (local.get $r) (i32.shl (local.get $k) (i32.const 3))))))
        (local.set $dp (f64.add (local.get $dp) (f64.load (i32.add (local.get $w) (i32.shl (local.get $k) (i32.const 3))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $one)))
    (f64.store (i32.add (local.get $grad) (local.get $row)) (local.get $gp))
    (f64.store (i32.add (local.get $diag) (local.get $row)) (local.get $dp)))

  (func (export "hessian") (param $x i32) (param $n i32) (param $p i32) (param $v i32) (param $d i32) (param $out i32)
    (local $i i32) (local $row i32) (local $dp f64) (local $op f64)
    (local $w0 f64) (local $w1 f64) (local $w2 f64) (local $w3 f64)
    (call $zero (local.get $out) (i32.add (local.get $p) (i32.const 1)))
    (local.set $row (i32.shl (local.get $p) (i32.const 3)))
    (local.set $dp (f64.load (i32.add (local.get $d) (local.get $row))))
    (block $done
      (loop $fours
        (br_if $done (i32.gt_u (i32.add (local.get $i) (i32.const 4)) (local.get $n)))
        (local.set $w0 (f64.mul (f64.load (local.get $v))
          (f64.add (call $dot (local.get $x) (local.get $d) (local.get $p)) (local.get $dp))))
        (local.set $w1 (f64.mul (f64.load offset=8 (local.get $v))
          (f64.add (call $dot (i32.add (local.get $x) (local.get $row)) (local.get $d) (local.get $p)) (local.get $dp))))
        (local.set $w2 (f64.mul (f64.load offset=16 (local.get $v))
          (f64.add (call $dot (i32.add (local.get $x) (i32.shl (local.get $row) (i32.const 1))) (local.get $d) (local.get $p))
            (local.get $dp))))
        (local.set $w3 (f64.mul (f64.load offset=24 (local.get $v))
          (f64.add (call $dot (i32.add (local.get $x) (i32.mul (local.get $row) (i32.const 3))) (local.get $d) (local.get $p))
            (local.get $dp))))
        (call $sweep4 (local.get $out) (local.get $p) (local.get $x)
          (local.get $w0) (local.get $w1) (local.get $w2) (local.get $w3) (i32.const 0))
        (local.set $op
          (f64.add (local.get $op) (f64.add (f64.add (local.get $w0) (local.get $w1)) (f64.add (local.get $w2) (local.get $w3)))))
        (local.set $x (i32.add (local.get $x) (i32.shl (local.get $row) (i32.const 2))))
        (local.set $v (i32.add (local.get $v) (i32.const 32)))
        (local.set $i (i32.add (local.get $i) (i32.const 4)))
        (br $fours)))
    (block $done
      (loop $one
        (br_if $done (i32.ge_u (local.get $i) (local.get $n)))
        (local.set $w0 (f64.mul (f64.load (local.get $v))
          (f64.add (call $dot (local.get $x) (local.get $d) (local.get $p)) (local.get $dp))))
        (call $sweep1 (local.get $out) (local.get $p) (local.get $x) (local.get $w0) (i32.const 0))
        (local.set $op (f64.add (local.get $op) (local.get $w0)))
        (local.set $x (i32.add (local.get $x) (local.get $row)))
        (local.set $v (i32.add (local.get $v) (i32.const 8)))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $one)))
    (f64.store (i32.add (local.get $out) (local.get $row)) (local.get $op)))
)
