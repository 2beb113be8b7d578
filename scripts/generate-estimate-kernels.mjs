#!/usr/bin/env node
/**
 * Writes packages/estimate/src/estimateKernels.wat: the chunk sums of the normal equations (the
 * WebAssembly forms of solver/sumChunkUnrolled.ts and the 4×4 tiles of solver/sumChunkTiled.ts)
 * the free-run passes of motor/sweepLinearModel.ts (freeRunSens, freeRunBasis with level classes,
 * freeRunValues, the effect columns of freeRunEffects with the table of sample intervals they
 * need) and the channel sums of fitMotor's summaries. Their text is mechanical (one local per JᵀJ
 * entry, one recursion per sensitivity slot), so it is written by
 * this script between the markers `;; generated kernels: begin` and `;; generated kernels: end`;
 * the file's header is written by hand. The .wat is the committed source that
 * scripts/assemble-kernels.mjs assembles. `--check` exits 1 when the section differs.
 *
 * Every accumulator does what its JavaScript local does, `a += x * y` (multiply, round, add,
 * round), over the rows in increasing order, and every recursion adds its terms left to right as
 * the JavaScript expression does, so the results are the same bits.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const target = resolve(root, 'packages/estimate/src/estimateKernels.wat');
const BEGIN = '  ;; generated kernels: begin (scripts/generate-estimate-kernels.mjs; do not edit by hand)\n';
const END = '  ;; generated kernels: end\n';

const lines = [];
const emit = (s) => lines.push(s);
const ld = (addr) => `(f64.load ${addr})`;
const acc = (name, x, y) => `(local.set $${name} (f64.add (local.get $${name}) (f64.mul (local.get $${x}) (local.get $${y}))))`;

/** sumsP(r, J, rows, st, out) → rᵀr: one pass, the chunk layout of sumChunkUnrolled (st in bytes). */
function unrolled(p) {
  const entries = [];
  for (let i = 0; i < p; i++) for (let j = i; j < p; j++) entries.push([`a${i}${j}`, `x${i}`, `x${j}`]);
  for (let i = 0; i < p; i++) entries.push([`g${i}`, `x${i}`, 'rk']);
  entries.push(['s', 'rk', 'rk']);
  emit(`  ;; sums${p}: the p = ${p} chunk sums of sumChunkUnrolled, stored at out in its layout; returns rᵀr.`);
  emit(`  (func (export "sums${p}") (param $r i32) (param $J i32) (param $rows i32) (param $st i32) (param $out i32) (result f64)`);
  emit('    (local $pe i32) (local $rk f64)');
  for (let j = 1; j < p; j++) emit(`    (local $o${j} i32)`);
  for (let j = 0; j < p; j++) emit(`    (local $x${j} f64)`);
  for (const [name] of entries) emit(`    (local $${name} f64)`);
  for (let j = 1; j < p; j++) emit(`    (local.set $o${j} (i32.mul (local.get $st) (i32.const ${j})))`);
  emit('    (local.set $pe (i32.add (local.get $r) (i32.shl (local.get $rows) (i32.const 3))))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_u (local.get $r) (local.get $pe)))');
  emit('      (loop $next');
  emit(`        (local.set $rk ${ld('(local.get $r)')})`);
  emit(`        (local.set $x0 ${ld('(local.get $J)')})`);
  for (let j = 1; j < p; j++) emit(`        (local.set $x${j} ${ld(`(i32.add (local.get $J) (local.get $o${j}))`)})`);
  for (const [name, x, y] of entries) emit(`        ${acc(name, x, y)}`);
  emit('        (local.set $r (i32.add (local.get $r) (i32.const 8)))');
  emit('        (local.set $J (i32.add (local.get $J) (i32.const 8)))');
  emit('        (br_if $next (i32.lt_u (local.get $r) (local.get $pe)))))');
  entries.forEach(([name], m) => emit(`    (f64.store offset=${8 * m} (local.get $out) (local.get $${name}))`));
  emit('    (local.get $s))');
}

/**
 * The 4×4 tiles of sumChunkTiled with f64x2 lanes: each lane holds one JᵀJ entry and does exactly
 * its scalar multiply and add (rounded as the scalar ones; no fused multiply-add), so the sums are
 * the same bits while the instruction count halves (which matters most before V8 optimises the
 * module). Pairs of columns are loaded into the two lanes, single columns splatted to both.
 */
const vacc = (name, x, y) => `(local.set $${name} (f64x2.add (local.get $${name}) (f64x2.mul (local.get $${x}) (local.get $${y}))))`;
const pair = (a, b) => `(v128.load64_lane 1 (i32.add (local.get $${b}) (local.get $o)) (v128.load64_zero (i32.add (local.get $${a}) (local.get $o))))`;
const splat = (a) => `(v128.load64_splat (i32.add (local.get $${a}) (local.get $o)))`;

/** diagTile(r, c0, c1, c2, c3, rows, out) → rᵀr: the diagonal tile of sumChunkTiled (column addresses in bytes). */
function diagonalTile() {
  emit('  ;; diagTile: the diagonal 4×4 tile of sumChunkTiled over columns c0…c3: out = a00 a01 a02 a03 a11 a12 a13 a22 a23 a33 g0 g1 g2 g3 s; returns s.');
  emit('  ;; Lanes: (a00 a01) (a02 a03) (a10 a11) (a12 a13) (a22 a23) (a32 a33) (g0 g1) (g2 g3); a10 and a32 are dropped.');
  emit('  (func (export "diagTile") (param $r i32) (param $c0 i32) (param $c1 i32) (param $c2 i32) (param $c3 i32) (param $rows i32) (param $out i32) (result f64)');
  emit('    (local $o i32) (local $pe i32) (local $rk f64) (local $s f64)');
  emit('    (local $x01 v128) (local $x23 v128) (local $x v128) (local $rr v128)');
  emit('    (local $a0L v128) (local $a0R v128) (local $a1L v128) (local $a1R v128) (local $a2R v128) (local $a3R v128) (local $g01 v128) (local $g23 v128)');
  emit('    (local.set $pe (i32.shl (local.get $rows) (i32.const 3)))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_u (local.get $o) (local.get $pe)))');
  emit('      (loop $next');
  emit(`        (local.set $rk ${ld('(i32.add (local.get $r) (local.get $o))')})`);
  emit('        (local.set $rr (f64x2.splat (local.get $rk)))');
  emit(`        (local.set $x01 ${pair('c0', 'c1')})`);
  emit(`        (local.set $x23 ${pair('c2', 'c3')})`);
  // One splat register reused row by row (fewer live vectors than registers, also for V8's baseline compiler).
  emit(`        (local.set $x ${splat('c0')}) ${vacc('a0L', 'x', 'x01')} ${vacc('a0R', 'x', 'x23')}`);
  emit(`        (local.set $x ${splat('c1')}) ${vacc('a1L', 'x', 'x01')} ${vacc('a1R', 'x', 'x23')}`);
  emit(`        (local.set $x ${splat('c2')}) ${vacc('a2R', 'x', 'x23')}`);
  emit(`        (local.set $x ${splat('c3')}) ${vacc('a3R', 'x', 'x23')}`);
  emit(`        ${vacc('g01', 'x01', 'rr')} ${vacc('g23', 'x23', 'rr')}`);
  emit(`        ${acc('s', 'rk', 'rk')}`);
  emit('        (local.set $o (i32.add (local.get $o) (i32.const 8)))');
  emit('        (br_if $next (i32.lt_u (local.get $o) (local.get $pe)))))');
  emit('    (v128.store offset=0 align=8 (local.get $out) (local.get $a0L))');
  emit('    (v128.store offset=16 align=8 (local.get $out) (local.get $a0R))');
  emit('    (f64.store offset=32 (local.get $out) (f64x2.extract_lane 1 (local.get $a1L)))');
  emit('    (v128.store offset=40 align=8 (local.get $out) (local.get $a1R))');
  emit('    (v128.store offset=56 align=8 (local.get $out) (local.get $a2R))');
  emit('    (f64.store offset=72 (local.get $out) (f64x2.extract_lane 1 (local.get $a3R)))');
  emit('    (v128.store offset=80 align=8 (local.get $out) (local.get $g01))');
  emit('    (v128.store offset=96 align=8 (local.get $out) (local.get $g23))');
  emit('    (f64.store offset=112 (local.get $out) (local.get $s))');
  emit('    (local.get $s))');
}

/** offTile(c0…c3, d0…d3, rows, out): the off-diagonal tile of sumChunkTiled, out = a00 a01 … a33 row by row. */
function offDiagonalTile() {
  emit('  ;; offTile: the off-diagonal 4×4 tile of sumChunkTiled, columns c0…c3 against d0…d3: out = a00 a01 … a33 row by row.');
  emit('  ;; Lanes: (ai0 ai1) and (ai2 ai3) for each row i.');
  emit('  (func (export "offTile") (param $c0 i32) (param $c1 i32) (param $c2 i32) (param $c3 i32) (param $d0 i32) (param $d1 i32) (param $d2 i32) (param $d3 i32) (param $rows i32) (param $out i32)');
  emit('    (local $o i32) (local $pe i32) (local $y01 v128) (local $y23 v128) (local $x v128)');
  for (let i = 0; i < 4; i++) emit(`    (local $a${i}L v128) (local $a${i}R v128)`);
  emit('    (local.set $pe (i32.shl (local.get $rows) (i32.const 3)))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_u (local.get $o) (local.get $pe)))');
  emit('      (loop $next');
  emit(`        (local.set $y01 ${pair('d0', 'd1')})`);
  emit(`        (local.set $y23 ${pair('d2', 'd3')})`);
  for (let i = 0; i < 4; i++) emit(`        (local.set $x ${splat(`c${i}`)}) ${vacc(`a${i}L`, 'x', 'y01')} ${vacc(`a${i}R`, 'x', 'y23')}`);
  emit('        (local.set $o (i32.add (local.get $o) (i32.const 8)))');
  emit('        (br_if $next (i32.lt_u (local.get $o) (local.get $pe)))))');
  for (let i = 0; i < 4; i++) {
    emit(`    (v128.store offset=${32 * i} align=8 (local.get $out) (local.get $a${i}L))`);
    emit(`    (v128.store offset=${32 * i + 16} align=8 (local.get $out) (local.get $a${i}R))`);
  }
  emit('  )');
}

/** sumSquares(r, rows) → rᵀr, the loop accumulateNormalEquations runs without a Jacobian. */
function sumSquares() {
  emit('  ;; sumSquares: Σ r[k]·r[k] in order of k (the rᵀr-only chunk of accumulateNormalEquations).');
  emit('  (func (export "sumSquares") (param $r i32) (param $rows i32) (result f64)');
  emit('    (local $pe i32) (local $rk f64) (local $s f64)');
  emit('    (local.set $pe (i32.add (local.get $r) (i32.shl (local.get $rows) (i32.const 3))))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_u (local.get $r) (local.get $pe)))');
  emit('      (loop $next');
  emit(`        (local.set $rk ${ld('(local.get $r)')})`);
  emit(`        ${acc('s', 'rk', 'rk')}`);
  emit('        (local.set $r (i32.add (local.get $r) (i32.const 8)))');
  emit('        (br_if $next (i32.lt_u (local.get $r) (local.get $pe)))))');
  emit('    (local.get $s))');
}


// ---- free-run passes (motor/sweepLinearModel.ts) ----
const g = (n) => `(local.get $${n})`;
/**
 * A measured channel's residual row: res = model − measured (the model i + offset or ω), kept in the
 * output series when asked, and res·scale appended to r at the row counter (which the caller steps).
 */
function residualRow(ch, meas, out, sc) {
  emit(`        (if (local.get $${meas}) (then`);
  const model = ch === 'i' ? sum(g('i'), g('off')) : g('w');
  emit(`          ${put('res', `(f64.sub ${model} (f64.load ${at(meas, 'kb')}))`)}`);
  emit(`          (if (local.get $${out}) (then (f64.store ${at(out, 'kb')} (local.get $res))))`);
  emit(`          ${put('rb', '(i32.shl (local.get $rows) (i32.const 3))')}`);
  emit(`          (f64.store ${at('r', 'rb')} ${mul(g('res'), g(sc))})`);
}
/** The head of every row loop: k from k0 while k < k1 (the block $done / loop $next the body closes). */
function rowLoopHead() {
  emit('    (local.set $k (local.get $k0))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_s (local.get $k) (local.get $k1)))');
  emit('      (loop $next');
}
const put = (n, e) => `(local.set $${n} ${e})`;
const mul = (a, b) => `(f64.mul ${a} ${b})`;
/** a + b + c + … added left to right, as JavaScript does. */
const sum = (...t) => t.reduce((a, b) => `(f64.add ${a} ${b})`);
const at = (base, off) => `(i32.add ${g(base)} ${g(off)})`;
const blockF64 = (name, index) => `    ${put(name, `(f64.load offset=${8 * index} (local.get $P))`)}`;

/** Parameter block at P (doubles): Φ, Γv, Γτ and the slot derivatives (56), the state (16), then the scalars. */
const SCALARS = ['sI', 'sW', 'off', 'tau', 'tcWs', 'ldWs', 'offWs', 'nf'];
const COLS = ['jA', 'jB', 'jC', 'jD', 'jE', 'jF', 'jT', 'jLd', 'jO'];
const SLOTS = ['a', 'b', 'c', 'd', 'e', 'f'];
const MATS = ['p11', 'p12', 'p21', 'p22', 'g1', 'g2', 't1', 't2'];

function freeRunValues() {
  emit("  ;; freeRunValues: samples [k0, k1) of sweepLinearModel's freeRunValues (residual rows only), the");
  emit('  ;; parameter block at P (doubles: [Φ Γv Γτ, slot derivatives] 56, state 16, sI sW off tau tcW ldW offW n, column');
  emit('  ;; offsets of the 6 slots, Tc, load and offset 9). Series addresses 0 = absent; the input is levels[cls[k]] when');
  emit('  ;; cls is given (i32), else input[k]. Row buffers r and jac (columns at jac + 8·column offset); returns the row count.');
  emit('  (func (export "freeRunValues") (param $P i32) (param $k0 i32) (param $k1 i32) (param $rows i32) (param $r i32) (param $jac i32)');
  emit('    (param $mi i32) (param $mw i32) (param $outI i32) (param $outW i32) (param $input i32) (param $cls i32) (param $levels i32) (result i32)');
  emit('    (local $k i32) (local $kb i32) (local $rb i32) (local $n i32) (local $v f64) (local $res f64) (local $z f64) (local $iNext f64)');
  for (const l of [...MATS, 'i', 'w', ...SCALARS, 'xt1', 'xt2']) emit(`    (local $${l} f64)`);
  MATS.forEach((m, e) => emit(blockF64(m, e)));
  ['i', 'w'].forEach((x, e) => emit(blockF64(x, 56 + e)));
  SCALARS.forEach((x, e) => emit(blockF64(x, 72 + e)));
  emit(`    ${put('n', '(i32.trunc_f64_s (local.get $nf))')}`);
  emit(`    ${put('xt1', mul(g('t1'), g('tau')))} ${put('xt2', mul(g('t2'), g('tau')))}`);
  rowLoopHead();
  emit(`        ${put('kb', '(i32.shl (local.get $k) (i32.const 3))')}`);
  emit('        (if (local.get $cls)');
  emit(`          (then ${put('v', '(f64.load (i32.add (local.get $levels) (i32.shl (i32.load (i32.add (local.get $cls) (i32.shl (local.get $k) (i32.const 2)))) (i32.const 3))))')})`);
  emit(`          (else ${put('v', `(f64.load ${at('input', 'kb')})`)}))`);
  for (const [ch, meas, out, sc] of [['i', 'mi', 'outI', 'sI'], ['w', 'mw', 'outW', 'sW']]) {
    residualRow(ch, meas, out, sc);
    emit('          (local.set $rows (i32.add (local.get $rows) (i32.const 1)))))');
  }
  emit('        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $n)))');
  emit(`        ${put('iNext', sum(mul(g('p11'), g('i')), mul(g('p12'), g('w')), mul(g('g1'), g('v')), g('xt1')))}`);
  emit(`        ${put('w', sum(mul(g('p21'), g('i')), mul(g('p22'), g('w')), mul(g('g2'), g('v')), g('xt2')))}`);
  emit(`        ${put('i', g('iNext'))}`);
  emit('        (local.set $k (i32.add (local.get $k) (i32.const 1)))');
  emit('        (br_if $next (i32.lt_s (local.get $k) (local.get $k1)))))');
  ['i', 'w'].forEach((x, e) => emit(`    (f64.store offset=${8 * (56 + e)} (local.get $P) (local.get $${x}))`));
  emit('    (local.get $rows))');
}

/**
 * intervalIndex(time, k0, k1, idx, table, cap) → count: for k in [k0, k1), h = time[k+1] − time[k]
 * and idx[k] (i32) = its position in `table` of the distinct h (compared bit for bit), which it
 * extends; −1 when more than `cap` distinct values occur (the caller then runs JavaScript).
 */
function intervalIndex() {
  const tab = (j) => `(i64.load (i32.add (local.get $table) (i32.shl (local.get $${j}) (i32.const 3))))`;
  emit('  ;; intervalIndex: idx[k] = position of h = time[k+1] − time[k] in the table of distinct intervals (bitwise), k in [k0, k1);');
  emit('  ;; returns the table size, or −1 past cap entries. The last two intervals seen are tried first (logged times alternate).');
  emit('  (func (export "intervalIndex") (param $time i32) (param $k0 i32) (param $k1 i32) (param $idx i32) (param $table i32) (param $cap i32) (result i32)');
  emit('    (local $k i32) (local $j i32) (local $count i32) (local $last i32) (local $prev i32) (local $h f64) (local $bits i64) (local $pt i32)');
  rowLoopHead();
  emit('        (local.set $pt (i32.add (local.get $time) (i32.shl (local.get $k) (i32.const 3))))');
  emit('        (local.set $h (f64.sub (f64.load offset=8 (local.get $pt)) (f64.load (local.get $pt))))');
  emit('        (local.set $bits (i64.reinterpret_f64 (local.get $h)))');
  emit('        (block $found');
  emit('          (local.set $j (local.get $last))');
  emit(`          (br_if $found (i32.and (i32.lt_s (local.get $j) (local.get $count)) (i64.eq (local.get $bits) ${tab('j')})))`);
  emit('          (local.set $j (local.get $prev))');
  emit(`          (br_if $found (i32.and (i32.lt_s (local.get $j) (local.get $count)) (i64.eq (local.get $bits) ${tab('j')})))`);
  emit('          (local.set $j (i32.const 0))');
  emit('          (block $searched');
  emit('            (loop $search');
  emit('              (br_if $searched (i32.ge_s (local.get $j) (local.get $count)))');
  emit(`              (br_if $searched (i64.eq (local.get $bits) ${tab('j')}))`);
  emit('              (local.set $j (i32.add (local.get $j) (i32.const 1)))');
  emit('              (br $search)))');
  emit('          (if (i32.eq (local.get $j) (local.get $count)) (then');
  emit('            (if (i32.ge_s (local.get $count) (local.get $cap)) (then (return (i32.const -1))))');
  emit(`            (i64.store (i32.add (local.get $table) (i32.shl (local.get $j) (i32.const 3))) (local.get $bits))`);
  emit('            (local.set $count (i32.add (local.get $count) (i32.const 1))))))');
  emit('        (if (i32.ne (local.get $j) (local.get $last)) (then (local.set $prev (local.get $last)) (local.set $last (local.get $j))))');
  emit('        (i32.store (i32.add (local.get $idx) (i32.shl (local.get $k) (i32.const 2))) (local.get $j))');
  emit('        (local.set $k (i32.add (local.get $k) (i32.const 1)))');
  emit('        (br_if $next (i32.lt_s (local.get $k) (local.get $k1)))))');
  emit('    (local.get $count))');
}

/**
 * freeRunEffects(P, E, k0, k1, row, i, w, jac, input, cls, levels, time, idx, qs): the effect
 * columns of sweepLinearModel's freeRunEffects (both channels present) for samples [k0, k1), rows
 * from `row`, model current and speed run again from (i, w); block P as in freeRunSens, block E
 * (doubles): effect state 10 (eTi eTw eCi eCw eFi eFw eGi eGw F G), τ, κ, R, column offsets of
 * the four effect columns. e^{−h/τ} of each sample's interval is qs[idx[k]] (from JavaScript).
 */
function freeRunEffects() {
  const E = ['eTi', 'eTw', 'eCi', 'eCw', 'eFi', 'eFw', 'eGi', 'eGw', 'F', 'G'];
  emit('  ;; freeRunEffects: the four effect columns of sweepLinearModel\'s freeRunEffects for samples [k0, k1) (both channels),');
  emit('  ;; rows from row, current and speed run again from (i, w); block P as freeRunSens\'s, block E: effect state 10');
  emit('  ;; (eTi eTw eCi eCw eFi eFw eGi eGw F G), τ, κ, R, offsets of the 4 columns; e^{−h/τ} of sample k is qs[idx[k]].');
  emit('  (func (export "freeRunEffects") (param $P i32) (param $E i32) (param $k0 i32) (param $k1 i32) (param $row i32) (param $i f64) (param $w f64)');
  emit('    (param $jac i32) (param $input i32) (param $cls i32) (param $levels i32) (param $time i32) (param $idx i32) (param $qs i32)');
  emit('    (local $k i32) (local $kb i32) (local $rb i32) (local $n i32) (local $c0 i32) (local $c1 i32) (local $c2 i32) (local $c3 i32)');
  const f = ['p11', 'p12', 'p21', 'p22', 'g1', 'g2', 't1', 't2', 'sI', 'sW', 'xt1', 'xt2', 'tauE', 'kappa', 'R', ...E,
    'v', 'h', 'uT', 'uC', 'Pw', 'uF', 'uG', 'z', 'q', 'Fn', 'iNext'];
  for (const l of f) emit(`    (local $${l} f64)`);
  MATS.forEach((m, e) => emit(blockF64(m, e)));
  emit(blockF64('sI', 72)); emit(blockF64('sW', 73));
  emit(`    ${put('xt1', `(f64.mul (local.get $t1) (f64.load offset=${8 * 75} (local.get $P)))`)}`);
  emit(`    ${put('xt2', `(f64.mul (local.get $t2) (f64.load offset=${8 * 75} (local.get $P)))`)}`);
  emit(`    ${put('n', `(i32.trunc_f64_s (f64.load offset=${8 * 79} (local.get $P)))`)}`);
  E.forEach((x, e) => emit(`    ${put(x, `(f64.load offset=${8 * e} (local.get $E))`)}`));
  emit(`    ${put('tauE', `(f64.load offset=${8 * 10} (local.get $E))`)}`);
  emit(`    ${put('kappa', `(f64.load offset=${8 * 11} (local.get $E))`)}`);
  emit(`    ${put('R', `(f64.load offset=${8 * 12} (local.get $E))`)}`);
  for (let c = 0; c < 4; c++) emit(`    ${put(`c${c}`, `(i32.add (local.get $jac) (i32.shl (i32.trunc_f64_s (f64.load offset=${8 * (13 + c)} (local.get $E))) (i32.const 3)))`)}`);
  rowLoopHead();
  for (const [ch, sc] of [['i', 'sI'], ['w', 'sW']]) {
    emit(`        ${put('rb', '(i32.shl (local.get $row) (i32.const 3))')}`);
    ['eT', 'eC', 'eF', 'eG'].forEach((x, c) => emit(`        (f64.store ${at(`c${c}`, 'rb')} ${mul(g(`${x}${ch}`), g(sc))})`));
    emit('        (local.set $row (i32.add (local.get $row) (i32.const 1)))');
  }
  emit('        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $n)))');
  emit(`        ${put('kb', '(i32.shl (local.get $k) (i32.const 3))')}`);
  emit('        (if (local.get $cls)');
  emit(`          (then ${put('v', '(f64.load (i32.add (local.get $levels) (i32.shl (i32.load (i32.add (local.get $cls) (i32.shl (local.get $k) (i32.const 2)))) (i32.const 3))))')})`);
  emit(`          (else ${put('v', `(f64.load ${at('input', 'kb')})`)}))`);
  emit(`        ${put('h', '(f64.sub (f64.load offset=8 (i32.add (local.get $time) (local.get $kb))) (f64.load (i32.add (local.get $time) (local.get $kb))))')}`);
  // uT = w > 0 ? 1 : w < 0 ? -1 : 0; uC = w·|w|.
  emit(`        ${put('uT', '(select (f64.const 1) (select (f64.const -1) (f64.const 0) (f64.lt (local.get $w) (f64.const 0))) (f64.gt (local.get $w) (f64.const 0)))')}`);
  emit(`        ${put('uC', mul(g('w'), '(f64.abs (local.get $w))'))}`);
  emit(`        ${put('Pw', mul(mul(g('R'), g('i')), g('i')))}`);
  emit(`        ${put('uF', mul(mul('(f64.neg (local.get $kappa))', g('F')), g('i')))}`);
  emit(`        ${put('uG', mul(mul('(f64.neg (local.get $kappa))', g('G')), g('i')))}`);
  for (const [x, gi, gw, u] of [['eT', 't1', 't2', 'uT'], ['eC', 't1', 't2', 'uC'], ['eF', 'g1', 'g2', 'uF'], ['eG', 'g1', 'g2', 'uG']]) {
    emit(`        ${put('z', g(`${x}i`))}`);
    emit(`        ${put(`${x}i`, sum(mul(g('p11'), g('z')), mul(g('p12'), g(`${x}w`)), mul(g(gi), g(u))))}`);
    emit(`        ${put(`${x}w`, sum(mul(g('p21'), g('z')), mul(g('p22'), g(`${x}w`)), mul(g(gw), g(u))))}`);
  }
  emit(`        ${put('q', '(f64.load (i32.add (local.get $qs) (i32.shl (i32.load (i32.add (local.get $idx) (i32.shl (local.get $k) (i32.const 2)))) (i32.const 3))))')}`);
  emit(`        ${put('Fn', sum(mul(g('q'), g('F')), mul('(f64.sub (f64.const 1) (local.get $q))', g('Pw'))))}`);
  emit(`        ${put('G', sum(mul(g('q'), g('G')), mul(`(f64.div ${mul(g('q'), g('h'))} (local.get $tauE))`, '(f64.sub (local.get $F) (local.get $Pw))')))}`);
  emit(`        ${put('F', g('Fn'))}`);
  emit(`        ${put('iNext', sum(mul(g('p11'), g('i')), mul(g('p12'), g('w')), mul(g('g1'), g('v')), g('xt1')))}`);
  emit(`        ${put('w', sum(mul(g('p21'), g('i')), mul(g('p22'), g('w')), mul(g('g2'), g('v')), g('xt2')))}`);
  emit(`        ${put('i', g('iNext'))}`);
  emit('        (local.set $k (i32.add (local.get $k) (i32.const 1)))');
  emit('        (br_if $next (i32.lt_s (local.get $k) (local.get $k1)))))');
  E.forEach((x, e) => emit(`    (f64.store offset=${8 * e} (local.get $E) (local.get $${x}))`));
  emit('  )');
}

/** sum(x, rows) → Σ x[k] and spread(x, rows, m) → Σ (x[k] − m)², in order (fitMotor's channel summaries). */
function channelSums() {
  emit('  ;; sum: Σ x[k] over rows doubles at x, in order.');
  emit('  (func (export "sum") (param $x i32) (param $rows i32) (result f64)');
  emit('    (local $pe i32) (local $s f64)');
  emit('    (local.set $pe (i32.add (local.get $x) (i32.shl (local.get $rows) (i32.const 3))))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_u (local.get $x) (local.get $pe)))');
  emit('      (loop $next');
  emit('        (local.set $s (f64.add (local.get $s) (f64.load (local.get $x))))');
  emit('        (local.set $x (i32.add (local.get $x) (i32.const 8)))');
  emit('        (br_if $next (i32.lt_u (local.get $x) (local.get $pe)))))');
  emit('    (local.get $s))');
  emit('  ;; spread: Σ (x[k] − m)·(x[k] − m) over rows doubles at x, in order.');
  emit('  (func (export "spread") (param $x i32) (param $rows i32) (param $m f64) (result f64)');
  emit('    (local $pe i32) (local $d f64) (local $s f64)');
  emit('    (local.set $pe (i32.add (local.get $x) (i32.shl (local.get $rows) (i32.const 3))))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_u (local.get $x) (local.get $pe)))');
  emit('      (loop $next');
  emit('        (local.set $d (f64.sub (f64.load (local.get $x)) (local.get $m)))');
  emit(`        ${acc('s', 'd', 'd')}`);
  emit('        (local.set $x (i32.add (local.get $x) (i32.const 8)))');
  emit('        (br_if $next (i32.lt_u (local.get $x) (local.get $pe)))))');
  emit('    (local.get $s))');
}

/**
 * freeRunSens / freeRunBasis with f64x2 lanes: the state pairs (i, ω), (∂i, ∂ω) of each slot and of
 * the load response each sit in one vector (the block's state layout already pairs them), and
 * every recursion runs with lane 0 doing the current row's scalar operations and lane 1 the speed
 * row's, term by term in the JavaScript order (each lane rounds as the scalar operation does; no
 * fused multiply-add), so the results are the same bits with about half the instructions.
 */
function freeRunPassSimd(name, basis) {
  const mk2 = (a, b) => `(f64x2.replace_lane 1 (f64x2.splat ${a}) ${b})`;
  const vmul = (a, b) => `(f64x2.mul ${a} ${b})`;
  const vsum = (...t) => t.reduce((a, b) => `(f64x2.add ${a} ${b})`);
  const lane = (v, j) => `(f64x2.splat (f64x2.extract_lane ${j} ${v}))`;
  const what = basis ? 'freeRunBasis with level classes (freeRunSens plus the sensitivities to the class levels)' : 'freeRunSens (rows, Jacobian rows and sensitivities)';
  emit(`  ;; ${name}: samples [k0, k1) of sweepLinearModel's ${what}, the`);
  emit('  ;; parameter block at P (doubles: [Φ Γv Γτ, slot derivatives] 56, state 16, sI sW off tau tcW ldW offW n, column');
  emit('  ;; offsets of the 6 slots, Tc, load and offset 9). Series addresses 0 = absent; the input is levels[cls[k]] when');
  emit('  ;; cls is given (i32), else input[k]. Row buffers r and jac (columns at jac + 8·column offset); returns the row count.');
  emit('  ;; Lanes: each (current, speed) pair of the state in one f64x2, lane 0 the current\'s operations, lane 1 the speed\'s.');
  if (basis) emit('  ;; Block P also holds uScale, m, the address of su (2m) and of colU (m column offsets as doubles); cls must be given.');
  emit(`  (func (export "${name}") (param $P i32) (param $k0 i32) (param $k1 i32) (param $rows i32) (param $r i32) (param $jac i32)`);
  emit('    (param $mi i32) (param $mw i32) (param $outI i32) (param $outW i32) (param $input i32) (param $cls i32) (param $levels i32) (result i32)');
  emit('    (local $k i32) (local $kb i32) (local $rb i32) (local $n i32) (local $v f64) (local $res f64) (local $i f64) (local $w f64)');
  const f64Locals = [...MATS, ...SCALARS, 'xt1', 'xt2', 'tcI', 'ldI', 'tcW', 'ldW', 'offI'];
  for (const q of SLOTS) for (let e = 0; e < 8; e++) f64Locals.push(`${q}${e}`);
  for (const l of f64Locals) emit(`    (local $${l} f64)`);
  const vLocals = ['P1', 'P2', 'GV', 'TV', 'XTV', 'SC', 'TC', 'LD', 'X', 'T', 'vi', 'vw', 'vv', 'z0', 'z1', 'YT', 'YL'];
  for (const q of SLOTS) vLocals.push(`S${q}`, `Y${q}`, `Q01${q}`, `Q23${q}`, `Q45${q}`, `QT${q}`);
  for (const l of vLocals) emit(`    (local $${l} v128)`);
  for (const c of COLS) emit(`    (local $${c} i32)`);
  if (basis) {
    for (const l of ['uScale', 'uI', 'uW', 'ui', 'uw', 'ev']) emit(`    (local $${l} f64)`);
    emit('    (local $m i32) (local $su i32) (local $colU i32) (local $j i32) (local $q i32) (local $ps i32)');
  }
  MATS.forEach((m, e) => emit(blockF64(m, e)));
  SLOTS.forEach((q, j) => { for (let e = 0; e < 8; e++) emit(blockF64(`${q}${e}`, 8 + 8 * j + e)); });
  SCALARS.forEach((x, e) => emit(blockF64(x, 72 + e)));
  emit(`    ${put('n', '(i32.trunc_f64_s (local.get $nf))')}`);
  COLS.forEach((c, e) => emit(`    ${put(c, `(i32.add (local.get $jac) (i32.shl (i32.trunc_f64_s (f64.load offset=${8 * (80 + e)} (local.get $P))) (i32.const 3)))`)}`));
  emit(`    ${put('tcI', mul(g('tcWs'), g('sI')))} ${put('ldI', mul(g('ldWs'), g('sI')))} ${put('tcW', mul(g('tcWs'), g('sW')))}`);
  emit(`    ${put('ldW', mul(g('ldWs'), g('sW')))} ${put('offI', mul(g('offWs'), g('sI')))}`);
  emit(`    ${put('xt1', mul(g('t1'), g('tau')))} ${put('xt2', mul(g('t2'), g('tau')))}`);
  emit(`    ${put('P1', mk2(g('p11'), g('p21')))} ${put('P2', mk2(g('p12'), g('p22')))} ${put('GV', mk2(g('g1'), g('g2')))}`);
  emit(`    ${put('TV', mk2(g('t1'), g('t2')))} ${put('XTV', mk2(g('xt1'), g('xt2')))} ${put('SC', mk2(g('sI'), g('sW')))}`);
  emit(`    ${put('TC', mk2(g('tcI'), g('tcW')))} ${put('LD', mk2(g('ldI'), g('ldW')))}`);
  for (const q of SLOTS) {
    emit(`    ${put(`Q01${q}`, mk2(g(`${q}0`), g(`${q}2`)))} ${put(`Q23${q}`, mk2(g(`${q}1`), g(`${q}3`)))} ${put(`Q45${q}`, mk2(g(`${q}4`), g(`${q}5`)))}`);
    emit(`    ${put(`QT${q}`, mk2(mul(g(`${q}6`), g('tau')), mul(g(`${q}7`), g('tau'))))}`);
  }
  // State pairs at P + 56: (i, ω), then (∂i, ∂ω) of each slot, then the load response.
  emit(`    ${put('X', `(v128.load offset=${8 * 56} align=8 (local.get $P))`)}`);
  SLOTS.forEach((q, j) => emit(`    ${put(`S${q}`, `(v128.load offset=${8 * (58 + 2 * j)} align=8 (local.get $P))`)}`));
  emit(`    ${put('T', `(v128.load offset=${8 * 70} align=8 (local.get $P))`)}`);
  if (basis) {
    emit(blockF64('uScale', 89));
    emit(`    ${put('m', `(i32.trunc_f64_s (f64.load offset=${8 * 90} (local.get $P)))`)}`);
    emit(`    ${put('su', `(i32.trunc_f64_s (f64.load offset=${8 * 91} (local.get $P)))`)}`);
    emit(`    ${put('colU', `(i32.trunc_f64_s (f64.load offset=${8 * 92} (local.get $P)))`)}`);
    emit(`    ${put('uI', mul(g('uScale'), g('sI')))} ${put('uW', mul(g('uScale'), g('sW')))}`);
  }
  rowLoopHead();
  emit(`        ${put('kb', '(i32.shl (local.get $k) (i32.const 3))')}`);
  if (basis) {
    emit(`        ${put('q', '(i32.load (i32.add (local.get $cls) (i32.shl (local.get $k) (i32.const 2))))')}`);
    emit(`        ${put('v', '(f64.load (i32.add (local.get $levels) (i32.shl (local.get $q) (i32.const 3))))')}`);
  } else {
    emit('        (if (local.get $cls)');
    emit(`          (then ${put('v', '(f64.load (i32.add (local.get $levels) (i32.shl (i32.load (i32.add (local.get $cls) (i32.shl (local.get $k) (i32.const 2)))) (i32.const 3))))')})`);
    emit(`          (else ${put('v', `(f64.load ${at('input', 'kb')})`)}))`);
  }
  emit(`        ${put('i', '(f64x2.extract_lane 0 (local.get $X))')} ${put('w', '(f64x2.extract_lane 1 (local.get $X))')}`);
  // Jacobian entries of both rows: (∂i·sI, ∂ω·sW) per slot, (ti·tcI, tw·tcW), (ti·ldI, tw·ldW).
  for (const q of SLOTS) emit(`        ${put(`Y${q}`, vmul(g(`S${q}`), g('SC')))}`);
  emit(`        ${put('YT', vmul(g('T'), g('TC')))} ${put('YL', vmul(g('T'), g('LD')))}`);
  for (const [ch, meas, out, sc, ln] of [['i', 'mi', 'outI', 'sI', 0], ['w', 'mw', 'outW', 'sW', 1]]) {
    residualRow(ch, meas, out, sc);
    SLOTS.forEach((q, j) => emit(`          (v128.store64_lane ${ln} ${at(COLS[j], 'rb')} (local.get $Y${q}))`));
    emit(`          (v128.store64_lane ${ln} ${at('jT', 'rb')} (local.get $YT))`);
    emit(`          (v128.store64_lane ${ln} ${at('jLd', 'rb')} (local.get $YL))`);
    emit(`          (f64.store ${at('jO', 'rb')} ${ch === 'i' ? g('offI') : '(f64.const 0)'})`);
    if (basis) {
      emit('          (local.set $j (i32.const 0))');
      emit('          (block $uDone (loop $uNext');
      emit('            (br_if $uDone (i32.ge_s (local.get $j) (local.get $m)))');
      emit('            (f64.store (i32.add (local.get $jac) (i32.shl (i32.add (i32.trunc_f64_s (f64.load (i32.add (local.get $colU) (i32.shl (local.get $j) (i32.const 3))))) (local.get $rows)) (i32.const 3)))');
      emit(`              ${mul(`(f64.load offset=${ch === 'i' ? 0 : 8} (i32.add (local.get $su) (i32.shl (local.get $j) (i32.const 4))))`, g(ch === 'i' ? 'uI' : 'uW'))})`);
      emit('            (local.set $j (i32.add (local.get $j) (i32.const 1)))');
      emit('            (br $uNext)))');
    }
    emit('          (local.set $rows (i32.add (local.get $rows) (i32.const 1)))))');
  }
  emit('        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $n)))');
  emit(`        ${put('vi', '(f64x2.splat (local.get $i))')} ${put('vw', '(f64x2.splat (local.get $w))')} ${put('vv', '(f64x2.splat (local.get $v))')}`);
  for (const q of SLOTS) {
    emit(`        ${put('z0', lane(g(`S${q}`), 0))} ${put('z1', lane(g(`S${q}`), 1))}`);
    emit(`        ${put(`S${q}`, vsum(vmul(g('P1'), g('z0')), vmul(g('P2'), g('z1')), vmul(g(`Q01${q}`), g('vi')), vmul(g(`Q23${q}`), g('vw')), vmul(g(`Q45${q}`), g('vv')), g(`QT${q}`)))}`);
  }
  emit(`        ${put('z0', lane(g('T'), 0))} ${put('z1', lane(g('T'), 1))}`);
  emit(`        ${put('T', vsum(vmul(g('P1'), g('z0')), vmul(g('P2'), g('z1')), g('TV')))}`);
  if (basis) {
    emit('        (local.set $j (i32.const 0))');
    emit('        (block $sDone (loop $sNext');
    emit('          (br_if $sDone (i32.ge_s (local.get $j) (local.get $m)))');
    emit(`          ${put('ps', '(i32.add (local.get $su) (i32.shl (local.get $j) (i32.const 4)))')}`);
    emit(`          ${put('ui', '(f64.load (local.get $ps))')} ${put('uw', '(f64.load offset=8 (local.get $ps))')}`);
    emit(`          ${put('ev', '(select (f64.const 1) (f64.const 0) (i32.eq (local.get $j) (local.get $q)))')}`);
    emit(`          (f64.store (local.get $ps) ${sum(mul(g('p11'), g('ui')), mul(g('p12'), g('uw')), mul(g('g1'), g('ev')))})`);
    emit(`          (f64.store offset=8 (local.get $ps) ${sum(mul(g('p21'), g('ui')), mul(g('p22'), g('uw')), mul(g('g2'), g('ev')))})`);
    emit('          (local.set $j (i32.add (local.get $j) (i32.const 1)))');
    emit('          (br $sNext)))');
  }
  emit(`        ${put('X', vsum(vmul(g('P1'), g('vi')), vmul(g('P2'), g('vw')), vmul(g('GV'), g('vv')), g('XTV')))}`);
  emit('        (local.set $k (i32.add (local.get $k) (i32.const 1)))');
  emit('        (br_if $next (i32.lt_s (local.get $k) (local.get $k1)))))');
  emit(`    (v128.store offset=${8 * 56} align=8 (local.get $P) (local.get $X))`);
  SLOTS.forEach((q, j) => emit(`    (v128.store offset=${8 * (58 + 2 * j)} align=8 (local.get $P) (local.get $S${q}))`));
  emit(`    (v128.store offset=${8 * 70} align=8 (local.get $P) (local.get $T))`);
  emit('    (local.get $rows))');
}

sumSquares();
for (let p = 1; p <= 8; p++) unrolled(p);
diagonalTile();
offDiagonalTile();
freeRunPassSimd('freeRunSens', false);
freeRunValues();
freeRunPassSimd('freeRunBasis', true);
intervalIndex();
freeRunEffects();
channelSums();
const section = BEGIN + lines.map((l) => l + '\n').join('') + END;

const text = readFileSync(target, 'utf8');
const a = text.indexOf(BEGIN);
const b = text.indexOf(END);
if (a < 0 || b < a) {
  console.error(`generate-estimate-kernels: markers not found in ${target}`);
  process.exit(1);
}
const next = text.slice(0, a) + section + text.slice(b + END.length);
if (process.argv.includes('--check')) {
  if (next !== text) {
    console.error('generate-estimate-kernels: the generated section of estimateKernels.wat is out of date');
    process.exit(1);
  }
} else if (next !== text) {
  writeFileSync(target, next);
  console.error('generate-estimate-kernels: wrote packages/estimate/src/estimateKernels.wat');
}
