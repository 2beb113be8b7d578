;; checkTimeBase's passes over the sample instants (see checkTimeBase.ts): the same floating-point
;; operations in the same order as the JavaScript, so the same bits. Addresses in bytes.
(module
  (import "env" "memory" (memory 1))

  ;; intervals(t, m, dt, out): dt[k] = t[k+1] − t[k] for k < m; stores at out their sum in order,
  ;; the largest (first one on ties, from 0), its index, and the smallest (from Infinity).
  (func (export "intervals") (param $t i32) (param $m i32) (param $dt i32) (param $out i32)
    (local $k i32) (local $d f64) (local $sum f64) (local $max f64) (local $maxAt i32) (local $min f64)
    (local.set $min (f64.const inf))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $m)))
        (local.set $d (f64.sub
          (f64.load offset=8 (i32.add (local.get $t) (i32.shl (local.get $k) (i32.const 3))))
          (f64.load (i32.add (local.get $t) (i32.shl (local.get $k) (i32.const 3))))))
        (f64.store (i32.add (local.get $dt) (i32.shl (local.get $k) (i32.const 3))) (local.get $d))
        (local.set $sum (f64.add (local.get $sum) (local.get $d)))
        (if (f64.gt (local.get $d) (local.get $max))
          (then (local.set $max (local.get $d)) (local.set $maxAt (local.get $k))))
        (if (f64.lt (local.get $d) (local.get $min)) (then (local.set $min (local.get $d))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $sum))
    (f64.store offset=8 (local.get $out) (local.get $max))
    (f64.store offset=16 (local.get $out) (f64.convert_i32_s (local.get $maxAt)))
    (f64.store offset=24 (local.get $out) (local.get $min)))

  ;; sumOfSquares(x, m, mean): Σ (x[k] − mean)², in order.
  (func (export "sumOfSquares") (param $x i32) (param $m i32) (param $mean f64) (result f64)
    (local $end i32) (local $e f64) (local $ss f64)
    (local.set $end (i32.add (local.get $x) (i32.shl (local.get $m) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $x) (local.get $end)))
        (local.set $e (f64.sub (f64.load (local.get $x)) (local.get $mean)))
        (local.set $ss (f64.add (local.get $ss) (f64.mul (local.get $e) (local.get $e))))
        (local.set $x (i32.add (local.get $x) (i32.const 8)))
        (br $next)))
    (local.get $ss))

  ;; countAbove(x, m, limit): how many x[k] > limit.
  (func (export "countAbove") (param $x i32) (param $m i32) (param $limit f64) (result i32)
    (local $end i32) (local $count i32)
    (local.set $end (i32.add (local.get $x) (i32.shl (local.get $m) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $x) (local.get $end)))
        (if (f64.gt (f64.load (local.get $x)) (local.get $limit)) (then (local.set $count (i32.add (local.get $count) (i32.const 1)))))
        (local.set $x (i32.add (local.get $x) (i32.const 8)))
        (br $next)))
    (local.get $count))

  ;; median(x, m): checkTimeBase's medianOf — Hoare's selection with the middle element as pivot,
  ;; reordering the m doubles at x, then for an even m the largest value left of the middle;
  ;; returns (lower + upper)/2, or the middle value for an odd m.
  (func (export "median") (param $x i32) (param $m i32) (result f64)
    (local $k i32) (local $lo i32) (local $hi i32) (local $i i32) (local $j i32)
    (local $pivot f64) (local $t f64) (local $upper f64) (local $lower f64) (local $v f64)
    (local.set $k (i32.shr_s (local.get $m) (i32.const 1)))
    (local.set $hi (i32.sub (local.get $m) (i32.const 1)))
    (block $selected
      (loop $narrow
        (br_if $selected (i32.le_s (local.get $hi) (local.get $lo)))
        (local.set $pivot (f64.load (i32.add (local.get $x) (i32.shl (i32.shr_s (i32.add (local.get $lo) (local.get $hi)) (i32.const 1)) (i32.const 3)))))
        (local.set $i (local.get $lo))
        (local.set $j (local.get $hi))
        (block $partitioned
          (loop $sweep
            (br_if $partitioned (i32.gt_s (local.get $i) (local.get $j)))
            (block $stop_i
              (loop $up
                (br_if $stop_i (i32.eqz (f64.lt (f64.load (i32.add (local.get $x) (i32.shl (local.get $i) (i32.const 3)))) (local.get $pivot))))
                (local.set $i (i32.add (local.get $i) (i32.const 1)))
                (br $up)))
            (block $stop_j
              (loop $down
                (br_if $stop_j (i32.eqz (f64.gt (f64.load (i32.add (local.get $x) (i32.shl (local.get $j) (i32.const 3)))) (local.get $pivot))))
                (local.set $j (i32.sub (local.get $j) (i32.const 1)))
                (br $down)))
            (if (i32.le_s (local.get $i) (local.get $j))
              (then
                (local.set $t (f64.load (i32.add (local.get $x) (i32.shl (local.get $i) (i32.const 3)))))
                (f64.store (i32.add (local.get $x) (i32.shl (local.get $i) (i32.const 3)))
                  (f64.load (i32.add (local.get $x) (i32.shl (local.get $j) (i32.const 3)))))
                (f64.store (i32.add (local.get $x) (i32.shl (local.get $j) (i32.const 3))) (local.get $t))
                (local.set $i (i32.add (local.get $i) (i32.const 1)))
                (local.set $j (i32.sub (local.get $j) (i32.const 1)))))
            (br $sweep)))
        (if (i32.le_s (local.get $k) (local.get $j))
          (then (local.set $hi (local.get $j)) (br $narrow)))
        (if (i32.ge_s (local.get $k) (local.get $i))
          (then (local.set $lo (local.get $i)) (br $narrow)))))
    (local.set $upper (f64.load (i32.add (local.get $x) (i32.shl (local.get $k) (i32.const 3)))))
    (if (i32.and (local.get $m) (i32.const 1)) (then (return (local.get $upper))))
    (local.set $lower (f64.const -inf))
    (local.set $i (i32.const 0))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $i) (local.get $k)))
        (local.set $v (f64.load (i32.add (local.get $x) (i32.shl (local.get $i) (i32.const 3)))))
        (if (f64.gt (local.get $v) (local.get $lower)) (then (local.set $lower (local.get $v))))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $next)))
    (f64.div (f64.add (local.get $lower) (local.get $upper)) (f64.const 2)))
)
