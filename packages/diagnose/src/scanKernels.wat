;; One-pass loops of the detectors over the samples (the JavaScript of passes.ts, operation for
;; operation: the same f64 operations in the same order, so the same bits). Addresses in bytes;
;; a series of n doubles at address p has sample k at p + 8k. "finite" is |x| < inf (false for
;; NaN and ±inf, as Number.isFinite). Comparisons with NaN are false, as in JavaScript.
(module
  (import "env" "memory" (memory 1))

  ;; finiteResiduals: over k < n with y = f64[py], yh = f64[pyh] both finite: r = yh − y stored
  ;; at pe + 8m (m counting the kept rows), sy += y, se += r. Stores sy, se at out; returns m.
  (func (export "finiteResiduals") (param $py i32) (param $pyh i32) (param $pe i32) (param $n i32) (param $out i32) (result i32)
    (local $k i32) (local $m i32) (local $y f64) (local $yh f64) (local $r f64) (local $sy f64) (local $se f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $y (f64.load (i32.add (local.get $py) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $yh (f64.load (i32.add (local.get $pyh) (i32.shl (local.get $k) (i32.const 3)))))
        (if (i32.and (f64.lt (f64.abs (local.get $y)) (f64.const inf)) (f64.lt (f64.abs (local.get $yh)) (f64.const inf)))
          (then
            (local.set $r (f64.sub (local.get $yh) (local.get $y)))
            (f64.store (i32.add (local.get $pe) (i32.shl (local.get $m) (i32.const 3))) (local.get $r))
            (local.set $m (i32.add (local.get $m) (i32.const 1)))
            (local.set $sy (f64.add (local.get $sy) (local.get $y)))
            (local.set $se (f64.add (local.get $se) (local.get $r)))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $sy))
    (f64.store offset=8 (local.get $out) (local.get $se))
    (local.get $m))

  ;; residualSums: over k < n (all rows when $all, else those with f64[py] and f64[pyh] finite),
  ;; r = f64[pres + 8j] for the j-th kept row, v = r − mean stored at pdev + 8j (pdev may be pres),
  ;; c0 += v·v, Neumaier sums of r·r and (y − ybar)², and the runs counts on the sign of r.
  ;; Stores c0, see, cee, syy, cyy, above, below, runs (as f64) at out.
  (func (export "residualSums") (param $py i32) (param $pyh i32) (param $pres i32) (param $pdev i32) (param $n i32)
      (param $mean f64) (param $ybar f64) (param $all i32) (param $out i32)
    (local $k i32) (local $j i32) (local $y f64) (local $r f64) (local $v f64) (local $a f64) (local $d f64) (local $t f64)
    (local $c0 f64) (local $see f64) (local $cee f64) (local $syy f64) (local $cyy f64)
    (local $above i32) (local $below i32) (local $runs i32) (local $last i32) (local $sign i32)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $y (f64.load (i32.add (local.get $py) (i32.shl (local.get $k) (i32.const 3)))))
        (block $skip
          (if (i32.eqz (local.get $all))
            (then
              (br_if $skip (i32.eqz (f64.lt (f64.abs (local.get $y)) (f64.const inf))))
              (br_if $skip (i32.eqz (f64.lt (f64.abs (f64.load (i32.add (local.get $pyh) (i32.shl (local.get $k) (i32.const 3))))) (f64.const inf))))))
          (local.set $r (f64.load (i32.add (local.get $pres) (i32.shl (local.get $j) (i32.const 3)))))
          (local.set $v (f64.sub (local.get $r) (local.get $mean)))
          (f64.store (i32.add (local.get $pdev) (i32.shl (local.get $j) (i32.const 3))) (local.get $v))
          (local.set $j (i32.add (local.get $j) (i32.const 1)))
          (local.set $c0 (f64.add (local.get $c0) (f64.mul (local.get $v) (local.get $v))))
          (local.set $a (f64.mul (local.get $r) (local.get $r)))
          (local.set $t (f64.add (local.get $see) (local.get $a)))
          (local.set $cee (f64.add (local.get $cee)
            (if (result f64) (f64.ge (f64.abs (local.get $see)) (local.get $a))
              (then (f64.add (f64.sub (local.get $see) (local.get $t)) (local.get $a)))
              (else (f64.add (f64.sub (local.get $a) (local.get $t)) (local.get $see))))))
          (local.set $see (local.get $t))
          (local.set $d (f64.mul (f64.sub (local.get $y) (local.get $ybar)) (f64.sub (local.get $y) (local.get $ybar))))
          (local.set $t (f64.add (local.get $syy) (local.get $d)))
          (local.set $cyy (f64.add (local.get $cyy)
            (if (result f64) (f64.ge (f64.abs (local.get $syy)) (local.get $d))
              (then (f64.add (f64.sub (local.get $syy) (local.get $t)) (local.get $d)))
              (else (f64.add (f64.sub (local.get $d) (local.get $t)) (local.get $syy))))))
          (local.set $syy (local.get $t))
          (if (f64.ne (local.get $r) (f64.const 0))
            (then
              (local.set $sign (select (i32.const 1) (i32.const -1) (f64.gt (local.get $r) (f64.const 0))))
              (if (i32.gt_s (local.get $sign) (i32.const 0))
                (then (local.set $above (i32.add (local.get $above) (i32.const 1))))
                (else (local.set $below (i32.add (local.get $below) (i32.const 1)))))
              (if (i32.ne (local.get $sign) (local.get $last))
                (then (local.set $runs (i32.add (local.get $runs) (i32.const 1)))))
              (local.set $last (local.get $sign)))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $c0))
    (f64.store offset=8 (local.get $out) (local.get $see))
    (f64.store offset=16 (local.get $out) (local.get $cee))
    (f64.store offset=24 (local.get $out) (local.get $syy))
    (f64.store offset=32 (local.get $out) (local.get $cyy))
    (f64.store offset=40 (local.get $out) (f64.convert_i32_s (local.get $above)))
    (f64.store offset=48 (local.get $out) (f64.convert_i32_s (local.get $below)))
    (f64.store offset=56 (local.get $out) (f64.convert_i32_s (local.get $runs))))

  ;; extremes: min and max of the n doubles at px, read in order (v > max, v < min), stored at out.
  (func (export "extremes") (param $px i32) (param $n i32) (param $out i32)
    (local $k i32) (local $v f64) (local $min f64) (local $max f64)
    (local.set $min (f64.const inf))
    (local.set $max (f64.const -inf))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $v (f64.load (i32.add (local.get $px) (i32.shl (local.get $k) (i32.const 3)))))
        (if (f64.gt (local.get $v) (local.get $max)) (then (local.set $max (local.get $v))))
        (if (f64.lt (local.get $v) (local.get $min)) (then (local.set $min (local.get $v))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $min))
    (f64.store offset=8 (local.get $out) (local.get $max)))

  ;; pinnedSamples: the samples on runs (≥ 3) of exactly `rail` that arrive moving or last `longest`.
  (func (export "pinnedSamples") (param $px i32) (param $n i32) (param $rail f64) (param $side f64) (param $sigma4 f64)
      (param $longest f64) (param $minSlope f64) (result i32)
    (local $k i32) (local $e i32) (local $len i32) (local $total i32) (local $moving i32)
    (local $slope f64) (local $carried f64) (local $x1 f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (if (f64.ne (f64.load (i32.add (local.get $px) (i32.shl (local.get $k) (i32.const 3)))) (local.get $rail))
          (then
            (local.set $k (i32.add (local.get $k) (i32.const 1)))
            (br $next)))
        (local.set $e (local.get $k))
        (block $end
          (loop $more
            (br_if $end (i32.ge_s (local.get $e) (local.get $n)))
            (br_if $end (f64.ne (f64.load (i32.add (local.get $px) (i32.shl (local.get $e) (i32.const 3)))) (local.get $rail)))
            (local.set $e (i32.add (local.get $e) (i32.const 1)))
            (br $more)))
        (local.set $len (i32.sub (local.get $e) (local.get $k)))
        (if (i32.ge_s (local.get $len) (i32.const 3))
          (then
            (local.set $moving (i32.const 0))
            (if (i32.ge_s (local.get $k) (i32.const 6))
              (then
                (local.set $x1 (f64.load (i32.add (local.get $px) (i32.shl (i32.sub (local.get $k) (i32.const 1)) (i32.const 3)))))
                (local.set $slope (f64.div
                  (f64.sub (local.get $x1) (f64.load (i32.add (local.get $px) (i32.shl (i32.sub (local.get $k) (i32.const 6)) (i32.const 3)))))
                  (f64.const 5)))
                (local.set $carried (f64.add (local.get $x1)
                  (f64.mul (local.get $slope) (f64.div (f64.convert_i32_s (local.get $len)) (f64.const 2)))))
                (local.set $moving (i32.and
                  (f64.gt (f64.mul (local.get $side) (f64.sub (local.get $carried) (local.get $rail))) (local.get $sigma4))
                  (f64.gt (f64.mul (local.get $side) (local.get $slope)) (local.get $minSlope))))))
            (if (i32.or (local.get $moving)
                  (i32.and (f64.ge (f64.convert_i32_s (local.get $len)) (local.get $longest)) (i32.gt_s (local.get $k) (i32.const 0))))
              (then (local.set $total (i32.add (local.get $total) (local.get $len)))))))
        (local.set $k (local.get $e))
        (br $next)))
    (local.get $total))

  ;; absInto: f64[pout + 8k] = |f64[px + 8k]| for k < n.
  (func (export "absInto") (param $px i32) (param $pout i32) (param $n i32)
    (local $k i32)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (f64.store (i32.add (local.get $pout) (i32.shl (local.get $k) (i32.const 3)))
          (f64.abs (f64.load (i32.add (local.get $px) (i32.shl (local.get $k) (i32.const 3))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
  )

  ;; plateauRun: the longest run of |current| ≥ threshold, with the speed's range over it: stores
  ;; count, wLo, wHi at out (as detectSaturation's loop).
  (func (export "plateauRun") (param $pi i32) (param $pw i32) (param $n i32) (param $threshold f64) (param $out i32)
    (local $k i32) (local $count i32) (local $run i32) (local $w f64)
    (local $wLo f64) (local $wHi f64) (local $lo f64) (local $hi f64)
    (local.set $wLo (f64.const inf)) (local.set $wHi (f64.const -inf))
    (local.set $lo (f64.const inf)) (local.set $hi (f64.const -inf))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (if (f64.ge (f64.abs (f64.load (i32.add (local.get $pi) (i32.shl (local.get $k) (i32.const 3))))) (local.get $threshold))
          (then
            (local.set $run (i32.add (local.get $run) (i32.const 1)))
            (local.set $w (f64.load (i32.add (local.get $pw) (i32.shl (local.get $k) (i32.const 3)))))
            (if (f64.lt (local.get $w) (local.get $lo)) (then (local.set $lo (local.get $w))))
            (if (f64.gt (local.get $w) (local.get $hi)) (then (local.set $hi (local.get $w))))
            (if (i32.gt_s (local.get $run) (local.get $count))
              (then (local.set $count (local.get $run)) (local.set $wLo (local.get $lo)) (local.set $wHi (local.get $hi)))))
          (else
            (local.set $run (i32.const 0)) (local.set $lo (f64.const inf)) (local.set $hi (f64.const -inf))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (f64.convert_i32_s (local.get $count)))
    (f64.store offset=8 (local.get $out) (local.get $wLo))
    (f64.store offset=16 (local.get $out) (local.get $wHi)))

  ;; firstNotFinite: the first k < n with f64[px + 8k] not finite, or −1.
  (func (export "firstNotFinite") (param $px i32) (param $n i32) (result i32)
    (local $k i32)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (if (i32.eqz (f64.lt (f64.abs (f64.load (i32.add (local.get $px) (i32.shl (local.get $k) (i32.const 3))))) (f64.const inf)))
          (then (return (local.get $k))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (i32.const -1))

  ;; olsMeans: over k < n with y and x finite: m, Σx, Σy (in order); stores Σx, Σy at out, returns m.
  (func (export "olsMeans") (param $px i32) (param $py i32) (param $n i32) (param $out i32) (result i32)
    (local $k i32) (local $m i32) (local $x f64) (local $y f64) (local $sx f64) (local $sy f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $y (f64.load (i32.add (local.get $py) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $x (f64.load (i32.add (local.get $px) (i32.shl (local.get $k) (i32.const 3)))))
        (if (i32.and (f64.lt (f64.abs (local.get $y)) (f64.const inf)) (f64.lt (f64.abs (local.get $x)) (f64.const inf)))
          (then
            (local.set $m (i32.add (local.get $m) (i32.const 1)))
            (local.set $sx (f64.add (local.get $sx) (local.get $x)))
            (local.set $sy (f64.add (local.get $sy) (local.get $y)))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $sx))
    (f64.store offset=8 (local.get $out) (local.get $sy))
    (local.get $m))

  ;; olsMoments: Σ dx², Σ dx·(y − yb) with dx = x − xb over the rows (all, or those with y and x
  ;; finite); stored at out.
  (func (export "olsMoments") (param $px i32) (param $py i32) (param $n i32) (param $xb f64) (param $yb f64) (param $all i32) (param $out i32)
    (local $k i32) (local $x f64) (local $y f64) (local $dx f64) (local $sxx f64) (local $sxy f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $y (f64.load (i32.add (local.get $py) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $x (f64.load (i32.add (local.get $px) (i32.shl (local.get $k) (i32.const 3)))))
        (if (i32.or (local.get $all)
              (i32.and (f64.lt (f64.abs (local.get $y)) (f64.const inf)) (f64.lt (f64.abs (local.get $x)) (f64.const inf))))
          (then
            (local.set $dx (f64.sub (local.get $x) (local.get $xb)))
            (local.set $sxx (f64.add (local.get $sxx) (f64.mul (local.get $dx) (local.get $dx))))
            (local.set $sxy (f64.add (local.get $sxy) (f64.mul (local.get $dx) (f64.sub (local.get $y) (local.get $yb)))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $sxx))
    (f64.store offset=8 (local.get $out) (local.get $sxy)))

  ;; olsLagOne: e = y − intercept − slope·x over the rows (a skipped row resets the previous e to
  ;; NaN), Σe² and Σ e·e_prev over consecutive kept rows; stored at out.
  (func (export "olsLagOne") (param $px i32) (param $py i32) (param $n i32) (param $intercept f64) (param $slope f64) (param $all i32) (param $out i32)
    (local $k i32) (local $x f64) (local $y f64) (local $e f64) (local $prev f64) (local $ss f64) (local $s1 f64)
    (local.set $prev (f64.const nan))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $y (f64.load (i32.add (local.get $py) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $x (f64.load (i32.add (local.get $px) (i32.shl (local.get $k) (i32.const 3)))))
        (if (i32.or (local.get $all)
              (i32.and (f64.lt (f64.abs (local.get $y)) (f64.const inf)) (f64.lt (f64.abs (local.get $x)) (f64.const inf))))
          (then
            (local.set $e (f64.sub (f64.sub (local.get $y) (local.get $intercept)) (f64.mul (local.get $slope) (local.get $x))))
            (local.set $ss (f64.add (local.get $ss) (f64.mul (local.get $e) (local.get $e))))
            (if (f64.lt (f64.abs (local.get $prev)) (f64.const inf))
              (then (local.set $s1 (f64.add (local.get $s1) (f64.mul (local.get $e) (local.get $prev))))))
            (local.set $prev (local.get $e)))
          (else (local.set $prev (f64.const nan))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $ss))
    (f64.store offset=8 (local.get $out) (local.get $s1)))

  ;; finiteRange: smallest and largest f64[pt + 8k] over the k with f64[pr + 8k] finite (t < t0,
  ;; t > t1 in order); stored at out.
  (func (export "finiteRange") (param $pt i32) (param $pr i32) (param $n i32) (param $out i32)
    (local $k i32) (local $t f64) (local $t0 f64) (local $t1 f64)
    (local.set $t0 (f64.const inf))
    (local.set $t1 (f64.const -inf))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (if (f64.lt (f64.abs (f64.load (i32.add (local.get $pr) (i32.shl (local.get $k) (i32.const 3))))) (f64.const inf))
          (then
            (local.set $t (f64.load (i32.add (local.get $pt) (i32.shl (local.get $k) (i32.const 3)))))
            (if (f64.lt (local.get $t) (local.get $t0)) (then (local.set $t0 (local.get $t))))
            (if (f64.gt (local.get $t) (local.get $t1)) (then (local.set $t1 (local.get $t))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $t0))
    (f64.store offset=8 (local.get $out) (local.get $t1)))

  ;; meanSquares: mean = Σv / n, then Σ (v − mean)·(v − mean); stores mean, ss at out.
  (func (export "meanSquares") (param $pv i32) (param $n i32) (param $out i32)
    (local $k i32) (local $mean f64) (local $ss f64) (local $d f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $mean (f64.add (local.get $mean) (f64.load (i32.add (local.get $pv) (i32.shl (local.get $k) (i32.const 3))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (local.set $mean (f64.div (local.get $mean) (f64.convert_i32_s (local.get $n))))
    (local.set $k (i32.const 0))
    (block $done2
      (loop $next2
        (br_if $done2 (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $d (f64.sub (f64.load (i32.add (local.get $pv) (i32.shl (local.get $k) (i32.const 3)))) (local.get $mean)))
        (local.set $ss (f64.add (local.get $ss) (f64.mul (local.get $d) (local.get $d))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next2)))
    (f64.store offset=0 (local.get $out) (local.get $mean))
    (f64.store offset=8 (local.get $out) (local.get $ss)))
  ;; signRows (detectResidualCoulomb): over k < n (all rows when $all, else those with the residual
  ;; r and the speed w finite, their k stored as i32 at prows + 4m and r at py + 8m): s = 1 when
  ;; w > dead, −1 when w < −dead, else 0, stored at ps + 8m. Stores pos, neg, rest at out; returns m.
  (func (export "signRows") (param $pw i32) (param $pr i32) (param $n i32) (param $dead f64) (param $all i32)
      (param $ps i32) (param $py i32) (param $prows i32) (param $out i32) (result i32)
    (local $k i32) (local $m i32) (local $r f64) (local $w f64) (local $pos i32) (local $neg i32) (local $rest i32)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $r (f64.load (i32.add (local.get $pr) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $w (f64.load (i32.add (local.get $pw) (i32.shl (local.get $k) (i32.const 3)))))
        (block $skip
          (if (i32.eqz (local.get $all))
            (then
              (br_if $skip (i32.eqz (i32.and (f64.lt (f64.abs (local.get $r)) (f64.const inf)) (f64.lt (f64.abs (local.get $w)) (f64.const inf)))))
              (i32.store (i32.add (local.get $prows) (i32.shl (local.get $m) (i32.const 2))) (local.get $k))
              (f64.store (i32.add (local.get $py) (i32.shl (local.get $m) (i32.const 3))) (local.get $r))))
          (if (f64.gt (local.get $w) (local.get $dead))
            (then
              (local.set $pos (i32.add (local.get $pos) (i32.const 1)))
              (f64.store (i32.add (local.get $ps) (i32.shl (local.get $m) (i32.const 3))) (f64.const 1)))
            (else
              (if (f64.lt (local.get $w) (f64.neg (local.get $dead)))
                (then
                  (local.set $neg (i32.add (local.get $neg) (i32.const 1)))
                  (f64.store (i32.add (local.get $ps) (i32.shl (local.get $m) (i32.const 3))) (f64.const -1)))
                (else
                  (local.set $rest (i32.add (local.get $rest) (i32.const 1)))
                  (f64.store (i32.add (local.get $ps) (i32.shl (local.get $m) (i32.const 3))) (f64.const 0))))))
          (local.set $m (i32.add (local.get $m) (i32.const 1))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (f64.convert_i32_s (local.get $pos)))
    (f64.store offset=8 (local.get $out) (f64.convert_i32_s (local.get $neg)))
    (f64.store offset=16 (local.get $out) (f64.convert_i32_s (local.get $rest)))
    (local.get $m))

  ;; lagOneSums (detectResidualCoulomb): e_j = y_j − c − g·s_j for j < m, Σe² and Σ e_j·e_{j−1} over
  ;; consecutive rows (all when $prows is −1, else rows (i32) that follow each other); stored at out.
  (func (export "lagOneSums") (param $py i32) (param $ps i32) (param $prows i32) (param $m i32) (param $c f64) (param $g f64) (param $out i32)
    (local $j i32) (local $e f64) (local $prev f64) (local $ss f64) (local $s1 f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $j) (local.get $m)))
        (local.set $e (f64.sub
          (f64.sub (f64.load (i32.add (local.get $py) (i32.shl (local.get $j) (i32.const 3)))) (local.get $c))
          (f64.mul (local.get $g) (f64.load (i32.add (local.get $ps) (i32.shl (local.get $j) (i32.const 3)))))))
        (local.set $ss (f64.add (local.get $ss) (f64.mul (local.get $e) (local.get $e))))
        (if (i32.gt_s (local.get $j) (i32.const 0))
          (then
            (if (if (result i32) (i32.eq (local.get $prows) (i32.const -1))
                  (then (i32.const 1))
                  (else
                    (i32.eq (i32.load (i32.add (local.get $prows) (i32.shl (local.get $j) (i32.const 2))))
                      (i32.add (i32.load (i32.add (local.get $prows) (i32.shl (i32.sub (local.get $j) (i32.const 1)) (i32.const 2)))) (i32.const 1)))))
              (then (local.set $s1 (f64.add (local.get $s1) (f64.mul (local.get $e) (local.get $prev))))))))
        (local.set $prev (local.get $e))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $ss))
    (f64.store offset=8 (local.get $out) (local.get $s1)))

  ;; restRows (detectSensorOffset): the k < n with !(|v| ≥ vLimit) and, when $hasOther,
  ;; !(|o| ≥ oLimit), stored as i32 at pidx + 4m in order; returns m.
  (func (export "restRows") (param $pv i32) (param $vLimit f64) (param $po i32) (param $oLimit f64) (param $hasOther i32) (param $n i32) (param $pidx i32) (result i32)
    (local $k i32) (local $m i32)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (if (i32.eqz (f64.ge (f64.abs (f64.load (i32.add (local.get $pv) (i32.shl (local.get $k) (i32.const 3))))) (local.get $vLimit)))
          (then
            (if (i32.or (i32.eqz (local.get $hasOther))
                  (i32.eqz (f64.ge (f64.abs (f64.load (i32.add (local.get $po) (i32.shl (local.get $k) (i32.const 3))))) (local.get $oLimit))))
              (then
                (i32.store (i32.add (local.get $pidx) (i32.shl (local.get $m) (i32.const 2))) (local.get $k))
                (local.set $m (i32.add (local.get $m) (i32.const 1)))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (local.get $m))

  ;; delaySteps (detectResidualDelay): steps[k] = Δv(k) = v[k] − v[k−1] where finite (else 0;
  ;; steps[0] = 0), with vv = Σ Δv² over those; kept[k] = e[k] where finite (else 0) unless
  ;; $finite (every e finite: kept is not written); ee = Σ e² and rows over k ≥ 1 with e finite.
  ;; Stores vv, ee, rows at out.
  (func (export "delaySteps") (param $pv i32) (param $pr i32) (param $n i32) (param $finite i32) (param $psteps i32) (param $pkept i32) (param $out i32)
    (local $k i32) (local $e f64) (local $dv f64) (local $vv f64) (local $ee f64) (local $rows i32) (local $fin i32)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $e (f64.load (i32.add (local.get $pr) (i32.shl (local.get $k) (i32.const 3)))))
        (local.set $fin (f64.lt (f64.abs (local.get $e)) (f64.const inf)))
        (if (i32.eqz (local.get $finite))
          (then (f64.store (i32.add (local.get $pkept) (i32.shl (local.get $k) (i32.const 3)))
            (select (local.get $e) (f64.const 0) (local.get $fin)))))
        (if (i32.eqz (local.get $k))
          (then
            (f64.store (local.get $psteps) (f64.const 0))
            (local.set $k (i32.const 1))
            (br $next)))
        (local.set $dv (f64.sub
          (f64.load (i32.add (local.get $pv) (i32.shl (local.get $k) (i32.const 3))))
          (f64.load (i32.add (local.get $pv) (i32.shl (i32.sub (local.get $k) (i32.const 1)) (i32.const 3))))))
        (if (f64.lt (f64.abs (local.get $dv)) (f64.const inf))
          (then
            (f64.store (i32.add (local.get $psteps) (i32.shl (local.get $k) (i32.const 3))) (local.get $dv))
            (local.set $vv (f64.add (local.get $vv) (f64.mul (local.get $dv) (local.get $dv)))))
          (else (f64.store (i32.add (local.get $psteps) (i32.shl (local.get $k) (i32.const 3))) (f64.const 0))))
        (if (local.get $fin)
          (then
            (local.set $ee (f64.add (local.get $ee) (f64.mul (local.get $e) (local.get $e))))
            (local.set $rows (i32.add (local.get $rows) (i32.const 1)))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $vv))
    (f64.store offset=8 (local.get $out) (local.get $ee))
    (f64.store offset=16 (local.get $out) (f64.convert_i32_s (local.get $rows))))

  ;; increments (detectInputDelay): da[k−1] = a[k] − a[k−1], db[k−1] = b[k] − b[k−1] for 1 ≤ k < n,
  ;; with Σ da² and Σ db² (each term read back as stored); stored at out.
  (func (export "increments") (param $pa i32) (param $pb i32) (param $n i32) (param $pda i32) (param $pdb i32) (param $out i32)
    (local $k i32) (local $d f64) (local $aa f64) (local $bb f64) (local $at i32)
    (local.set $k (i32.const 1))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $at (i32.shl (local.get $k) (i32.const 3)))
        (local.set $d (f64.sub (f64.load (i32.add (local.get $pa) (local.get $at))) (f64.load (i32.add (local.get $pa) (i32.sub (local.get $at) (i32.const 8))))))
        (f64.store (i32.add (local.get $pda) (i32.sub (local.get $at) (i32.const 8))) (local.get $d))
        (local.set $aa (f64.add (local.get $aa) (f64.mul (local.get $d) (local.get $d))))
        (local.set $d (f64.sub (f64.load (i32.add (local.get $pb) (local.get $at))) (f64.load (i32.add (local.get $pb) (i32.sub (local.get $at) (i32.const 8))))))
        (f64.store (i32.add (local.get $pdb) (i32.sub (local.get $at) (i32.const 8))) (local.get $d))
        (local.set $bb (f64.add (local.get $bb) (f64.mul (local.get $d) (local.get $d))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $aa))
    (f64.store offset=8 (local.get $out) (local.get $bb)))

  ;; sumInto (diagnoseFit's model output): out[k] = a[k] + b[k]; returns how many are finite.
  (func (export "sumInto") (param $pa i32) (param $pb i32) (param $pout i32) (param $n i32) (result i32)
    (local $k i32) (local $v f64) (local $finite i32) (local $at i32)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $at (i32.shl (local.get $k) (i32.const 3)))
        (local.set $v (f64.add (f64.load (i32.add (local.get $pa) (local.get $at))) (f64.load (i32.add (local.get $pb) (local.get $at)))))
        (f64.store (i32.add (local.get $pout) (local.get $at)) (local.get $v))
        (if (f64.lt (f64.abs (local.get $v)) (f64.const inf)) (then (local.set $finite (i32.add (local.get $finite) (i32.const 1)))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (local.get $finite))

  ;; centralDifferences (mechanicalRegression): the range of w in order of k (v < min, v > max) and
  ;; acc[k] = (w[k+1] − w[k−1]) / h2 for 1 ≤ k < n − 1 (acc[0] and acc[n−1] = 0); min, max at out.
  (func (export "centralDifferences") (param $pw i32) (param $n i32) (param $h2 f64) (param $pacc i32) (param $out i32)
    (local $k i32) (local $v f64) (local $min f64) (local $max f64) (local $at i32)
    (local.set $min (f64.const inf))
    (local.set $max (f64.const -inf))
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $at (i32.shl (local.get $k) (i32.const 3)))
        (local.set $v (f64.load (i32.add (local.get $pw) (local.get $at))))
        (if (f64.lt (local.get $v) (local.get $min)) (then (local.set $min (local.get $v))))
        (if (f64.gt (local.get $v) (local.get $max)) (then (local.set $max (local.get $v))))
        (if (i32.and (i32.ge_s (local.get $k) (i32.const 1)) (i32.lt_s (i32.add (local.get $k) (i32.const 1)) (local.get $n)))
          (then
            (f64.store (i32.add (local.get $pacc) (local.get $at))
              (f64.div
                (f64.sub (f64.load (i32.add (local.get $pw) (i32.add (local.get $at) (i32.const 8)))) (f64.load (i32.add (local.get $pw) (i32.sub (local.get $at) (i32.const 8)))))
                (local.get $h2))))
          (else (f64.store (i32.add (local.get $pacc) (local.get $at)) (f64.const 0))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $min))
    (f64.store offset=8 (local.get $out) (local.get $max)))

  ;; signWithDeadBand (mechanicalRegression): s[k] = 1 when w[k] > band, −1 when w[k] < −band, else 0.
  (func (export "signWithDeadBand") (param $pw i32) (param $n i32) (param $band f64) (param $ps i32)
    (local $k i32) (local $v f64) (local $at i32)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $at (i32.shl (local.get $k) (i32.const 3)))
        (local.set $v (f64.load (i32.add (local.get $pw) (local.get $at))))
        (f64.store (i32.add (local.get $ps) (local.get $at))
          (if (result f64) (f64.gt (local.get $v) (local.get $band))
            (then (f64.const 1))
            (else (if (result f64) (f64.lt (local.get $v) (f64.neg (local.get $band))) (then (f64.const -1)) (else (f64.const 0))))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
  )
)
