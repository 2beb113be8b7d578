;; Sums of products of fitLinearModel (its JavaScript, operation for operation, in order of k).
;; Addresses in bytes; series of n doubles. Kept apart from scanKernels.wat so that a detector's
;; series stay in that kernel's memory while it fits a line.
(module
  (import "env" "memory" (memory 1))

  ;; sumsOfTwo: check = Σ y·0, Σa², Σb², Σa·y, Σb·y, Σa·b; stored at out in that order.
  (func (export "sumsOfTwo") (param $pa i32) (param $pb i32) (param $py i32) (param $n i32) (param $out i32)
    (local $k i32) (local $at i32) (local $u f64) (local $v f64) (local $w f64)
    (local $check f64) (local $aa f64) (local $bb f64) (local $ay f64) (local $by f64) (local $ab f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $at (i32.shl (local.get $k) (i32.const 3)))
        (local.set $u (f64.load (i32.add (local.get $pa) (local.get $at))))
        (local.set $v (f64.load (i32.add (local.get $pb) (local.get $at))))
        (local.set $w (f64.load (i32.add (local.get $py) (local.get $at))))
        (local.set $check (f64.add (local.get $check) (f64.mul (local.get $w) (f64.const 0))))
        (local.set $aa (f64.add (local.get $aa) (f64.mul (local.get $u) (local.get $u))))
        (local.set $ay (f64.add (local.get $ay) (f64.mul (local.get $u) (local.get $w))))
        (local.set $ab (f64.add (local.get $ab) (f64.mul (local.get $u) (local.get $v))))
        (local.set $bb (f64.add (local.get $bb) (f64.mul (local.get $v) (local.get $v))))
        (local.set $by (f64.add (local.get $by) (f64.mul (local.get $v) (local.get $w))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $check))
    (f64.store offset=8 (local.get $out) (local.get $aa))
    (f64.store offset=16 (local.get $out) (local.get $bb))
    (f64.store offset=24 (local.get $out) (local.get $ay))
    (f64.store offset=32 (local.get $out) (local.get $by))
    (f64.store offset=40 (local.get $out) (local.get $ab)))

  ;; sumsOfThree: check, Σa², Σb², Σc², Σa·y, Σb·y, Σc·y, Σa·b, Σa·c, Σb·c; stored at out in that order.
  (func (export "sumsOfThree") (param $pa i32) (param $pb i32) (param $pc i32) (param $py i32) (param $n i32) (param $out i32)
    (local $k i32) (local $at i32) (local $u f64) (local $v f64) (local $t f64) (local $w f64)
    (local $check f64) (local $aa f64) (local $bb f64) (local $cc f64) (local $ay f64) (local $by f64) (local $cy f64)
    (local $ab f64) (local $ac f64) (local $bc f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $at (i32.shl (local.get $k) (i32.const 3)))
        (local.set $u (f64.load (i32.add (local.get $pa) (local.get $at))))
        (local.set $v (f64.load (i32.add (local.get $pb) (local.get $at))))
        (local.set $t (f64.load (i32.add (local.get $pc) (local.get $at))))
        (local.set $w (f64.load (i32.add (local.get $py) (local.get $at))))
        (local.set $check (f64.add (local.get $check) (f64.mul (local.get $w) (f64.const 0))))
        (local.set $aa (f64.add (local.get $aa) (f64.mul (local.get $u) (local.get $u))))
        (local.set $ay (f64.add (local.get $ay) (f64.mul (local.get $u) (local.get $w))))
        (local.set $ab (f64.add (local.get $ab) (f64.mul (local.get $u) (local.get $v))))
        (local.set $ac (f64.add (local.get $ac) (f64.mul (local.get $u) (local.get $t))))
        (local.set $bb (f64.add (local.get $bb) (f64.mul (local.get $v) (local.get $v))))
        (local.set $by (f64.add (local.get $by) (f64.mul (local.get $v) (local.get $w))))
        (local.set $bc (f64.add (local.get $bc) (f64.mul (local.get $v) (local.get $t))))
        (local.set $cc (f64.add (local.get $cc) (f64.mul (local.get $t) (local.get $t))))
        (local.set $cy (f64.add (local.get $cy) (f64.mul (local.get $t) (local.get $w))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (f64.store offset=0 (local.get $out) (local.get $check))
    (f64.store offset=8 (local.get $out) (local.get $aa))
    (f64.store offset=16 (local.get $out) (local.get $bb))
    (f64.store offset=24 (local.get $out) (local.get $cc))
    (f64.store offset=32 (local.get $out) (local.get $ay))
    (f64.store offset=40 (local.get $out) (local.get $by))
    (f64.store offset=48 (local.get $out) (local.get $cy))
    (f64.store offset=56 (local.get $out) (local.get $ab))
    (f64.store offset=64 (local.get $out) (local.get $ac))
    (f64.store offset=72 (local.get $out) (local.get $bc)))

  ;; ssrTwo: Σ e² with e = y − b0·a − b1·b.
  (func (export "ssrTwo") (param $pa i32) (param $pb i32) (param $py i32) (param $n i32) (param $b0 f64) (param $b1 f64) (result f64)
    (local $k i32) (local $at i32) (local $e f64) (local $ssr f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $at (i32.shl (local.get $k) (i32.const 3)))
        (local.set $e (f64.sub
          (f64.sub (f64.load (i32.add (local.get $py) (local.get $at))) (f64.mul (local.get $b0) (f64.load (i32.add (local.get $pa) (local.get $at)))))
          (f64.mul (local.get $b1) (f64.load (i32.add (local.get $pb) (local.get $at))))))
        (local.set $ssr (f64.add (local.get $ssr) (f64.mul (local.get $e) (local.get $e))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (local.get $ssr))

  ;; ssrThree: Σ e² with e = y − b0·a − b1·b − b2·c.
  (func (export "ssrThree") (param $pa i32) (param $pb i32) (param $pc i32) (param $py i32) (param $n i32) (param $b0 f64) (param $b1 f64) (param $b2 f64) (result f64)
    (local $k i32) (local $at i32) (local $e f64) (local $ssr f64)
    (block $done
      (loop $next
        (br_if $done (i32.ge_s (local.get $k) (local.get $n)))
        (local.set $at (i32.shl (local.get $k) (i32.const 3)))
        (local.set $e (f64.sub
          (f64.sub
            (f64.sub (f64.load (i32.add (local.get $py) (local.get $at))) (f64.mul (local.get $b0) (f64.load (i32.add (local.get $pa) (local.get $at)))))
            (f64.mul (local.get $b1) (f64.load (i32.add (local.get $pb) (local.get $at)))))
          (f64.mul (local.get $b2) (f64.load (i32.add (local.get $pc) (local.get $at))))))
        (local.set $ssr (f64.add (local.get $ssr) (f64.mul (local.get $e) (local.get $e))))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $next)))
    (local.get $ssr))
)
