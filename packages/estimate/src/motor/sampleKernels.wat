;; Passes over a series of doubles that the preparation makes before any fit (noise level,
;; order statistics). Each function does the floating-point operations of the JavaScript it
;; stands for, in the same order (see selectKth.ts and estimateNoiseLevel.ts), so the results are
;; the same bits. Addresses are in bytes; series are f64 arrays in the imported memory.
(module
  (import "env" "memory" (memory 1))

  ;; select(p, n, k): Hoare's selection with a median-of-three pivot, exactly as selectKth.ts:
  ;; rearranges the n doubles at p (no NaN) so that element k is the k-th smallest, none larger
  ;; left of it and none smaller right of it, and returns it.
  (func (export "select") (param $p i32) (param $n i32) (param $k i32) (result f64)
    (local $left i32) (local $right i32) (local $mid i32) (local $i i32) (local $j i32)
    (local $a f64) (local $b f64) (local $c f64) (local $pivot f64) (local $t f64)
    (local.set $right (i32.sub (local.get $n) (i32.const 1)))
    (block $done
      (loop $narrow
        (br_if $done (i32.le_s (local.get $right) (local.get $left)))
        (local.set $mid (i32.shr_s (i32.add (local.get $left) (local.get $right)) (i32.const 1)))
        (local.set $a (f64.load (i32.add (local.get $p) (i32.shl (local.get $left) (i32.const 3)))))
        (local.set $b (f64.load (i32.add (local.get $p) (i32.shl (local.get $mid) (i32.const 3)))))
        (local.set $c (f64.load (i32.add (local.get $p) (i32.shl (local.get $right) (i32.const 3)))))
        ;; pivot = a < b ? (b < c ? b : a < c ? c : a) : (a < c ? a : b < c ? c : b)
        (if (f64.lt (local.get $a) (local.get $b))
          (then
            (if (f64.lt (local.get $b) (local.get $c))
              (then (local.set $pivot (local.get $b)))
              (else (if (f64.lt (local.get $a) (local.get $c))
                (then (local.set $pivot (local.get $c)))
                (else (local.set $pivot (local.get $a)))))))
          (else
            (if (f64.lt (local.get $a) (local.get $c))
              (then (local.set $pivot (local.get $a)))
              (else (if (f64.lt (local.get $b) (local.get $c))
                (then (local.set $pivot (local.get $c)))
                (else (local.set $pivot (local.get $b))))))))
        (local.set $i (local.get $left))
        (local.set $j (local.get $right))
        (block $partitioned
          (loop $sweep
            (br_if $partitioned (i32.gt_s (local.get $i) (local.get $j)))
            (block $stop_i
              (loop $up
                (br_if $stop_i (i32.eqz (f64.lt (f64.load (i32.add (local.get $p) (i32.shl (local.get $i) (i32.const 3)))) (local.get $pivot))))
                (local.set $i (i32.add (local.get $i) (i32.const 1)))
                (br $up)))
            (block $stop_j
              (loop $down
                (br_if $stop_j (i32.eqz (f64.gt (f64.load (i32.add (local.get $p) (i32.shl (local.get $j) (i32.const 3)))) (local.get $pivot))))
                (local.set $j (i32.sub (local.get $j) (i32.const 1)))
                (br $down)))
            (if (i32.le_s (local.get $i) (local.get $j))
              (then
                (local.set $t (f64.load (i32.add (local.get $p) (i32.shl (local.get $i) (i32.const 3)))))
                (f64.store (i32.add (local.get $p) (i32.shl (local.get $i) (i32.const 3)))
                  (f64.load (i32.add (local.get $p) (i32.shl (local.get $j) (i32.const 3)))))
                (f64.store (i32.add (local.get $p) (i32.shl (local.get $j) (i32.const 3))) (local.get $t))
                (local.set $i (i32.add (local.get $i) (i32.const 1)))
                (local.set $j (i32.sub (local.get $j) (i32.const 1)))))
            (br $sweep)))
        (if (i32.le_s (local.get $k) (local.get $j))
          (then (local.set $right (local.get $j)) (br $narrow)))
        (if (i32.ge_s (local.get $k) (local.get $i))
          (then (local.set $left (local.get $i)) (br $narrow)))))
    (f64.load (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))))

  ;; steps(p, n, out): the first pass of estimateNoiseLevel over the n doubles at p: returns the
  ;; count of finite values and stores at out the smallest |x[k] − x[k−1]| that is > 0 (Infinity
  ;; when none; a step next to a non-finite value is NaN or infinite and never counts as smaller).
  (func (export "steps") (param $p i32) (param $n i32) (param $out i32) (result i32)
    (local $k i32) (local $finite i32) (local $x f64) (local $prev f64) (local $step f64) (local $quantum f64)
    (local.set $quantum (f64.const inf))
    (if (i32.gt_s (local.get $n) (i32.const 0))
      (then
        (local.set $prev (f64.load (local.get $p)))
        ;; finite ⇔ x − x = 0 (NaN for ±Infinity and NaN)
        (if (f64.eq (f64.sub (local.get $prev) (local.get $prev)) (f64.const 0))
          (then (local.set $finite (i32.const 1))))))
    (local.set $k (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $x (f64.load (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))))
        (if (f64.eq (f64.sub (local.get $x) (local.get $x)) (f64.const 0))
          (then (local.set $finite (i32.add (local.get $finite) (i32.const 1)))))
        (local.set $step (f64.abs (f64.sub (local.get $x) (local.get $prev))))
        (if (i32.and (f64.gt (local.get $step) (f64.const 0)) (f64.lt (local.get $step) (local.get $quantum)))
          (then (local.set $quantum (local.get $step))))
        (local.set $prev (local.get $x))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store (local.get $out) (local.get $quantum))
    (local.get $finite))

  ;; secondDifferences(p, n, stride, out): for k = 1, 1 + stride, … while k + 1 < n, the finite
  ;; values of x[k+1] − 2·x[k] + x[k−1] (evaluated left to right as in JavaScript), stored one
  ;; after another at out; returns how many.
  (func (export "secondDifferences") (param $p i32) (param $n i32) (param $stride i32) (param $out i32) (result i32)
    (local $k i32) (local $m i32) (local $a i32) (local $v f64)
    (local.set $k (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $n)))
        (local.set $a (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3))))
        (local.set $v
          (f64.add
            (f64.sub (f64.load offset=8 (local.get $a)) (f64.mul (f64.const 2) (f64.load (local.get $a))))
            (f64.load (i32.sub (local.get $a) (i32.const 8)))))
        (if (f64.eq (f64.sub (local.get $v) (local.get $v)) (f64.const 0))
          (then
            (f64.store (i32.add (local.get $out) (i32.shl (local.get $m) (i32.const 3))) (local.get $v))
            (local.set $m (i32.add (local.get $m) (i32.const 1)))))
        (local.set $k (i32.add (local.get $k) (local.get $stride)))
        (br $next)))
    (local.get $m))

  ;; absoluteDeviations(p, m, centre): x[k] ← |x[k] − centre| for the m doubles at p.
  (func (export "absoluteDeviations") (param $p i32) (param $m i32) (param $centre f64)
    (local $end i32)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $m) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (f64.store (local.get $p) (f64.abs (f64.sub (f64.load (local.get $p)) (local.get $centre))))
        (local.set $p (i32.add (local.get $p) (i32.const 8)))
        (br $next))))
;; largestOf(p, n): the largest of the n doubles at p, as `lo = −Infinity; for (…) if (x > lo) lo = x`
  ;; (NaN never counts; −Infinity when n = 0).
  (func (export "largestOf") (param $p i32) (param $n i32) (result f64)
    (local $end i32) (local $lo f64) (local $x f64)
    (local.set $lo (f64.const -inf))
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $n) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $x (f64.load (local.get $p)))
        (if (f64.gt (local.get $x) (local.get $lo)) (then (local.set $lo (local.get $x))))
        (local.set $p (i32.add (local.get $p) (i32.const 8)))
        (br $next)))
    (local.get $lo))
;; pickFinite(p, n, stride, out): the finite values among x[0], x[stride], x[2·stride], … of the n
  ;; doubles at p, stored one after another at out; returns how many (sortedDistinct's first loop).
  (func (export "pickFinite") (param $p i32) (param $n i32) (param $stride i32) (param $out i32) (result i32)
    (local $k i32) (local $m i32) (local $v f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $v (f64.load (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))))
        (if (f64.eq (f64.sub (local.get $v) (local.get $v)) (f64.const 0))
          (then
            (f64.store (i32.add (local.get $out) (i32.shl (local.get $m) (i32.const 3))) (local.get $v))
            (local.set $m (i32.add (local.get $m) (i32.const 1)))))
        (local.set $k (i32.add (local.get $k) (local.get $stride)))
        (br $next)))
    (local.get $m))

  ;; distinctInPlace(p, m): drops repeats from the m sorted doubles at p (a value equal, by ==, to
  ;; the last one kept is dropped); returns how many are left (sortedDistinct's last loop).
  (func (export "distinctInPlace") (param $p i32) (param $m i32) (result i32)
    (local $j i32) (local $u i32) (local $v f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $j) (local.get $m)))
        (local.set $v (f64.load (i32.add (local.get $p) (i32.shl (local.get $j) (i32.const 3)))))
        (if (i32.or (i32.eqz (local.get $u))
              (f64.ne (local.get $v) (f64.load (i32.add (local.get $p) (i32.shl (i32.sub (local.get $u) (i32.const 1)) (i32.const 3))))))
          (then
            (f64.store (i32.add (local.get $p) (i32.shl (local.get $u) (i32.const 3))) (local.get $v))
            (local.set $u (i32.add (local.get $u) (i32.const 1)))))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $next)))
    (local.get $u))

  ;; singleGaps(p, u, quantum, out): over the gaps d = x[j] − x[j−1] of the u doubles at p, the sum
  ;; (in order of j, stored at out) and the count (returned) of those with
  ;; 0.5·quantum < d < 1.5·quantum (gridStep's first loop).
  (func (export "singleGaps") (param $p i32) (param $u i32) (param $quantum f64) (param $out i32) (result i32)
    (local $j i32) (local $single i32) (local $sum f64) (local $d f64) (local $lo f64) (local $hi f64)
    (local.set $lo (f64.mul (f64.const 0.5) (local.get $quantum)))
    (local.set $hi (f64.mul (f64.const 1.5) (local.get $quantum)))
    (local.set $j (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $j) (local.get $u)))
        (local.set $d (f64.sub
          (f64.load (i32.add (local.get $p) (i32.shl (local.get $j) (i32.const 3))))
          (f64.load (i32.add (local.get $p) (i32.shl (i32.sub (local.get $j) (i32.const 1)) (i32.const 3))))))
        (if (i32.and (f64.gt (local.get $d) (local.get $lo)) (f64.lt (local.get $d) (local.get $hi)))
          (then
            (local.set $sum (f64.add (local.get $sum) (local.get $d)))
            (local.set $single (i32.add (local.get $single) (i32.const 1)))))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $next)))
    (f64.store (local.get $out) (local.get $sum))
    (local.get $single))

  ;; offGrid(p, u, q, allowed): counts the gaps of the u doubles at p that are not a whole number of
  ;; q, c = (x[j] − x[j−1])/q with |c − round(c)| > 0.05 + 0.001·c, round as JavaScript's Math.round
  ;; (halves up: r = ceil(c), less one when r − 0.5 > c); stops and returns 1 as soon as the count
  ;; exceeds `allowed`, else returns 0 (gridStep's second loop).
  (func (export "offGrid") (param $p i32) (param $u i32) (param $q f64) (param $allowed f64) (result i32)
    (local $j i32) (local $bad i32) (local $c f64) (local $r f64)
    (local.set $j (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $j) (local.get $u)))
        (local.set $c (f64.div
          (f64.sub
            (f64.load (i32.add (local.get $p) (i32.shl (local.get $j) (i32.const 3))))
            (f64.load (i32.add (local.get $p) (i32.shl (i32.sub (local.get $j) (i32.const 1)) (i32.const 3)))))
          (local.get $q)))
        (local.set $r (f64.ceil (local.get $c)))
        (if (f64.gt (f64.sub (local.get $r) (f64.const 0.5)) (local.get $c))
          (then (local.set $r (f64.sub (local.get $r) (f64.const 1)))))
        (if (f64.gt (f64.abs (f64.sub (local.get $c) (local.get $r))) (f64.add (f64.const 0.05) (f64.mul (f64.const 1e-3) (local.get $c))))
          (then
            (local.set $bad (i32.add (local.get $bad) (i32.const 1)))
            (if (f64.gt (f64.convert_i32_s (local.get $bad)) (local.get $allowed))
              (then (return (i32.const 1))))))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $next)))
    (i32.const 0))
)
