#!/usr/bin/env node
/**
 * Writes packages/estimate/src/estimateKernels.wat: the chunk sums of the normal equations (the
 * WebAssembly forms of solver/sumChunkUnrolled.ts and the 4×4 tiles of solver/sumChunkTiled.ts)
 * and the free-run passes of motor/sweepLinearModel.ts (freeRunSens, freeRunValues). Their text
 * is mechanical (one local per JᵀJ entry, one recursion per sensitivity slot), so it is written by
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

/** diagTile(r, c0, c1, c2, c3, rows, out) → rᵀr: the diagonal tile of sumChunkTiled (column addresses in bytes). */
function diagonalTile() {
  const entries = [];
  for (let i = 0; i < 4; i++) for (let j = i; j < 4; j++) entries.push([`a${i}${j}`, `x${i}`, `x${j}`]);
  for (let i = 0; i < 4; i++) entries.push([`g${i}`, `x${i}`, 'rk']);
  entries.push(['s', 'rk', 'rk']);
  emit('  ;; diagTile: the diagonal 4×4 tile of sumChunkTiled over columns c0…c3: out = a00 a01 a02 a03 a11 a12 a13 a22 a23 a33 g0 g1 g2 g3 s; returns s.');
  emit('  (func (export "diagTile") (param $r i32) (param $c0 i32) (param $c1 i32) (param $c2 i32) (param $c3 i32) (param $rows i32) (param $out i32) (result f64)');
  emit('    (local $o i32) (local $pe i32) (local $rk f64) (local $x0 f64) (local $x1 f64) (local $x2 f64) (local $x3 f64)');
  for (const [name] of entries) emit(`    (local $${name} f64)`);
  emit('    (local.set $pe (i32.shl (local.get $rows) (i32.const 3)))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_u (local.get $o) (local.get $pe)))');
  emit('      (loop $next');
  emit(`        (local.set $rk ${ld('(i32.add (local.get $r) (local.get $o))')})`);
  for (let j = 0; j < 4; j++) emit(`        (local.set $x${j} ${ld(`(i32.add (local.get $c${j}) (local.get $o))`)})`);
  for (const [name, x, y] of entries) emit(`        ${acc(name, x, y)}`);
  emit('        (local.set $o (i32.add (local.get $o) (i32.const 8)))');
  emit('        (br_if $next (i32.lt_u (local.get $o) (local.get $pe)))))');
  entries.forEach(([name], m) => emit(`    (f64.store offset=${8 * m} (local.get $out) (local.get $${name}))`));
  emit('    (local.get $s))');
}

/** offTile(c0…c3, d0…d3, rows, out): the off-diagonal tile of sumChunkTiled, out = a00 a01 … a33 row by row. */
function offDiagonalTile() {
  const entries = [];
  for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) entries.push([`a${i}${j}`, `x${i}`, `y${j}`]);
  emit('  ;; offTile: the off-diagonal 4×4 tile of sumChunkTiled, columns c0…c3 against d0…d3: out = a00 a01 … a33 row by row.');
  emit('  (func (export "offTile") (param $c0 i32) (param $c1 i32) (param $c2 i32) (param $c3 i32) (param $d0 i32) (param $d1 i32) (param $d2 i32) (param $d3 i32) (param $rows i32) (param $out i32)');
  emit('    (local $o i32) (local $pe i32)');
  for (let j = 0; j < 4; j++) emit(`    (local $x${j} f64) (local $y${j} f64)`);
  for (const [name] of entries) emit(`    (local $${name} f64)`);
  emit('    (local.set $pe (i32.shl (local.get $rows) (i32.const 3)))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_u (local.get $o) (local.get $pe)))');
  emit('      (loop $next');
  for (let j = 0; j < 4; j++) emit(`        (local.set $x${j} ${ld(`(i32.add (local.get $c${j}) (local.get $o))`)})`);
  for (let j = 0; j < 4; j++) emit(`        (local.set $y${j} ${ld(`(i32.add (local.get $d${j}) (local.get $o))`)})`);
  for (const [name, x, y] of entries) emit(`        ${acc(name, x, y)}`);
  emit('        (local.set $o (i32.add (local.get $o) (i32.const 8)))');
  emit('        (br_if $next (i32.lt_u (local.get $o) (local.get $pe)))))');
  entries.forEach(([name], m) => emit(`    (f64.store offset=${8 * m} (local.get $out) (local.get $${name}))`));
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
const STATE = ['i', 'w', ...SLOTS.flatMap((q) => [`${q}i`, `${q}w`]), 'ti', 'tw'];

function freeRunPass(name, sens) {
  emit(`  ;; ${name}: samples [k0, k1) of sweepLinearModel's ${sens ? 'freeRunSens (rows, Jacobian rows and sensitivities)' : 'freeRunValues (residual rows only)'}, the`);
  emit('  ;; parameter block at P (doubles: [Φ Γv Γτ, slot derivatives] 56, state 16, sI sW off tau tcW ldW offW n, column');
  emit('  ;; offsets of the 6 slots, Tc, load and offset 9). Series addresses 0 = absent; the input is levels[cls[k]] when');
  emit('  ;; cls is given (i32), else input[k]. Row buffers r and jac (columns at jac + 8·column offset); returns the row count.');
  emit(`  (func (export "${name}") (param $P i32) (param $k0 i32) (param $k1 i32) (param $rows i32) (param $r i32) (param $jac i32)`);
  emit('    (param $mi i32) (param $mw i32) (param $outI i32) (param $outW i32) (param $input i32) (param $cls i32) (param $levels i32) (result i32)');
  emit('    (local $k i32) (local $kb i32) (local $rb i32) (local $n i32) (local $v f64) (local $res f64) (local $z f64) (local $iNext f64)');
  const f64Locals = [...MATS, ...(sens ? STATE : ['i', 'w']), ...SCALARS, 'xt1', 'xt2'];
  if (sens) {
    for (const q of SLOTS) for (let e = 0; e < 8; e++) f64Locals.push(`${q}${e}`);
    for (const q of SLOTS) f64Locals.push(`${q}t`, `${q}t2`);
    f64Locals.push('tcI', 'ldI', 'tcW', 'ldW', 'offI');
  }
  for (const l of f64Locals) emit(`    (local $${l} f64)`);
  if (sens) for (const c of COLS) emit(`    (local $${c} i32)`);
  MATS.forEach((m, e) => emit(blockF64(m, e)));
  if (sens) SLOTS.forEach((q, j) => { for (let e = 0; e < 8; e++) emit(blockF64(`${q}${e}`, 8 + 8 * j + e)); });
  (sens ? STATE : ['i', 'w']).forEach((x, e) => emit(blockF64(x, 56 + e)));
  SCALARS.forEach((x, e) => emit(blockF64(x, 72 + e)));
  emit(`    ${put('n', '(i32.trunc_f64_s (local.get $nf))')}`);
  if (sens) {
    COLS.forEach((c, e) => emit(`    ${put(c, `(i32.add (local.get $jac) (i32.shl (i32.trunc_f64_s (f64.load offset=${8 * (80 + e)} (local.get $P))) (i32.const 3)))`)}`));
    emit(`    ${put('tcI', mul(g('tcWs'), g('sI')))} ${put('ldI', mul(g('ldWs'), g('sI')))} ${put('tcW', mul(g('tcWs'), g('sW')))}`);
    emit(`    ${put('ldW', mul(g('ldWs'), g('sW')))} ${put('offI', mul(g('offWs'), g('sI')))}`);
    for (const q of SLOTS) emit(`    ${put(`${q}t`, mul(g(`${q}6`), g('tau')))} ${put(`${q}t2`, mul(g(`${q}7`), g('tau')))}`);
  }
  emit(`    ${put('xt1', mul(g('t1'), g('tau')))} ${put('xt2', mul(g('t2'), g('tau')))}`);
  emit('    (local.set $k (local.get $k0))');
  emit('    (block $done');
  emit('      (br_if $done (i32.ge_s (local.get $k) (local.get $k1)))');
  emit('      (loop $next');
  emit(`        ${put('kb', '(i32.shl (local.get $k) (i32.const 3))')}`);
  emit('        (if (local.get $cls)');
  emit(`          (then ${put('v', '(f64.load (i32.add (local.get $levels) (i32.shl (i32.load (i32.add (local.get $cls) (i32.shl (local.get $k) (i32.const 2)))) (i32.const 3))))')})`);
  emit(`          (else ${put('v', `(f64.load ${at('input', 'kb')})`)}))`);
  for (const [ch, meas, out, sc] of [['i', 'mi', 'outI', 'sI'], ['w', 'mw', 'outW', 'sW']]) {
    emit(`        (if (local.get $${meas}) (then`);
    const model = ch === 'i' ? sum(g('i'), g('off')) : g('w');
    emit(`          ${put('res', `(f64.sub ${model} (f64.load ${at(meas, 'kb')}))`)}`);
    emit(`          (if (local.get $${out}) (then (f64.store ${at(out, 'kb')} (local.get $res))))`);
    emit(`          ${put('rb', '(i32.shl (local.get $rows) (i32.const 3))')}`);
    emit(`          (f64.store ${at('r', 'rb')} ${mul(g('res'), g(sc))})`);
    if (sens) {
      SLOTS.forEach((q, j) => emit(`          (f64.store ${at(COLS[j], 'rb')} ${mul(g(`${q}${ch}`), g(sc))})`));
      emit(`          (f64.store ${at('jT', 'rb')} ${mul(g(`t${ch}`), g(ch === 'i' ? 'tcI' : 'tcW'))})`);
      emit(`          (f64.store ${at('jLd', 'rb')} ${mul(g(`t${ch}`), g(ch === 'i' ? 'ldI' : 'ldW'))})`);
      emit(`          (f64.store ${at('jO', 'rb')} ${ch === 'i' ? g('offI') : '(f64.const 0)'})`);
    }
    emit('          (local.set $rows (i32.add (local.get $rows) (i32.const 1)))))');
  }
  emit('        (br_if $done (i32.ge_s (i32.add (local.get $k) (i32.const 1)) (local.get $n)))');
  if (sens) {
    for (const q of SLOTS) {
      emit(`        ${put('z', g(`${q}i`))}`);
      emit(`        ${put(`${q}i`, sum(mul(g('p11'), g('z')), mul(g('p12'), g(`${q}w`)), mul(g(`${q}0`), g('i')), mul(g(`${q}1`), g('w')), mul(g(`${q}4`), g('v')), g(`${q}t`)))}`);
      emit(`        ${put(`${q}w`, sum(mul(g('p21'), g('z')), mul(g('p22'), g(`${q}w`)), mul(g(`${q}2`), g('i')), mul(g(`${q}3`), g('w')), mul(g(`${q}5`), g('v')), g(`${q}t2`)))}`);
    }
    emit(`        ${put('z', g('ti'))}`);
    emit(`        ${put('ti', sum(mul(g('p11'), g('z')), mul(g('p12'), g('tw')), g('t1')))}`);
    emit(`        ${put('tw', sum(mul(g('p21'), g('z')), mul(g('p22'), g('tw')), g('t2')))}`);
  }
  emit(`        ${put('iNext', sum(mul(g('p11'), g('i')), mul(g('p12'), g('w')), mul(g('g1'), g('v')), g('xt1')))}`);
  emit(`        ${put('w', sum(mul(g('p21'), g('i')), mul(g('p22'), g('w')), mul(g('g2'), g('v')), g('xt2')))}`);
  emit(`        ${put('i', g('iNext'))}`);
  emit('        (local.set $k (i32.add (local.get $k) (i32.const 1)))');
  emit('        (br_if $next (i32.lt_s (local.get $k) (local.get $k1)))))');
  (sens ? STATE : ['i', 'w']).forEach((x, e) => emit(`    (f64.store offset=${8 * (56 + e)} (local.get $P) (local.get $${x}))`));
  emit('    (local.get $rows))');
}

sumSquares();
for (let p = 1; p <= 8; p++) unrolled(p);
diagonalTile();
offDiagonalTile();
freeRunPass('freeRunSens', true);
freeRunPass('freeRunValues', false);
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
