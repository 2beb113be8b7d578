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
;; timeLine(p, n, out): nominalTimeGrid's three passes over the n instants t at p — the
  ;; least-squares line t ≈ a + k·h (sums in order of k) and the deviations e = t − a − k·h —
  ;; storing h, a, Σe² and max |e| (NaN once any e is NaN, as Math.max) at out.
  (func (export "timeLine") (param $p i32) (param $n i32) (param $out i32)
    (local $k i32) (local $a i32) (local $nf f64) (local $kf f64)
    (local $sk f64) (local $st f64) (local $kb f64) (local $tb f64) (local $skk f64) (local $skt f64)
    (local $dk f64) (local $h f64) (local $b f64) (local $e f64) (local $ss f64) (local $worst f64)
    (local.set $nf (f64.convert_i32_s (local.get $n)))
    (local.set $k (i32.const 0))
    (local.set $a (local.get $p))
    (block $done1
      (loop $next1
        (br_if $done1 (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $sk (f64.add (local.get $sk) (f64.convert_i32_s (local.get $k))))
        (local.set $st (f64.add (local.get $st) (f64.load (local.get $a))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (local.set $a (i32.add (local.get $a) (i32.const 8)))
        (br $next1)))
    (local.set $kb (f64.div (local.get $sk) (local.get $nf)))
    (local.set $tb (f64.div (local.get $st) (local.get $nf)))
    (local.set $k (i32.const 0))
    (local.set $a (local.get $p))
    (block $done2
      (loop $next2
        (br_if $done2 (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $dk (f64.sub (f64.convert_i32_s (local.get $k)) (local.get $kb)))
        (local.set $skk (f64.add (local.get $skk) (f64.mul (local.get $dk) (local.get $dk))))
        (local.set $skt (f64.add (local.get $skt) (f64.mul (local.get $dk) (f64.sub (f64.load (local.get $a)) (local.get $tb)))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (local.set $a (i32.add (local.get $a) (i32.const 8)))
        (br $next2)))
    (local.set $h (f64.div (local.get $skt) (local.get $skk)))
    (local.set $b (f64.sub (local.get $tb) (f64.mul (local.get $h) (local.get $kb))))
    (local.set $k (i32.const 0))
    (local.set $a (local.get $p))
    (block $done3
      (loop $next3
        (br_if $done3 (i32.ge_s (local.get $k) (local.get $n)))
        ;; e = t − a − k·h, left to right
        (local.set $e (f64.sub (f64.sub (f64.load (local.get $a)) (local.get $b)) (f64.mul (f64.convert_i32_s (local.get $k)) (local.get $h))))
        (local.set $ss (f64.add (local.get $ss) (f64.mul (local.get $e) (local.get $e))))
        (local.set $worst (f64.max (local.get $worst) (f64.abs (local.get $e))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (local.set $a (i32.add (local.get $a) (i32.const 8)))
        (br $next3)))
    (f64.store offset=0 (local.get $out) (local.get $h))
    (f64.store offset=8 (local.get $out) (local.get $b))
    (f64.store offset=16 (local.get $out) (local.get $ss))
    (f64.store offset=24 (local.get $out) (local.get $worst)))

  ;; strideDifferences(p, start, end, c, stride, out, q, cap): withinSegmentSigma's loop over one
  ;; segment: for k = start + 1 … while k + 1 < end, with the running counter c (one per k), when
  ;; c % stride = 0 and q < cap, stores x[k+1] − 2·x[k] + x[k−1] as out[q] and counts q up; returns q.
  (func (export "strideDifferences") (param $p i32) (param $start i32) (param $end i32) (param $c i32) (param $stride i32) (param $out i32) (param $q i32) (param $cap i32) (result i32)
    (local $k i32) (local $a i32)
    (local.set $k (i32.add (local.get $start) (i32.const 1)))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $end)))
        (if (i32.and (i32.eqz (i32.rem_s (local.get $c) (local.get $stride))) (i32.lt_s (local.get $q) (local.get $cap)))
          (then
            (local.set $a (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3))))
            (f64.store (i32.add (local.get $out) (i32.shl (local.get $q) (i32.const 3)))
              (f64.add
                (f64.sub (f64.load offset=8 (local.get $a)) (f64.mul (f64.const 2) (f64.load (local.get $a))))
                (f64.load (i32.sub (local.get $a) (i32.const 8)))))
            (local.set $q (i32.add (local.get $q) (i32.const 1)))))
        (local.set $c (i32.add (local.get $c) (i32.const 1)))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (local.get $q))
;; jumps(p, n, jump, prefix, starts): detectVoltageSegments' first pass over the n voltages at p:
  ;; prefix sums (n + 1 doubles at `prefix`, prefix[0] = 0) and the starts of the jump segments
  ;; (i32 at `starts`, the first one 0): k starts a segment when |v[k] − v[k−1]| > jump, replacing
  ;; the last start instead when that is within two samples and not 0. Returns how many starts.
  (func (export "jumps") (param $p i32) (param $n i32) (param $jump f64) (param $prefix i32) (param $starts i32) (result i32)
    (local $k i32) (local $count i32) (local $last i32) (local $sum f64) (local $x f64) (local $prev f64)
    (f64.store (local.get $prefix) (f64.const 0))
    (i32.store (local.get $starts) (i32.const 0))
    (local.set $count (i32.const 1))
    (if (i32.le_s (local.get $n) (i32.const 0)) (then (return (local.get $count))))
    (local.set $prev (f64.load (local.get $p)))
    (local.set $sum (local.get $prev))
    (f64.store offset=8 (local.get $prefix) (local.get $sum))
    (local.set $k (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $x (f64.load (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $sum (f64.add (local.get $sum) (local.get $x)))
        (f64.store (i32.add (local.get $prefix) (i32.shl (i32.add (local.get $k) (i32.const 1)) (i32.const 3))) (local.get $sum))
        (if (f64.gt (f64.abs (f64.sub (local.get $x) (local.get $prev))) (local.get $jump))
          (then
            (local.set $last (i32.load (i32.add (local.get $starts) (i32.shl (i32.sub (local.get $count) (i32.const 1)) (i32.const 2)))))
            (if (i32.and (i32.le_s (i32.sub (local.get $k) (local.get $last)) (i32.const 2)) (i32.ne (local.get $last) (i32.const 0)))
              (then (i32.store (i32.add (local.get $starts) (i32.shl (i32.sub (local.get $count) (i32.const 1)) (i32.const 2))) (local.get $k)))
              (else
                (i32.store (i32.add (local.get $starts) (i32.shl (local.get $count) (i32.const 2))) (local.get $k))
                (local.set $count (i32.add (local.get $count) (i32.const 1)))))))
        (local.set $prev (local.get $x))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (local.get $count))

  ;; bestSplit(prefix, a, b, limit): detectVoltageSegments' bestSplit on the prefix sums at `prefix`:
  ;; the k in [a + 2, b − 2] with the largest t² = d²/(nl·(N − nl)), d = (P[k] − P[a])·N − S·nl
  ;; (first one on ties), returned when t² > limit·N and k > 0, else −1.
  (func (export "bestSplit") (param $prefix i32) (param $a i32) (param $b i32) (param $limit f64) (result i32)
    (local $k i32) (local $at i32) (local $N f64) (local $pa f64) (local $total f64) (local $best f64)
    (local $nl f64) (local $d f64) (local $t2 f64)
    (local.set $N (f64.convert_i32_s (i32.sub (local.get $b) (local.get $a))))
    (local.set $pa (f64.load (i32.add (local.get $prefix) (i32.shl (local.get $a) (i32.const 3)))))
    (local.set $total (f64.sub (f64.load (i32.add (local.get $prefix) (i32.shl (local.get $b) (i32.const 3)))) (local.get $pa)))
    (local.set $at (i32.const -1))
    (local.set $k (i32.add (local.get $a) (i32.const 2)))
    (block $done
      (loop $next
        (br_if $done (i32.gt_s (local.get $k) (i32.sub (local.get $b) (i32.const 2))))
        (local.set $nl (f64.convert_i32_s (i32.sub (local.get $k) (local.get $a))))
        (local.set $d (f64.sub
          (f64.mul (f64.sub (f64.load (i32.add (local.get $prefix) (i32.shl (local.get $k) (i32.const 3)))) (local.get $pa)) (local.get $N))
          (f64.mul (local.get $total) (local.get $nl))))
        (local.set $t2 (f64.div (f64.mul (local.get $d) (local.get $d)) (f64.mul (local.get $nl) (f64.sub (local.get $N) (local.get $nl)))))
        (if (f64.gt (local.get $t2) (local.get $best))
          (then (local.set $best (local.get $t2)) (local.set $at (local.get $k))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (if (result i32) (i32.and (f64.gt (local.get $best) (f64.mul (local.get $limit) (local.get $N))) (i32.gt_s (local.get $at) (i32.const 0)))
      (then (local.get $at))
      (else (i32.const -1))))
;; countSteps(w, t, n, d, out): detectEncoderSpeed's first pass over the speeds at w and the
  ;; instants at t: d[k−1] = |w[k]·(t[k] − t[k−1])| for k = 1…n−1 (d may be w itself: w[k − 1] is
  ;; read before d[k − 1] is written), the smallest d > 0 stored at out
  ;; (Infinity when none); returns 1 when some d is NaN (and no smaller d came with it), else 0 —
  ;; exactly as the JavaScript's `if (x > 0 && x < smallest) … else if (x !== x) nan = true`.
  (func (export "countSteps") (param $w i32) (param $t i32) (param $n i32) (param $d i32) (param $out i32) (result i32)
    (local $k i32) (local $nan i32) (local $x f64) (local $smallest f64)
    (local.set $smallest (f64.const inf))
    (local.set $k (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $x (f64.abs (f64.mul
          (f64.load (i32.add (local.get $w) (i32.shl (local.get $k) (i32.const 3))))
          (f64.sub
            (f64.load (i32.add (local.get $t) (i32.shl (local.get $k) (i32.const 3))))
            (f64.load (i32.add (local.get $t) (i32.shl (i32.sub (local.get $k) (i32.const 1)) (i32.const 3))))))))
        (f64.store (i32.add (local.get $d) (i32.shl (i32.sub (local.get $k) (i32.const 1)) (i32.const 3))) (local.get $x))
        (if (i32.and (f64.gt (local.get $x) (f64.const 0)) (f64.lt (local.get $x) (local.get $smallest)))
          (then (local.set $smallest (local.get $x)))
          (else (if (f64.ne (local.get $x) (local.get $x)) (then (local.set $nan (i32.const 1))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store (local.get $out) (local.get $smallest))
    (local.get $nan))

  ;; largestMagnitude(p, n): the largest |x| of the n doubles at p, as `m = 0; m = Math.max(m, |x|)`
  ;; (NaN once any x is NaN).
  (func (export "largestMagnitude") (param $p i32) (param $n i32) (result f64)
    (local $end i32) (local $m f64)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $n) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $m (f64.max (local.get $m) (f64.abs (f64.load (local.get $p)))))
        (local.set $p (i32.add (local.get $p) (i32.const 8)))
        (br $next)))
    (local.get $m))
;; section(p, n, c, backward): zeroPhaseLowPass's runSection — one biquad (coefficients b0 b1 b2
  ;; a1 a2 at c) in transposed direct form II over the n doubles at p, in place, forward or
  ;; backward, started in its steady state for the first input.
  (func $section (export "section") (param $p i32) (param $n i32) (param $c i32) (param $backward i32)
    (local $b0 f64) (local $b1 f64) (local $b2 f64) (local $a1 f64) (local $a2 f64)
    (local $x0 f64) (local $z1 f64) (local $z2 f64) (local $u f64) (local $y f64)
    (local $at i32) (local $end i32) (local $step i32)
    (local.set $b0 (f64.load offset=0 (local.get $c)))
    (local.set $b1 (f64.load offset=8 (local.get $c)))
    (local.set $b2 (f64.load offset=16 (local.get $c)))
    (local.set $a1 (f64.load offset=24 (local.get $c)))
    (local.set $a2 (f64.load offset=32 (local.get $c)))
    (if (i32.le_s (local.get $n) (i32.const 0)) (then (return)))
    (if (local.get $backward)
      (then
        (local.set $at (i32.add (local.get $p) (i32.shl (i32.sub (local.get $n) (i32.const 1)) (i32.const 3))))
        (local.set $end (i32.sub (local.get $p) (i32.const 8)))
        (local.set $step (i32.const -8)))
      (else
        (local.set $at (local.get $p))
        (local.set $end (i32.add (local.get $p) (i32.shl (local.get $n) (i32.const 3))))
        (local.set $step (i32.const 8))))
    (local.set $x0 (f64.load (local.get $at)))
    ;; z1 = x0 − b0·x0; z2 = b2·x0 − a2·x0
    (local.set $z1 (f64.sub (local.get $x0) (f64.mul (local.get $b0) (local.get $x0))))
    (local.set $z2 (f64.sub (f64.mul (local.get $b2) (local.get $x0)) (f64.mul (local.get $a2) (local.get $x0))))
    (loop $next
      (local.set $u (f64.load (local.get $at)))
      ;; y = b0·u + z1; z1 = b1·u − a1·y + z2; z2 = b2·u − a2·y
      (local.set $y (f64.add (f64.mul (local.get $b0) (local.get $u)) (local.get $z1)))
      (local.set $z1 (f64.add (f64.sub (f64.mul (local.get $b1) (local.get $u)) (f64.mul (local.get $a1) (local.get $y))) (local.get $z2)))
      (local.set $z2 (f64.sub (f64.mul (local.get $b2) (local.get $u)) (f64.mul (local.get $a2) (local.get $y))))
      (f64.store (local.get $at) (local.get $y))
      (local.set $at (i32.add (local.get $at) (local.get $step)))
      (br_if $next (i32.ne (local.get $at) (local.get $end)))))

  ;; lowPass(x, n, pad, c, sections): zeroPhaseLowPass on the buffer at x whose middle [pad, pad + n)
  ;; holds the samples: the odd reflections 2·x₀ − v[pad − k] and 2·v_last − v[n − 2 − k] into the
  ;; pads, then every section forward, then every section backward (coefficients 5 per section at c).
  (func (export "lowPass") (param $x i32) (param $n i32) (param $pad i32) (param $c i32) (param $sections i32)
    (local $k i32) (local $v i32) (local $first f64) (local $last f64) (local $len i32) (local $m i32)
    (local.set $v (i32.add (local.get $x) (i32.shl (local.get $pad) (i32.const 3))))
    (local.set $first (f64.load (local.get $v)))
    (local.set $last (f64.load (i32.add (local.get $v) (i32.shl (i32.sub (local.get $n) (i32.const 1)) (i32.const 3)))))
    (block $done1
      (loop $next1
        (br_if $done1 (i32.ge_s (local.get $k) (local.get $pad)))
        (f64.store (i32.add (local.get $x) (i32.shl (local.get $k) (i32.const 3)))
          (f64.sub (f64.mul (f64.const 2) (local.get $first))
            (f64.load (i32.add (local.get $v) (i32.shl (i32.sub (local.get $pad) (local.get $k)) (i32.const 3))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next1)))
    (local.set $k (i32.const 0))
    (block $done2
      (loop $next2
        (br_if $done2 (i32.ge_s (local.get $k) (local.get $pad)))
        (f64.store (i32.add (local.get $v) (i32.shl (i32.add (local.get $n) (local.get $k)) (i32.const 3)))
          (f64.sub (f64.mul (f64.const 2) (local.get $last))
            (f64.load (i32.add (local.get $v) (i32.shl (i32.sub (i32.sub (local.get $n) (i32.const 2)) (local.get $k)) (i32.const 3))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next2)))
    (local.set $len (i32.add (local.get $n) (i32.shl (local.get $pad) (i32.const 1))))
    (local.set $m (i32.const 0))
    (block $done3
      (loop $next3
        (br_if $done3 (i32.ge_s (local.get $m) (local.get $sections)))
        (call $section (local.get $x) (local.get $len) (i32.add (local.get $c) (i32.mul (local.get $m) (i32.const 40))) (i32.const 0))
        (local.set $m (i32.add (local.get $m) (i32.const 1)))
        (br $next3)))
    (local.set $m (i32.const 0))
    (block $done4
      (loop $next4
        (br_if $done4 (i32.ge_s (local.get $m) (local.get $sections)))
        (call $section (local.get $x) (local.get $len) (i32.add (local.get $c) (i32.mul (local.get $m) (i32.const 40))) (i32.const 1))
        (local.set $m (i32.add (local.get $m) (i32.const 1)))
        (br $next4))))
;; channelStats(p, n, out): prepareRecording's pass over a channel: the largest magnitude (as
  ;; `a = x < 0 ? −x : x; if (a > m) m = a`) and the sum in order, stored at out; returns the index
  ;; of the first non-finite sample (the pass stops there), or −1.
  (func (export "channelStats") (param $p i32) (param $n i32) (param $out i32) (result i32)
    (local $k i32) (local $x f64) (local $a f64) (local $m f64) (local $sum f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $x (f64.load (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))))
        (if (f64.ne (f64.sub (local.get $x) (local.get $x)) (f64.const 0)) (then (return (local.get $k))))
        (local.set $a (select (f64.neg (local.get $x)) (local.get $x) (f64.lt (local.get $x) (f64.const 0))))
        (if (f64.gt (local.get $a) (local.get $m)) (then (local.set $m (local.get $a))))
        (local.set $sum (f64.add (local.get $sum) (local.get $x)))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $m))
    (f64.store offset=8 (local.get $out) (local.get $sum))
    (i32.const -1))

  ;; timeStats(p, n, out): prepareRecording's pass over the instants: the smallest and largest
  ;; interval d = t[k] − t[k−1] (stored at out); returns the first k ≥ 1 whose t is not finite or
  ;; whose d is not > 0 (the pass stops there), or −1.
  (func (export "timeStats") (param $p i32) (param $n i32) (param $out i32) (result i32)
    (local $k i32) (local $t f64) (local $prev f64) (local $d f64) (local $hmin f64) (local $hmax f64)
    (local.set $hmin (f64.const inf))
    (local.set $prev (f64.load (local.get $p)))
    (local.set $k (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $t (f64.load (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))))
        (if (f64.ne (f64.sub (local.get $t) (local.get $t)) (f64.const 0)) (then (return (local.get $k))))
        (local.set $d (f64.sub (local.get $t) (local.get $prev)))
        (if (i32.eqz (f64.gt (local.get $d) (f64.const 0))) (then (return (local.get $k))))
        (if (f64.lt (local.get $d) (local.get $hmin)) (then (local.set $hmin (local.get $d))))
        (if (f64.gt (local.get $d) (local.get $hmax)) (then (local.set $hmax (local.get $d))))
        (local.set $prev (local.get $t))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $hmin))
    (f64.store offset=8 (local.get $out) (local.get $hmax))
    (i32.const -1))
;; dot(a, b, n): Σ a[k]·b[k] for k < n, in order.
  (func $dot (export "dot") (param $a i32) (param $b i32) (param $n i32) (result f64)
    (local $end i32) (local $s f64)
    (local.set $end (i32.add (local.get $a) (i32.shl (local.get $n) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $a) (local.get $end)))
        (local.set $s (f64.add (local.get $s) (f64.mul (f64.load (local.get $a)) (f64.load (local.get $b)))))
        (local.set $a (i32.add (local.get $a) (i32.const 8)))
        (local.set $b (i32.add (local.get $b) (i32.const 8)))
        (br $next)))
    (local.get $s))

  ;; crossSums(x, p, n, y, out): guessConstants' normal equations for y ≈ Σ x_j·β_j with the p
  ;; columns of n doubles one after another at x: A (p × p, both triangles) at out, then b; every
  ;; entry a plain sum over k in order.
  (func (export "crossSums") (param $x i32) (param $p i32) (param $n i32) (param $y i32) (param $out i32)
    (local $i i32) (local $j i32) (local $ci i32) (local $q f64) (local $col i32)
    (local.set $col (i32.shl (local.get $n) (i32.const 3)))
    (block $done_i
      (loop $next_i
        (br_if $done_i (i32.ge_s (local.get $i) (local.get $p)))
        (local.set $ci (i32.add (local.get $x) (i32.mul (local.get $i) (local.get $col))))
        (f64.store (i32.add (local.get $out) (i32.shl (i32.add (i32.mul (local.get $p) (local.get $p)) (local.get $i)) (i32.const 3)))
          (call $dot (local.get $ci) (local.get $y) (local.get $n)))
        (local.set $j (local.get $i))
        (block $done_j
          (loop $next_j
            (br_if $done_j (i32.ge_s (local.get $j) (local.get $p)))
            (local.set $q (call $dot (local.get $ci) (i32.add (local.get $x) (i32.mul (local.get $j) (local.get $col))) (local.get $n)))
            (f64.store (i32.add (local.get $out) (i32.shl (i32.add (i32.mul (local.get $i) (local.get $p)) (local.get $j)) (i32.const 3))) (local.get $q))
            (f64.store (i32.add (local.get $out) (i32.shl (i32.add (i32.mul (local.get $j) (local.get $p)) (local.get $i)) (i32.const 3))) (local.get $q))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $next_j)))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $next_i))))
;; derivative(x, n, h, out): guessConstants' central differences of the n doubles at x:
  ;; out[k] = (x[k+1] − x[k−1])/(2·h) inside, one-sided (x[1] − x[0])/h and (x[n−1] − x[n−2])/h at
  ;; the ends (n ≥ 2).
  (func (export "derivative") (param $x i32) (param $n i32) (param $h f64) (param $out i32)
    (local $k i32) (local $a i32) (local $h2 f64)
    (local.set $h2 (f64.mul (f64.const 2) (local.get $h)))
    (local.set $k (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $n)))
        (local.set $a (i32.add (local.get $x) (i32.shl (local.get $k) (i32.const 3))))
        (f64.store (i32.add (local.get $out) (i32.shl (local.get $k) (i32.const 3)))
          (f64.div (f64.sub (f64.load offset=8 (local.get $a)) (f64.load (i32.sub (local.get $a) (i32.const 8)))) (local.get $h2)))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store (local.get $out)
      (f64.div (f64.sub (f64.load offset=8 (local.get $x)) (f64.load (local.get $x))) (local.get $h)))
    (local.set $a (i32.add (local.get $x) (i32.shl (i32.sub (local.get $n) (i32.const 1)) (i32.const 3))))
    (f64.store (i32.add (local.get $out) (i32.shl (i32.sub (local.get $n) (i32.const 1)) (i32.const 3)))
      (f64.div (f64.sub (f64.load (local.get $a)) (f64.load (i32.sub (local.get $a) (i32.const 8)))) (local.get $h))))
;; sameWords(a, b, n): 1 when the n 8-byte words at a and at b are equal bit for bit, else 0.
  (func (export "sameWords") (param $a i32) (param $b i32) (param $n i32) (result i32)
    (local $end i32)
    (local.set $end (i32.add (local.get $a) (i32.shl (local.get $n) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $a) (local.get $end)))
        (if (i64.ne (i64.load (local.get $a)) (i64.load (local.get $b))) (then (return (i32.const 0))))
        (local.set $a (i32.add (local.get $a) (i32.const 8)))
        (local.set $b (i32.add (local.get $b) (i32.const 8)))
        (br $next)))
    (i32.const 1))
;; squaredDistance(a, b, n): Σ (a[k] − b[k])·(a[k] − b[k]) for k < n, in order (rebuildCommand's rmsDiff).
  (func (export "squaredDistance") (param $a i32) (param $b i32) (param $n i32) (result f64)
    (local $end i32) (local $d f64) (local $s f64)
    (local.set $end (i32.add (local.get $a) (i32.shl (local.get $n) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $a) (local.get $end)))
        (local.set $d (f64.sub (f64.load (local.get $a)) (f64.load (local.get $b))))
        (local.set $s (f64.add (local.get $s) (f64.mul (local.get $d) (local.get $d))))
        (local.set $a (i32.add (local.get $a) (i32.const 8)))
        (local.set $b (i32.add (local.get $b) (i32.const 8)))
        (br $next)))
    (local.get $s))

  ;; segmentSquares(p, segs, m): classifyTurning's misfit of the piecewise-constant voltage, in the
  ;; same order: over the m segments (start, end, level: three doubles each at segs) in turn, over
  ;; start ≤ k < end, q += (x_k − level)·(x_k − level) for the doubles at p.
  (func (export "segmentSquares") (param $p i32) (param $segs i32) (param $m i32) (result f64)
    (local $stop i32) (local $k i32) (local $end i32) (local $level f64) (local $d f64) (local $q f64)
    (local.set $stop (i32.add (local.get $segs) (i32.mul (local.get $m) (i32.const 24))))
    (block $done
      (loop $segment
        (br_if $done (i32.ge_u (local.get $segs) (local.get $stop)))
        (local.set $k (i32.trunc_f64_s (f64.load (local.get $segs))))
        (local.set $end (i32.trunc_f64_s (f64.load offset=8 (local.get $segs))))
        (local.set $level (f64.load offset=16 (local.get $segs)))
        (block $segmentDone
          (loop $next
            (br_if $segmentDone (i32.ge_s (local.get $k) (local.get $end)))
            (local.set $d (f64.sub (f64.load (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))) (local.get $level)))
            (local.set $q (f64.add (local.get $q) (f64.mul (local.get $d) (local.get $d))))
            (local.set $k (i32.add (local.get $k) (i32.const 1)))
            (br $next)))
        (local.set $segs (i32.add (local.get $segs) (i32.const 24)))
        (br $segment)))
    (local.get $q))

  ;; endSums(pi, pw, m, out): classifyTurning's sums over the last m samples of the current at pi and
  ;; the speed at pw, in order: Σi, Σi·i and Σ|ω| to out, out + 8, out + 16.
  (func (export "endSums") (param $pi i32) (param $pw i32) (param $m i32) (param $out i32)
    (local $stop i32) (local $i f64) (local $end f64) (local $endSq f64) (local $endSpeed f64)
    (local.set $stop (i32.add (local.get $pi) (i32.shl (local.get $m) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $pi) (local.get $stop)))
        (local.set $i (f64.load (local.get $pi)))
        (local.set $end (f64.add (local.get $end) (local.get $i)))
        (local.set $endSq (f64.add (local.get $endSq) (f64.mul (local.get $i) (local.get $i))))
        (local.set $endSpeed (f64.add (local.get $endSpeed) (f64.abs (f64.load (local.get $pw)))))
        (local.set $pi (i32.add (local.get $pi) (i32.const 8)))
        (local.set $pw (i32.add (local.get $pw) (i32.const 8)))
        (br $next)))
    (f64.store (local.get $out) (local.get $end))
    (f64.store offset=8 (local.get $out) (local.get $endSq))
    (f64.store offset=16 (local.get $out) (local.get $endSpeed)))

  ;; sortDoubles(p, n, tmp, counts): sorts the n doubles at p into the order the typed array's own
  ;; sort gives (ascending, −0 before +0), by a least-significant-digit radix sort of their bits made
  ;; order-preserving (a positive double's bits with the sign bit set, a negative one's bits all
  ;; flipped), one byte per pass, skipping the bytes every value shares. The sort is stable and
  ;; equal doubles have the same bits, so the result is the same array. Uses n doubles at tmp and
  ;; 8 · 256 i32 counters at counts. Returns 1 and leaves the doubles as they were when one is NaN
  ;; (the caller then sorts them as before), else 0.
  (func (export "sortDoubles") (param $p i32) (param $n i32) (param $tmp i32) (param $counts i32) (result i32)
    (local $k i32) (local $a i32) (local $x i64) (local $key i64) (local $byte i32) (local $shift i64)
    (local $src i32) (local $dst i32) (local $c i32) (local $sum i32) (local $count i32) (local $t i32)
    (local $stop i32)
    (local.set $stop (i32.add (local.get $p) (i32.shl (local.get $n) (i32.const 3))))
    ;; A NaN has no place in the order: leave it to the caller.
    (local.set $a (local.get $p))
    (block $checked
      (loop $check
        (br_if $checked (i32.ge_u (local.get $a) (local.get $stop)))
        (if (f64.ne (f64.load (local.get $a)) (f64.load (local.get $a))) (then (return (i32.const 1))))
        (local.set $a (i32.add (local.get $a) (i32.const 8)))
        (br $check)))
    ;; Counters to zero.
    (local.set $k (i32.const 0))
    (block $zeroed
      (loop $zero
        (br_if $zeroed (i32.ge_u (local.get $k) (i32.const 2048)))
        (i32.store (i32.add (local.get $counts) (i32.shl (local.get $k) (i32.const 2))) (i32.const 0))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $zero)))
    ;; Keys in place, and the count of each value of each byte.
    (local.set $a (local.get $p))
    (block $keyed
      (loop $keys
        (br_if $keyed (i32.ge_u (local.get $a) (local.get $stop)))
        (local.set $x (i64.load (local.get $a)))
        (local.set $key (i64.xor (local.get $x)
          (i64.or (i64.shr_s (local.get $x) (i64.const 63)) (i64.const 0x8000000000000000))))
        (i64.store (local.get $a) (local.get $key))
        (local.set $byte (i32.const 0))
        (block $counted
          (loop $bytes
            (br_if $counted (i32.ge_u (local.get $byte) (i32.const 8)))
            (local.set $c (i32.add (local.get $counts)
              (i32.shl
                (i32.add (i32.shl (local.get $byte) (i32.const 8))
                  (i32.wrap_i64 (i64.and (i64.shr_u (local.get $key) (i64.extend_i32_u (i32.shl (local.get $byte) (i32.const 3)))) (i64.const 255))))
                (i32.const 2))))
            (i32.store (local.get $c) (i32.add (i32.load (local.get $c)) (i32.const 1)))
            (local.set $byte (i32.add (local.get $byte) (i32.const 1)))
            (br $bytes)))
        (local.set $a (i32.add (local.get $a) (i32.const 8)))
        (br $keys)))
    ;; One pass per byte, least significant first, from src to dst.
    (local.set $src (local.get $p))
    (local.set $dst (local.get $tmp))
    (local.set $byte (i32.const 0))
    (block $sorted
      (loop $pass
        (br_if $sorted (i32.ge_u (local.get $byte) (i32.const 8)))
        (local.set $shift (i64.extend_i32_u (i32.shl (local.get $byte) (i32.const 3))))
        (local.set $c (i32.add (local.get $counts) (i32.shl (local.get $byte) (i32.const 10))))
        ;; (Every value shares this byte when its count is n: nothing to move.)
        (if (i32.ne (local.get $n)
              (i32.load (i32.add (local.get $c)
                (i32.shl (i32.wrap_i64 (i64.and (i64.shr_u (i64.load (local.get $src)) (local.get $shift)) (i64.const 255))) (i32.const 2)))))
          (then
            ;; Counts to first positions.
            (local.set $sum (i32.const 0))
            (local.set $k (i32.const 0))
            (block $summed
              (loop $prefix
                (br_if $summed (i32.ge_u (local.get $k) (i32.const 256)))
                (local.set $t (i32.add (local.get $c) (i32.shl (local.get $k) (i32.const 2))))
                (local.set $count (i32.load (local.get $t)))
                (i32.store (local.get $t) (local.get $sum))
                (local.set $sum (i32.add (local.get $sum) (local.get $count)))
                (local.set $k (i32.add (local.get $k) (i32.const 1)))
                (br $prefix)))
            (local.set $a (local.get $src))
            (local.set $stop (i32.add (local.get $src) (i32.shl (local.get $n) (i32.const 3))))
            (block $moved
              (loop $move
                (br_if $moved (i32.ge_u (local.get $a) (local.get $stop)))
                (local.set $key (i64.load (local.get $a)))
                (local.set $t (i32.add (local.get $c)
                  (i32.shl (i32.wrap_i64 (i64.and (i64.shr_u (local.get $key) (local.get $shift)) (i64.const 255))) (i32.const 2))))
                (local.set $k (i32.load (local.get $t)))
                (i64.store (i32.add (local.get $dst) (i32.shl (local.get $k) (i32.const 3))) (local.get $key))
                (i32.store (local.get $t) (i32.add (local.get $k) (i32.const 1)))
                (local.set $a (i32.add (local.get $a) (i32.const 8)))
                (br $move)))
            (local.set $t (local.get $src))
            (local.set $src (local.get $dst))
            (local.set $dst (local.get $t))))
        (local.set $byte (i32.add (local.get $byte) (i32.const 1)))
        (br $pass)))
    ;; Back to doubles, at p.
    (local.set $k (i32.const 0))
    (block $done
      (loop $back
        (br_if $done (i32.ge_u (local.get $k) (local.get $n)))
        (local.set $key (i64.load (i32.add (local.get $src) (i32.shl (local.get $k) (i32.const 3)))))
        (i64.store (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))
          (i64.xor (local.get $key)
            (i64.or (i64.shr_s (i64.xor (local.get $key) (i64.const -1)) (i64.const 63)) (i64.const 0x8000000000000000))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $back)))
    (i32.const 0))

  ;; intervals(p, n, out): medianInterval's pass: stores time[k] − time[k−1] for k = 1 … n − 1 at out
  ;; and returns 1 when none of them is NaN or zero (the selection then gives the sorted middle), else 0.
  (func (export "intervals") (param $p i32) (param $n i32) (param $out i32) (result i32)
    (local $k i32) (local $x f64) (local $prev f64) (local $t f64) (local $plain i32)
    (local.set $plain (i32.const 1))
    (local.set $prev (f64.load (local.get $p)))
    (local.set $k (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $t (f64.load (i32.add (local.get $p) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $x (f64.sub (local.get $t) (local.get $prev)))
        (f64.store (i32.add (local.get $out) (i32.shl (i32.sub (local.get $k) (i32.const 1)) (i32.const 3))) (local.get $x))
        (if (i32.or (f64.ne (local.get $x) (local.get $x)) (f64.eq (local.get $x) (f64.const 0)))
          (then (local.set $plain (i32.const 0))))
        (local.set $prev (local.get $t))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (local.get $plain))
)
