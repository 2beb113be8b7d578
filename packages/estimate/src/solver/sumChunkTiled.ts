/** Position of JᵀJ entry (i, j), i ≤ j, in the packed upper triangle (row by row) of a p×p matrix. */
function upper(p: number, i: number, j: number): number {
  // `>> 1` keeps the index an integer (i·(i − 1)/2 is −0 at i = 0, which de-optimises the caller).
  return i * p - ((i * (i - 1)) >> 1) + (j - i);
}

/**
 * Diagonal 4×4 tile: columns c0…c3 (offsets into J, repeated when the block has fewer than 4
 * columns), upper triangle of the tile, Jᵀr of the block and rᵀr, in one pass over the rows.
 */
function diagonalTile(
  p: number, i0: number, n: number, out: Float64Array,
  r: Float64Array, J: Float64Array, rows: number, stride: number,
): number {
  const c0 = i0 * stride;
  const c1 = (i0 + (n > 1 ? 1 : 0)) * stride;
  const c2 = (i0 + (n > 2 ? 2 : n - 1)) * stride;
  const c3 = (i0 + (n > 3 ? 3 : n - 1)) * stride;
  let a00 = 0, a01 = 0, a02 = 0, a03 = 0, a11 = 0, a12 = 0, a13 = 0, a22 = 0, a23 = 0, a33 = 0;
  let g0 = 0, g1 = 0, g2 = 0, g3 = 0, s = 0;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[c0 + k]!; const x1 = J[c1 + k]!; const x2 = J[c2 + k]!; const x3 = J[c3 + k]!;
    a00 += x0 * x0; a01 += x0 * x1; a02 += x0 * x2; a03 += x0 * x3;
    a11 += x1 * x1; a12 += x1 * x2; a13 += x1 * x3;
    a22 += x2 * x2; a23 += x2 * x3;
    a33 += x3 * x3;
    g0 += x0 * rk; g1 += x1 * rk; g2 += x2 * rk; g3 += x3 * rk;
    s += rk * rk;
  }
  const tri = (p * (p + 1)) / 2;
  out[upper(p, i0, i0)] = a00;
  out[tri + i0] = g0;
  if (n > 1) {
    out[upper(p, i0, i0 + 1)] = a01;
    out[upper(p, i0 + 1, i0 + 1)] = a11;
    out[tri + i0 + 1] = g1;
  }
  if (n > 2) {
    out[upper(p, i0, i0 + 2)] = a02;
    out[upper(p, i0 + 1, i0 + 2)] = a12;
    out[upper(p, i0 + 2, i0 + 2)] = a22;
    out[tri + i0 + 2] = g2;
  }
  if (n > 3) {
    out[upper(p, i0, i0 + 3)] = a03;
    out[upper(p, i0 + 1, i0 + 3)] = a13;
    out[upper(p, i0 + 2, i0 + 3)] = a23;
    out[upper(p, i0 + 3, i0 + 3)] = a33;
    out[tri + i0 + 3] = g3;
  }
  return s;
}

/**
 * Off-diagonal 4×4 tile: rows i0… (ni columns) against columns j0… (nj columns) of JᵀJ, in one
 * pass over the rows. Missing columns repeat the block's last column and their sums are dropped.
 */
function offDiagonalTile(
  p: number, i0: number, ni: number, j0: number, nj: number, out: Float64Array,
  J: Float64Array, rows: number, stride: number,
): void {
  const c0 = i0 * stride;
  const c1 = (i0 + (ni > 1 ? 1 : 0)) * stride;
  const c2 = (i0 + (ni > 2 ? 2 : ni - 1)) * stride;
  const c3 = (i0 + (ni > 3 ? 3 : ni - 1)) * stride;
  const d0 = j0 * stride;
  const d1 = (j0 + (nj > 1 ? 1 : 0)) * stride;
  const d2 = (j0 + (nj > 2 ? 2 : nj - 1)) * stride;
  const d3 = (j0 + (nj > 3 ? 3 : nj - 1)) * stride;
  let a00 = 0, a01 = 0, a02 = 0, a03 = 0, a10 = 0, a11 = 0, a12 = 0, a13 = 0;
  let a20 = 0, a21 = 0, a22 = 0, a23 = 0, a30 = 0, a31 = 0, a32 = 0, a33 = 0;
  for (let k = 0; k < rows; k++) {
    const x0 = J[c0 + k]!; const x1 = J[c1 + k]!; const x2 = J[c2 + k]!; const x3 = J[c3 + k]!;
    const y0 = J[d0 + k]!; const y1 = J[d1 + k]!; const y2 = J[d2 + k]!; const y3 = J[d3 + k]!;
    a00 += x0 * y0; a01 += x0 * y1; a02 += x0 * y2; a03 += x0 * y3;
    a10 += x1 * y0; a11 += x1 * y1; a12 += x1 * y2; a13 += x1 * y3;
    a20 += x2 * y0; a21 += x2 * y1; a22 += x2 * y2; a23 += x2 * y3;
    a30 += x3 * y0; a31 += x3 * y1; a32 += x3 * y2; a33 += x3 * y3;
  }
  // Unrolled stores: entry (i0 + a, j0 + b) exists when a < ni and b < nj.
  out[upper(p, i0, j0)] = a00;
  if (nj > 1) out[upper(p, i0, j0 + 1)] = a01;
  if (nj > 2) out[upper(p, i0, j0 + 2)] = a02;
  if (nj > 3) out[upper(p, i0, j0 + 3)] = a03;
  if (ni > 1) {
    out[upper(p, i0 + 1, j0)] = a10;
    if (nj > 1) out[upper(p, i0 + 1, j0 + 1)] = a11;
    if (nj > 2) out[upper(p, i0 + 1, j0 + 2)] = a12;
    if (nj > 3) out[upper(p, i0 + 1, j0 + 3)] = a13;
  }
  if (ni > 2) {
    out[upper(p, i0 + 2, j0)] = a20;
    if (nj > 1) out[upper(p, i0 + 2, j0 + 1)] = a21;
    if (nj > 2) out[upper(p, i0 + 2, j0 + 2)] = a22;
    if (nj > 3) out[upper(p, i0 + 2, j0 + 3)] = a23;
  }
  if (ni > 3) {
    out[upper(p, i0 + 3, j0)] = a30;
    if (nj > 1) out[upper(p, i0 + 3, j0 + 1)] = a31;
    if (nj > 2) out[upper(p, i0 + 3, j0 + 2)] = a32;
    if (nj > 3) out[upper(p, i0 + 3, j0 + 3)] = a33;
  }
}

/**
 * Fills `out` with one chunk's sums (upper triangle of JᵀJ, Jᵀr, rᵀr) for any p ≥ 1, in
 * ⌈p/4⌉(⌈p/4⌉+1)/2 passes over the rows: JᵀJ is cut into 4×4 tiles and each tile on or above the
 * diagonal is summed in 16 scalar locals (register blocking); the diagonal tiles also carry Jᵀr
 * of their columns and rᵀr. Every entry stays a plain left-to-right sum over the rows, so the
 * totals are bit-for-bit those of one dot product per entry.
 *
 * Kernel: allocates nothing, never throws; non-finite inputs propagate.
 *
 * @param p - number of parameters (integer ≥ 1)
 * @param out - chunk sums, length ≥ p(p+1)/2 + p + 1
 * @param r - residuals r[k], k < rows
 * @param J - column-major Jacobian, ∂r[k]/∂θⱼ at `J[j * stride + k]`
 * @param rows - number of rows
 * @param stride - distance between Jacobian columns
 * @returns the chunk's rᵀr
 * @example
 * const out = new Float64Array(6);
 * sumChunkTiled(2, out, Float64Array.of(1, 1), Float64Array.of(1, 2, 3, 4), 2, 2); // => 2
 * Array.from(out); // => [5, 11, 25, 3, 7, 2]
 */
export function sumChunkTiled(
  p: number,
  out: Float64Array,
  r: Float64Array,
  J: Float64Array,
  rows: number,
  stride: number,
): number {
  let ssr = 0;
  for (let i0 = 0; i0 < p; i0 += 4) {
    const ni = p - i0 < 4 ? p - i0 : 4;
    const s = diagonalTile(p, i0, ni, out, r, J, rows, stride);
    if (i0 === 0) ssr = s;
    for (let j0 = i0 + 4; j0 < p; j0 += 4) {
      offDiagonalTile(p, i0, ni, j0, p - j0 < 4 ? p - j0 : 4, out, J, rows, stride);
    }
  }
  out[(p * (p + 1)) / 2 + p] = ssr;
  return ssr;
}
