;; Squared Euclidean distances for k nearest neighbours (src/model/knn.ts), two lanes at a time.
;;
;; distances(q, nq, t, np, d, out, lim, flags), all byte offsets into this module's memory:
;;   q    test rows, row-major: nq rows of d f64 (nq even)
;;   t    training rows packed in pairs: pair p holds rows 2p and 2p+1 interleaved,
;;        [t(2p,0), t(2p+1,0), t(2p,1), t(2p+1,1), ...], d × 16 bytes per pair (np a multiple of 4)
;;   out  for test row r, 2·np f64 from out + r·np·16: its distance to each training row in order
;;   lim  one f64 per test row: a distance limit
;;   flags for test row r, np/4 bytes from flags + r·np/4: byte g is 1 when one of the distances
;;        to training rows 8g .. 8g+7 is below the row's limit (or is NaN), else 0
;;
;; Each lane sums (x_j - t_j)^2 over j = 0 .. d-1 in column order from 0, one rounding per
;; operation and no fused multiply-add: the very sums the scalar loop in knn.ts computes.
(module
  (memory (export "memory") 1)
  (func (export "distances")
    (param $q i32) (param $nq i32) (param $t i32) (param $np i32) (param $d i32) (param $out i32)
    (param $lim i32) (param $flags i32)
    (local $row i32) (local $pair i32) (local $qi i32) (local $p i32)
    (local $qa i32) (local $qb i32) (local $qend i32) (local $ta i32) (local $tb i32) (local $tc i32) (local $td i32)
    (local $oa i32) (local $ob i32) (local $fa i32) (local $fb i32) (local $la v128) (local $lb v128)
    (local $xa v128) (local $xb v128) (local $va v128) (local $vb v128) (local $vc v128) (local $vd v128) (local $e v128)
    (local $a00 v128) (local $a01 v128) (local $a02 v128) (local $a03 v128)
    (local $a10 v128) (local $a11 v128) (local $a12 v128) (local $a13 v128)
    (local.set $row (i32.shl (local.get $d) (i32.const 3)))
    (local.set $pair (i32.shl (local.get $d) (i32.const 4)))
    (local.set $qi (i32.const 0))
    (block $rows_done
      (loop $rows
        (br_if $rows_done (i32.ge_u (local.get $qi) (local.get $nq)))
        ;; out rows qi and qi + 1
        (local.set $oa (i32.add (local.get $out) (i32.shl (i32.mul (local.get $qi) (local.get $np)) (i32.const 4))))
        (local.set $ob (i32.add (local.get $oa) (i32.shl (local.get $np) (i32.const 4))))
        (local.set $fa (i32.add (local.get $flags) (i32.mul (local.get $qi) (i32.shr_u (local.get $np) (i32.const 2)))))
        (local.set $fb (i32.add (local.get $fa) (i32.shr_u (local.get $np) (i32.const 2))))
        (local.set $la (f64x2.splat (f64.load (i32.add (local.get $lim) (i32.shl (local.get $qi) (i32.const 3))))))
        (local.set $lb (f64x2.splat (f64.load offset=8 (i32.add (local.get $lim) (i32.shl (local.get $qi) (i32.const 3))))))
        (local.set $p (i32.const 0))
        (block $pairs_done
          (loop $pairs
            (br_if $pairs_done (i32.ge_u (local.get $p) (local.get $np)))
            (local.set $qa (i32.add (local.get $q) (i32.mul (local.get $qi) (local.get $row))))
            (local.set $qb (i32.add (local.get $qa) (local.get $row)))
            (local.set $qend (local.get $qb))
            (local.set $ta (i32.add (local.get $t) (i32.mul (local.get $p) (local.get $pair))))
            (local.set $tb (i32.add (local.get $ta) (local.get $pair)))
            (local.set $tc (i32.add (local.get $tb) (local.get $pair)))
            (local.set $td (i32.add (local.get $tc) (local.get $pair)))
            (local.set $a00 (v128.const i64x2 0 0))
            (local.set $a01 (v128.const i64x2 0 0))
            (local.set $a02 (v128.const i64x2 0 0))
            (local.set $a03 (v128.const i64x2 0 0))
            (local.set $a10 (v128.const i64x2 0 0))
            (local.set $a11 (v128.const i64x2 0 0))
            (local.set $a12 (v128.const i64x2 0 0))
            (local.set $a13 (v128.const i64x2 0 0))
            (block $cols_done
              (loop $cols
                (br_if $cols_done (i32.ge_u (local.get $qa) (local.get $qend)))
                (local.set $xa (f64x2.splat (f64.load (local.get $qa))))
                (local.set $xb (f64x2.splat (f64.load (local.get $qb))))
                (local.set $va (v128.load (local.get $ta)))
                (local.set $vb (v128.load (local.get $tb)))
                (local.set $vc (v128.load (local.get $tc)))
                (local.set $vd (v128.load (local.get $td)))
                (local.set $e (f64x2.sub (local.get $xa) (local.get $va)))
                (local.set $a00 (f64x2.add (local.get $a00) (f64x2.mul (local.get $e) (local.get $e))))
                (local.set $e (f64x2.sub (local.get $xa) (local.get $vb)))
                (local.set $a01 (f64x2.add (local.get $a01) (f64x2.mul (local.get $e) (local.get $e))))
                (local.set $e (f64x2.sub (local.get $xa) (local.get $vc)))
                (local.set $a02 (f64x2.add (local.get $a02) (f64x2.mul (local.get $e) (local.get $e))))
                (local.set $e (f64x2.sub (local.get $xa) (local.get $vd)))
                (local.set $a03 (f64x2.add (local.get $a03) (f64x2.mul (local.get $e) (local.get $e))))
                (local.set $e (f64x2.sub (local.get $xb) (local.get $va)))
                (local.set $a10 (f64x2.add (local.get $a10) (f64x2.mul (local.get $e) (local.get $e))))
                (local.set $e (f64x2.sub (local.get $xb) (local.get $vb)))
                (local.set $a11 (f64x2.add (local.get $a11) (f64x2.mul (local.get $e) (local.get $e))))
                (local.set $e (f64x2.sub (local.get $xb) (local.get $vc)))
                (local.set $a12 (f64x2.add (local.get $a12) (f64x2.mul (local.get $e) (local.get $e))))
                (local.set $e (f64x2.sub (local.get $xb) (local.get $vd)))
                (local.set $a13 (f64x2.add (local.get $a13) (f64x2.mul (local.get $e) (local.get $e))))
                (local.set $qa (i32.add (local.get $qa) (i32.const 8)))
                (local.set $qb (i32.add (local.get $qb) (i32.const 8)))
                (local.set $ta (i32.add (local.get $ta) (i32.const 16)))
                (local.set $tb (i32.add (local.get $tb) (i32.const 16)))
                (local.set $tc (i32.add (local.get $tc) (i32.const 16)))
                (local.set $td (i32.add (local.get $td) (i32.const 16)))
                (br $cols)))
            (v128.store offset=0 (i32.add (local.get $oa) (i32.shl (local.get $p) (i32.const 4))) (local.get $a00))
            (v128.store offset=16 (i32.add (local.get $oa) (i32.shl (local.get $p) (i32.const 4))) (local.get $a01))
            (v128.store offset=32 (i32.add (local.get $oa) (i32.shl (local.get $p) (i32.const 4))) (local.get $a02))
            (v128.store offset=48 (i32.add (local.get $oa) (i32.shl (local.get $p) (i32.const 4))) (local.get $a03))
            (v128.store offset=0 (i32.add (local.get $ob) (i32.shl (local.get $p) (i32.const 4))) (local.get $a10))
            (v128.store offset=16 (i32.add (local.get $ob) (i32.shl (local.get $p) (i32.const 4))) (local.get $a11))
            (v128.store offset=32 (i32.add (local.get $ob) (i32.shl (local.get $p) (i32.const 4))) (local.get $a12))
            (v128.store offset=48 (i32.add (local.get $ob) (i32.shl (local.get $p) (i32.const 4))) (local.get $a13))
            ;; Below the limit: not (distance >= limit), so NaN counts as below.
            (i32.store8 (i32.add (local.get $fa) (i32.shr_u (local.get $p) (i32.const 2)))
              (v128.any_true (v128.not (v128.and
                (v128.and (f64x2.ge (local.get $a00) (local.get $la)) (f64x2.ge (local.get $a01) (local.get $la)))
                (v128.and (f64x2.ge (local.get $a02) (local.get $la)) (f64x2.ge (local.get $a03) (local.get $la)))))))
            (i32.store8 (i32.add (local.get $fb) (i32.shr_u (local.get $p) (i32.const 2)))
              (v128.any_true (v128.not (v128.and
                (v128.and (f64x2.ge (local.get $a10) (local.get $lb)) (f64x2.ge (local.get $a11) (local.get $lb)))
                (v128.and (f64x2.ge (local.get $a12) (local.get $lb)) (f64x2.ge (local.get $a13) (local.get $lb)))))))
            (local.set $p (i32.add (local.get $p) (i32.const 4)))
            (br $pairs)))
        (local.set $qi (i32.add (local.get $qi) (i32.const 2)))
        (br $rows)))))
