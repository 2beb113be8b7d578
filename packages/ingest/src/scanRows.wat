;; Lines of numeric CSV cells scanned, converted and checked in one pass (the kernel of
;; scanRows.ts, called by the ingestor's byte reader).
;;
;; run(pos, end, maxRows, nCols, delim, dec, nl, maxLine, config, timeCol, haveLast, lastTime)
;; reads the lines of memory[pos…end) (each one ends with the byte nl; end is just after one). A
;; line is kept when it has nCols cells (or more, the others blank: a trailing delimiter), at most
;; maxLine bytes before its newline, each of the nCols cells is a plain number that the kernel reads
;; exactly as scanCellBytes (parseCell.ts) does, and
;; every column passes the check commit() (createIngestor.ts) makes: column c has at config + 64c
;; the doubles kind, dest, factor, offset, min, max, blanks, first; kind 0 (a role) stores
;; v · factor + offset, which must lie in [min, max] (so a blank cell, NaN, stops there), and for
;; column timeCol must exceed the last kept time (when haveLast); kind 1 (extra) stores v; kind 2
;; (spread) stores v · factor; for these two the kernel counts the kept rows whose cell is blank
;; (NaN) in `blanks` and notes the first one's row m in `first`. The value goes to row m
;; of output array dest; the arrays (maxRows doubles each) follow the scratch row (nCols doubles)
;; that follows the config. The kernel stops at end or after maxRows kept lines (status 0), or at
;; a line it does not keep: status 1 when it did not read the cells (left to the JavaScript
;; scanner), 2 when it read them (left in the scratch row) but a check failed (left to commit()).
;; It stores as doubles: at 184 where to go on (after the line it stopped at, if any), at 192 the
;; number of lines kept, at 216 how many of them had blank cells past the nCols, and for the line
;; it stopped at (status 1 or 2) its start at 208 and (status 2) its number of cells at 200.
;;
;; Each cell follows scanCellBytes step by step: blanks, sign, up to 17 significant digits (the
;; first 9 in `high`, the next 8 in `low`, integers held exactly in i64), decimal point, exponent of
;; at most 4 digits, trailing blanks; the value is made by the same f64 operations in the same
;; order as storeValue and storeQuotient (Clinger's fast path; the 16–17 digit quotient with
;; Dekker's exact product and Shewchuk's Two-Sum sign test), and converted as commit() converts
;; it, so every value has the same bits. (WebAssembly has no fused multiply–add, and f64 rounds
;; as JavaScript does.) Addresses are in bytes; 10^0 … 10^22 are kept at 0 … 176.
(module
  (import "env" "memory" (memory 1))
  (data (i32.const 0)
    "\00\00\00\00\00\00\f0\3f\00\00\00\00\00\00\24\40\00\00\00\00\00\00\59\40\00\00\00\00\00\40\8f\40"
    "\00\00\00\00\00\88\c3\40\00\00\00\00\00\6a\f8\40\00\00\00\00\80\84\2e\41\00\00\00\00\d0\12\63\41"
    "\00\00\00\00\84\d7\97\41\00\00\00\00\65\cd\cd\41\00\00\00\20\5f\a0\02\42\00\00\00\e8\76\48\37\42"
    "\00\00\00\a2\94\1a\6d\42\00\00\40\e5\9c\30\a2\42\00\00\90\1e\c4\bc\d6\42\00\00\34\26\f5\6b\0c\43"
    "\00\80\e0\37\79\c3\41\43\00\a0\d8\85\57\34\76\43\00\c8\4e\67\6d\c1\ab\43\00\3d\91\60\e4\58\e1\43"
    "\40\8c\b5\78\1d\af\15\44\50\ef\e2\d6\e4\1a\4b\44\92\d5\4d\06\cf\f0\80\44")

  ;; The exact sign (−1, 0 or 1) of a + b + c (signOfSum in parseCell.ts).
  (func $signOfSum (param $a f64) (param $b f64) (param $c f64) (result i32)
    (local $x f64) (local $bv f64) (local $y f64) (local $q1 f64) (local $yv f64) (local $r1 f64)
    (local $q2 f64) (local $xv f64) (local $r2 f64) (local $top f64)
    (local.set $x (f64.add (local.get $a) (local.get $b)))
    (local.set $bv (f64.sub (local.get $x) (local.get $a)))
    (local.set $y (f64.add (f64.sub (local.get $a) (f64.sub (local.get $x) (local.get $bv)))
                           (f64.sub (local.get $b) (local.get $bv))))
    (local.set $q1 (f64.add (local.get $c) (local.get $y)))
    (local.set $yv (f64.sub (local.get $q1) (local.get $c)))
    (local.set $r1 (f64.add (f64.sub (local.get $c) (f64.sub (local.get $q1) (local.get $yv)))
                            (f64.sub (local.get $y) (local.get $yv))))
    (local.set $q2 (f64.add (local.get $q1) (local.get $x)))
    (local.set $xv (f64.sub (local.get $q2) (local.get $q1)))
    (local.set $r2 (f64.add (f64.sub (local.get $q1) (f64.sub (local.get $q2) (local.get $xv)))
                            (f64.sub (local.get $x) (local.get $xv))))
    (local.set $top
      (select (local.get $q2)
        (select (local.get $r2) (local.get $r1) (f64.ne (local.get $r2) (f64.const 0)))
        (f64.ne (local.get $q2) (f64.const 0))))
    (i32.sub (f64.gt (local.get $top) (f64.const 0)) (f64.lt (local.get $top) (f64.const 0))))

  ;; storeQuotient: the double nearest to (top + low) / 10^j stored (negated when $neg) at $dst;
  ;; 0 when it is a tie or does not settle.
  (func $quotient (param $top f64) (param $low f64) (param $j i32) (param $neg i32) (param $dst i32) (result i32)
    (local $scale f64) (local $scaleC f64) (local $scaleHigh f64) (local $scaleLow f64)
    (local $x f64) (local $round i32) (local $p f64) (local $xc f64) (local $xHigh f64) (local $xLow f64)
    (local $e f64) (local $s f64) (local $bits i64) (local $ulp f64) (local $below f64)
    (local $halfUp f64) (local $halfDown f64) (local $t f64) (local $sign i32)
    (local.set $scale (f64.load (i32.shl (local.get $j) (i32.const 3))))
    (local.set $scaleC (f64.mul (f64.const 134217729) (local.get $scale)))
    (local.set $scaleHigh (f64.sub (local.get $scaleC) (f64.sub (local.get $scaleC) (local.get $scale))))
    (local.set $scaleLow (f64.sub (local.get $scale) (local.get $scaleHigh)))
    (local.set $x (f64.div (f64.add (local.get $top) (local.get $low)) (local.get $scale)))
    (block $settled
      (loop $again
        (if (i32.ge_s (local.get $round) (i32.const 4)) (then (return (i32.const 0))))
        (local.set $p (f64.mul (local.get $x) (local.get $scale)))
        (local.set $xc (f64.mul (f64.const 134217729) (local.get $x)))
        (local.set $xHigh (f64.sub (local.get $xc) (f64.sub (local.get $xc) (local.get $x))))
        (local.set $xLow (f64.sub (local.get $x) (local.get $xHigh)))
        (local.set $e
          (f64.add
            (f64.add
              (f64.add
                (f64.sub (f64.mul (local.get $xHigh) (local.get $scaleHigh)) (local.get $p))
                (f64.mul (local.get $xHigh) (local.get $scaleLow)))
              (f64.mul (local.get $xLow) (local.get $scaleHigh)))
            (f64.mul (local.get $xLow) (local.get $scaleLow))))
        (local.set $s (f64.add (f64.sub (local.get $top) (local.get $p)) (local.get $low)))
        ;; ulp(x): the exponent field lowered by 52, no fraction bits (x > 0).
        (local.set $bits (i64.reinterpret_f64 (local.get $x)))
        (local.set $ulp (f64.reinterpret_i64
          (i64.shl (i64.sub (i64.shr_u (local.get $bits) (i64.const 52)) (i64.const 52)) (i64.const 52))))
        (local.set $below
          (select (f64.mul (f64.const 0.5) (local.get $ulp)) (local.get $ulp)
            (i64.eqz (i64.and (local.get $bits) (i64.const 0xfffffffffffff)))))
        (local.set $halfUp (f64.mul (f64.mul (f64.const 0.5) (local.get $ulp)) (local.get $scale)))
        (local.set $halfDown (f64.mul (f64.mul (f64.const 0.5) (local.get $below)) (local.get $scale)))
        (local.set $t (f64.sub (local.get $s) (local.get $e)))
        (br_if $settled
          (i32.and
            (f64.lt (local.get $t) (f64.mul (f64.const 0x1.ff7ced916872bp-1) (local.get $halfUp)))
            (f64.gt (local.get $t) (f64.mul (f64.const -0x1.ff7ced916872bp-1) (local.get $halfDown)))))
        (local.set $sign (call $signOfSum (local.get $s) (f64.neg (local.get $e)) (f64.neg (local.get $halfUp))))
        (if (i32.gt_s (local.get $sign) (i32.const 0))
          (then
            (local.set $x (f64.add (local.get $x) (local.get $ulp)))
            (local.set $round (i32.add (local.get $round) (i32.const 1)))
            (br $again)))
        (if (i32.eqz (local.get $sign)) (then (return (i32.const 0))))
        (local.set $sign (call $signOfSum (local.get $s) (f64.neg (local.get $e)) (local.get $halfDown)))
        (if (i32.lt_s (local.get $sign) (i32.const 0))
          (then
            (local.set $x (f64.sub (local.get $x) (local.get $below)))
            (local.set $round (i32.add (local.get $round) (i32.const 1)))
            (br $again)))
        (if (i32.eqz (local.get $sign)) (then (return (i32.const 0))))))
    (f64.store (local.get $dst) (select (f64.neg (local.get $x)) (local.get $x) (local.get $neg)))
    (i32.const 1))

  ;; storeValue: ± (high · 10^lowDigits + low) · 10^exp stored at $dst; 0 when not exact here.
  (func $value (param $high i64) (param $low i64) (param $lowDigits i32) (param $exp i32) (param $neg i32) (param $dst i32) (result i32)
    (local $top f64) (local $mantissa f64) (local $v f64)
    (local.set $top (f64.convert_i64_u (local.get $high)))
    (if (local.get $lowDigits)
      (then (local.set $top (f64.mul (local.get $top) (f64.load (i32.shl (local.get $lowDigits) (i32.const 3)))))))
    (local.set $mantissa (f64.add (local.get $top) (f64.convert_i64_u (local.get $low))))
    (if (f64.ge (local.get $mantissa) (f64.const 9007199254740992))
      (then
        (if (i32.and (i32.lt_s (local.get $exp) (i32.const 0)) (i32.ge_s (local.get $exp) (i32.const -22)))
          (then
            (return (call $quotient (local.get $top) (f64.convert_i64_u (local.get $low))
              (i32.sub (i32.const 0) (local.get $exp)) (local.get $neg) (local.get $dst)))))
        (return (i32.const 0))))
    (block $made
      (if (f64.eq (local.get $mantissa) (f64.const 0))
        (then (local.set $v (f64.const 0)) (br $made)))
      (if (i32.eqz (local.get $exp))
        (then (local.set $v (local.get $mantissa)) (br $made)))
      (if (i32.and (i32.gt_s (local.get $exp) (i32.const 0)) (i32.le_s (local.get $exp) (i32.const 22)))
        (then (local.set $v (f64.mul (local.get $mantissa) (f64.load (i32.shl (local.get $exp) (i32.const 3))))) (br $made)))
      (if (i32.and (i32.lt_s (local.get $exp) (i32.const 0)) (i32.ge_s (local.get $exp) (i32.const -22)))
        (then
          (local.set $v (f64.div (local.get $mantissa) (f64.load (i32.shl (i32.sub (i32.const 0) (local.get $exp)) (i32.const 3)))))
          (br $made)))
      (return (i32.const 0)))
    (f64.store (local.get $dst) (select (f64.neg (local.get $v)) (local.get $v) (local.get $neg)))
    (i32.const 1))

  ;; One cell from $i: its value stored at $dst and the address of the delimiter or newline that
  ;; ends it returned, or −1 when scanCellBytes would not read it on its fast path (or it is blank).
  (func $cell (param $i i32) (param $dst i32) (param $delim i32) (param $dec i32) (param $nl i32) (result i32)
    (local $c i32) (local $tab i32) (local $neg i32) (local $first i32) (local $from i32) (local $stop i32)
    (local $high i64) (local $low i64) (local $digits i32) (local $d i32) (local $exp i32)
    (local $fracStart i32) (local $sawDigit i32) (local $expNeg i32) (local $expStart i32) (local $e i32)
    ;; A tab is a blank unless it is the delimiter.
    (local.set $tab (i32.ne (local.get $delim) (i32.const 9)))
    (local.set $c (i32.load8_u (local.get $i)))
    (block $lead
      (loop $blank
        (br_if $lead (i32.eqz (i32.or (i32.eq (local.get $c) (i32.const 32))
                                      (i32.and (i32.eq (local.get $c) (i32.const 9)) (local.get $tab)))))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (local.set $c (i32.load8_u (local.get $i)))
        (br $blank)))
    ;; A blank cell (carriage returns too, unless one is the newline) is NaN, as scanCellBytes reads it.
    (if (i32.and (i32.eq (local.get $c) (i32.const 13)) (i32.ne (local.get $nl) (i32.const 13)))
      (then
        (block $cr (loop $blanks
          (br_if $cr
            (i32.eqz
              (i32.or
                (i32.or (i32.eq (local.get $c) (i32.const 32)) (i32.eq (local.get $c) (i32.const 13)))
                (i32.and (i32.eq (local.get $c) (i32.const 9)) (local.get $tab)))))
          (local.set $i (i32.add (local.get $i) (i32.const 1)))
          (local.set $c (i32.load8_u (local.get $i)))
          (br $blanks)))
        (if (i32.and (i32.ne (local.get $c) (local.get $delim)) (i32.ne (local.get $c) (local.get $nl)))
          (then (return (i32.const -1))))))
    (if (i32.or (i32.eq (local.get $c) (local.get $delim)) (i32.eq (local.get $c) (local.get $nl)))
      (then
        (f64.store (local.get $dst) (f64.const nan))
        (return (local.get $i))))
    (if (i32.eq (local.get $c) (i32.const 45))
      (then
        (local.set $neg (i32.const 1))
        (local.set $i (i32.add (local.get $i) (i32.const 1))))
      (else
        (if (i32.eq (local.get $c) (i32.const 43))
          (then (local.set $i (i32.add (local.get $i) (i32.const 1)))))))
    (local.set $first (local.get $i))
    ;; Leading zeros.
    (block $z (loop $zeros
      (br_if $z (i32.ne (i32.load8_u (local.get $i)) (i32.const 48)))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $zeros)))
    ;; Up to 9 digits in high.
    (local.set $from (local.get $i))
    (local.set $stop (i32.add (local.get $i) (i32.const 9)))
    (block $h (loop $digitsHigh
      (br_if $h (i32.ge_u (local.get $i) (local.get $stop)))
      (local.set $d (i32.sub (i32.load8_u (local.get $i)) (i32.const 48)))
      (br_if $h (i32.gt_u (local.get $d) (i32.const 9)))
      (local.set $high (i64.add (i64.mul (local.get $high) (i64.const 10)) (i64.extend_i32_u (local.get $d))))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $digitsHigh)))
    (local.set $digits (i32.sub (local.get $i) (local.get $from)))
    (if (i32.eq (local.get $digits) (i32.const 9))
      (then
        (local.set $from (local.get $i))
        (local.set $stop (i32.add (local.get $i) (i32.const 8)))
        (block $l (loop $digitsLow
          (br_if $l (i32.ge_u (local.get $i) (local.get $stop)))
          (local.set $d (i32.sub (i32.load8_u (local.get $i)) (i32.const 48)))
          (br_if $l (i32.gt_u (local.get $d) (i32.const 9)))
          (local.set $low (i64.add (i64.mul (local.get $low) (i64.const 10)) (i64.extend_i32_u (local.get $d))))
          (local.set $i (i32.add (local.get $i) (i32.const 1)))
          (br $digitsLow)))
        (local.set $digits (i32.add (local.get $digits) (i32.sub (local.get $i) (local.get $from))))
        (if (i32.and (i32.eq (local.get $digits) (i32.const 17)) (i32.le_u (i32.sub (i32.load8_u (local.get $i)) (i32.const 48)) (i32.const 9)))
          (then (return (i32.const -1))))))
    (local.set $sawDigit (i32.gt_u (local.get $i) (local.get $first)))
    (local.set $c (i32.load8_u (local.get $i)))
    (if (i32.eq (local.get $c) (local.get $dec))
      (then
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (local.set $fracStart (local.get $i))
        (if (i32.eqz (local.get $digits))
          (then
            (block $fz (loop $fracZeros
              (br_if $fz (i32.ne (i32.load8_u (local.get $i)) (i32.const 48)))
              (local.set $i (i32.add (local.get $i) (i32.const 1)))
              (br $fracZeros)))))
        (if (i32.lt_s (local.get $digits) (i32.const 9))
          (then
            (local.set $from (local.get $i))
            (local.set $stop (i32.sub (i32.add (local.get $i) (i32.const 9)) (local.get $digits)))
            (block $fh (loop $fracHigh
              (br_if $fh (i32.ge_u (local.get $i) (local.get $stop)))
              (local.set $d (i32.sub (i32.load8_u (local.get $i)) (i32.const 48)))
              (br_if $fh (i32.gt_u (local.get $d) (i32.const 9)))
              (local.set $high (i64.add (i64.mul (local.get $high) (i64.const 10)) (i64.extend_i32_u (local.get $d))))
              (local.set $i (i32.add (local.get $i) (i32.const 1)))
              (br $fracHigh)))
            (local.set $digits (i32.add (local.get $digits) (i32.sub (local.get $i) (local.get $from))))))
        (if (i32.ge_s (local.get $digits) (i32.const 9))
          (then
            (local.set $from (local.get $i))
            (local.set $stop (i32.sub (i32.add (local.get $i) (i32.const 17)) (local.get $digits)))
            (block $fl (loop $fracLow
              (br_if $fl (i32.ge_u (local.get $i) (local.get $stop)))
              (local.set $d (i32.sub (i32.load8_u (local.get $i)) (i32.const 48)))
              (br_if $fl (i32.gt_u (local.get $d) (i32.const 9)))
              (local.set $low (i64.add (i64.mul (local.get $low) (i64.const 10)) (i64.extend_i32_u (local.get $d))))
              (local.set $i (i32.add (local.get $i) (i32.const 1)))
              (br $fracLow)))
            (local.set $digits (i32.add (local.get $digits) (i32.sub (local.get $i) (local.get $from))))
            (if (i32.and (i32.eq (local.get $digits) (i32.const 17)) (i32.le_u (i32.sub (i32.load8_u (local.get $i)) (i32.const 48)) (i32.const 9)))
              (then (return (i32.const -1))))))
        (local.set $exp (i32.sub (local.get $fracStart) (local.get $i)))
        (if (i32.gt_u (local.get $i) (local.get $fracStart)) (then (local.set $sawDigit (i32.const 1))))
        (local.set $c (i32.load8_u (local.get $i)))))
    (if (i32.eqz (local.get $sawDigit)) (then (return (i32.const -1))))
    (if (i32.or (i32.eq (local.get $c) (i32.const 101)) (i32.eq (local.get $c) (i32.const 69)))
      (then
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (local.set $c (i32.load8_u (local.get $i)))
        (if (i32.eq (local.get $c) (i32.const 45))
          (then
            (local.set $expNeg (i32.const 1))
            (local.set $i (i32.add (local.get $i) (i32.const 1))))
          (else
            (if (i32.eq (local.get $c) (i32.const 43))
              (then (local.set $i (i32.add (local.get $i) (i32.const 1)))))))
        (local.set $expStart (local.get $i))
        (block $ed (loop $expDigits
          (local.set $d (i32.sub (i32.load8_u (local.get $i)) (i32.const 48)))
          (br_if $ed (i32.gt_u (local.get $d) (i32.const 9)))
          (if (i32.ge_s (i32.sub (local.get $i) (local.get $expStart)) (i32.const 4))
            (then (return (i32.const -1))))
          (local.set $e (i32.add (i32.mul (local.get $e) (i32.const 10)) (local.get $d)))
          (local.set $i (i32.add (local.get $i) (i32.const 1)))
          (br $expDigits)))
        (if (i32.eq (local.get $i) (local.get $expStart)) (then (return (i32.const -1))))
        (local.set $exp
          (i32.add (local.get $exp)
            (select (i32.sub (i32.const 0) (local.get $e)) (local.get $e) (local.get $expNeg))))
        (local.set $c (i32.load8_u (local.get $i)))))
    ;; Trailing blanks (a carriage return too, unless it is the newline).
    (block $tr (loop $trailing
      (br_if $tr
        (i32.eqz
          (i32.or
            (i32.or (i32.eq (local.get $c) (i32.const 32))
                    (i32.and (i32.eq (local.get $c) (i32.const 13)) (i32.ne (local.get $nl) (i32.const 13))))
            (i32.and (i32.eq (local.get $c) (i32.const 9)) (local.get $tab)))))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (local.set $c (i32.load8_u (local.get $i)))
      (br $trailing)))
    (if (i32.and (i32.ne (local.get $c) (local.get $delim)) (i32.ne (local.get $c) (local.get $nl)))
      (then (return (i32.const -1))))
    (if (i32.eqz
          (call $value (local.get $high) (local.get $low)
            (select (i32.sub (local.get $digits) (i32.const 9)) (i32.const 0) (i32.gt_s (local.get $digits) (i32.const 9)))
            (local.get $exp) (local.get $neg) (local.get $dst)))
      (then (return (i32.const -1))))
    (local.get $i))

;; run(pos, end, maxRows, nCols, delim, dec, nl, maxLine, config, timeCol, haveLast, lastTime) → status
  (func (export "run") (param $pos i32) (param $end i32) (param $maxRows i32) (param $nCols i32)
      (param $delim i32) (param $dec i32) (param $nl i32) (param $maxLine i32)
      (param $config i32) (param $timeCol i32) (param $haveLast i32) (param $lastTime f64) (result i32)
    (local $m i32) (local $start i32) (local $next i32) (local $i i32) (local $c i32) (local $e i32)
    (local $dst i32) (local $scratch i32) (local $out i32) (local $cfg i32) (local $kind i32)
    (local $v f64) (local $s f64) (local $t f64) (local $status i32) (local $n i32) (local $b i32) (local $surplus i32) (local $blank i32)
    (local.set $scratch (i32.add (local.get $config) (i32.mul (local.get $nCols) (i32.const 64))))
    ;; No blank cells counted yet.
    (local.set $cfg (local.get $config))
    (block $zeroed (loop $zero
      (br_if $zeroed (i32.ge_u (local.get $cfg) (local.get $scratch)))
      (f64.store offset=48 (local.get $cfg) (f64.const 0))
      (local.set $cfg (i32.add (local.get $cfg) (i32.const 64)))
      (br $zero)))
    (local.set $out (i32.add (local.get $scratch) (i32.shl (local.get $nCols) (i32.const 3))))
    (block $done
      (block $checkFail
        (block $scanFail
          (loop $row
            (br_if $done (i32.ge_u (local.get $pos) (local.get $end)))
            (br_if $done (i32.ge_u (local.get $m) (local.get $maxRows)))
            (local.set $start (local.get $pos))
            ;; The cells, into the scratch row.
            (local.set $n (i32.const 0))
            (local.set $i (local.get $start))
            (local.set $dst (local.get $scratch))
            (block $atNewline
              (loop $cells
                (local.set $e (call $cell (local.get $i) (local.get $dst) (local.get $delim) (local.get $dec) (local.get $nl)))
                (br_if $scanFail (i32.lt_s (local.get $e) (i32.const 0)))
                (local.set $n (i32.add (local.get $n) (i32.const 1)))
                (br_if $atNewline (i32.ne (i32.load8_u (local.get $e)) (local.get $delim)))
                (if (i32.ge_u (local.get $n) (local.get $nCols))
                  (then
                    ;; Cells past the header's: kept only when blank (whitespace, as trim() sees it).
                    (local.set $i (i32.add (local.get $e) (i32.const 1)))
                    (loop $rest
                      (local.set $b (i32.load8_u (local.get $i)))
                      (if (i32.eq (local.get $b) (local.get $nl))
                        (then
                          (local.set $e (local.get $i))
                          (local.set $n (i32.add (local.get $n) (i32.const 1)))
                          (br $atNewline)))
                      (if (i32.eq (local.get $b) (local.get $delim))
                        (then (local.set $n (i32.add (local.get $n) (i32.const 1))))
                        (else
                          (br_if $scanFail
                            (i32.eqz (i32.or (i32.eq (local.get $b) (i32.const 32))
                                             (i32.le_u (i32.sub (local.get $b) (i32.const 9)) (i32.const 4)))))))
                      (local.set $i (i32.add (local.get $i) (i32.const 1)))
                      (br $rest))))
                (local.set $i (i32.add (local.get $e) (i32.const 1)))
                (local.set $dst (i32.add (local.get $dst) (i32.const 8)))
                (br $cells)))
            ;; At the newline: at least nCols cells (blank ones past them), and not too long.
            (br_if $scanFail (i32.lt_u (local.get $n) (local.get $nCols)))
            (br_if $scanFail (i32.gt_u (i32.sub (local.get $e) (local.get $start)) (local.get $maxLine)))
            ;; A blank line (one blank cell) is not a row.
            (br_if $scanFail
              (i32.and (i32.eq (local.get $n) (i32.const 1))
                       (f64.ne (f64.load (local.get $scratch)) (f64.load (local.get $scratch)))))
            (local.set $next (i32.add (local.get $e) (i32.const 1)))
            (local.set $blank (i32.const 0))
            ;; Each column converted, checked and stored at row m of its output array.
            (local.set $c (i32.const 0))
            (local.set $cfg (local.get $config))
            (loop $cols
              (local.set $v (f64.load (i32.add (local.get $scratch) (i32.shl (local.get $c) (i32.const 3)))))
              (local.set $kind (i32.trunc_f64_s (f64.load (local.get $cfg))))
              (if (i32.eqz (local.get $kind))
                (then
                  (local.set $s (f64.add (f64.mul (local.get $v) (f64.load offset=16 (local.get $cfg)))
                                         (f64.load offset=24 (local.get $cfg))))
                  (br_if $checkFail
                    (i32.eqz (i32.and (f64.ge (local.get $s) (f64.load offset=32 (local.get $cfg)))
                                      (f64.le (local.get $s) (f64.load offset=40 (local.get $cfg))))))
                  (if (i32.eq (local.get $c) (local.get $timeCol))
                    (then
                      (br_if $checkFail
                        (i32.and (local.get $haveLast) (i32.eqz (f64.gt (local.get $s) (local.get $lastTime)))))
                      (local.set $t (local.get $s)))))
                (else
                  (if (f64.ne (local.get $v) (local.get $v)) (then (local.set $blank (i32.const 1))))
                  (if (i32.eq (local.get $kind) (i32.const 1))
                    (then (local.set $s (local.get $v)))
                    (else (local.set $s (f64.mul (local.get $v) (f64.load offset=16 (local.get $cfg))))))))
              (f64.store
                (i32.add (local.get $out)
                  (i32.shl
                    (i32.add (i32.mul (i32.trunc_f64_s (f64.load offset=8 (local.get $cfg))) (local.get $maxRows)) (local.get $m))
                    (i32.const 3)))
                (local.get $s))
              (local.set $cfg (i32.add (local.get $cfg) (i32.const 64)))
              (local.set $c (i32.add (local.get $c) (i32.const 1)))
              (br_if $cols (i32.lt_u (local.get $c) (local.get $nCols))))
            ;; The row is kept: count its blank extra and spread cells (and note the first row of each).
            (if (local.get $blank)
              (then
                (local.set $c (i32.const 0))
                (local.set $cfg (local.get $config))
                (loop $blanks
                  (if (f64.ne (f64.load (i32.add (local.get $scratch) (i32.shl (local.get $c) (i32.const 3))))
                              (f64.load (i32.add (local.get $scratch) (i32.shl (local.get $c) (i32.const 3)))))
                    (then
                      (if (f64.eq (f64.load offset=48 (local.get $cfg)) (f64.const 0))
                        (then (f64.store offset=56 (local.get $cfg) (f64.convert_i32_u (local.get $m)))))
                      (f64.store offset=48 (local.get $cfg) (f64.add (f64.load offset=48 (local.get $cfg)) (f64.const 1)))))
                  (local.set $cfg (i32.add (local.get $cfg) (i32.const 64)))
                  (local.set $c (i32.add (local.get $c) (i32.const 1)))
                  (br_if $blanks (i32.lt_u (local.get $c) (local.get $nCols))))))
            (if (i32.ge_s (local.get $timeCol) (i32.const 0))
              (then
                (local.set $lastTime (local.get $t))
                (local.set $haveLast (i32.const 1))))
            (local.set $m (i32.add (local.get $m) (i32.const 1)))
            (if (i32.gt_u (local.get $n) (local.get $nCols))
              (then (local.set $surplus (i32.add (local.get $surplus) (i32.const 1)))))
            (local.set $pos (local.get $next))
            (br $row)))
        ;; A line for JavaScript to read: find its newline.
        (local.set $i (local.get $start))
        (block $found (loop $seek
          (br_if $found (i32.eq (i32.load8_u (local.get $i)) (local.get $nl)))
          (local.set $i (i32.add (local.get $i) (i32.const 1)))
          (br $seek)))
        (local.set $next (i32.add (local.get $i) (i32.const 1)))
        (local.set $status (i32.const 1))
        (br $done))
      ;; A row of numbers that commit() would not simply keep.
      (local.set $status (i32.const 2)))
    (if (local.get $status)
      (then
        (f64.store (i32.const 184) (f64.convert_i32_u (local.get $next)))
        (f64.store (i32.const 200) (f64.convert_i32_u (local.get $n)))
        (f64.store (i32.const 208) (f64.convert_i32_u (local.get $start))))
      (else
        (f64.store (i32.const 184) (f64.convert_i32_u (local.get $pos)))))
    (f64.store (i32.const 192) (f64.convert_i32_u (local.get $m)))
    (f64.store (i32.const 216) (f64.convert_i32_u (local.get $surplus)))
    (local.get $status))
)
