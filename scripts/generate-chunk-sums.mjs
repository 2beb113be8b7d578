#!/usr/bin/env node
/**
 * Writes the generated part of packages/estimate/src/estimateKernels.wat: the chunk sums of the
 * normal equations (the WebAssembly forms of solver/sumChunkUnrolled.ts and the 4×4 tiles of
 * solver/sumChunkTiled.ts). Their text is mechanical (one local per JᵀJ entry), so it is written
 * by this script between the markers `;; generated chunk sums: begin` and `;; generated chunk sums: end`;
 * the rest of the file is written by hand. The .wat is the committed source that
 * scripts/assemble-kernels.mjs assembles. `--check` exits 1 when the section differs.
 *
 * Every accumulator does what its JavaScript local does, `a += x * y` (multiply, round, add,
 * round), over the rows in increasing order, so the sums are the same bits.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const target = resolve(root, 'packages/estimate/src/estimateKernels.wat');
const BEGIN = '  ;; generated chunk sums: begin (scripts/generate-chunk-sums.mjs; do not edit by hand)\n';
const END = '  ;; generated chunk sums: end\n';

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

sumSquares();
for (let p = 1; p <= 8; p++) unrolled(p);
diagonalTile();
offDiagonalTile();
const section = BEGIN + lines.map((l) => l + '\n').join('') + END;

const text = readFileSync(target, 'utf8');
const a = text.indexOf(BEGIN);
const b = text.indexOf(END);
if (a < 0 || b < a) {
  console.error(`generate-chunk-sums: markers not found in ${target}`);
  process.exit(1);
}
const next = text.slice(0, a) + section + text.slice(b + END.length);
if (process.argv.includes('--check')) {
  if (next !== text) {
    console.error('generate-chunk-sums: the generated section of estimateKernels.wat is out of date');
    process.exit(1);
  }
} else if (next !== text) {
  writeFileSync(target, next);
  console.error('generate-chunk-sums: wrote packages/estimate/src/estimateKernels.wat');
}
