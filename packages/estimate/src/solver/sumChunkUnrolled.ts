/**
 * Straight-line single-pass kernels for the chunk sums of the normal equations, p = 1…8.
 *
 * Each kernel reads row k of the column-major Jacobian once (x_j = J[j·stride + k]) and updates
 * every upper-triangle entry of JᵀJ, every entry of Jᵀr and rᵀr in its own scalar local. Each
 * entry is still a plain left-to-right sum over the rows, so the totals are bit-for-bit those of
 * one dot product per entry. The kernels write `out` in the accumulator's chunk layout: the upper
 * triangle of JᵀJ row by row, then Jᵀr, then rᵀr. The bodies follow one mechanical pattern (one
 * local per entry, named a<i><j> for JᵀJ, g<i> for Jᵀr, s for rᵀr).
 */

function sums1(out: Float64Array, r: Float64Array, J: Float64Array, rows: number, _st: number): number {
  let a00 = 0, g0 = 0, s = 0;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[k]!;
    a00 += x0 * x0;
    g0 += x0 * rk;
    s += rk * rk;
  }
  out[0] = a00;
  out[1] = g0;
  out[2] = s;
  return s;
}

function sums2(out: Float64Array, r: Float64Array, J: Float64Array, rows: number, st: number): number {
  let a00 = 0, a01 = 0, a11 = 0, g0 = 0, g1 = 0, s = 0;
  const o1 = st;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[k]!; const x1 = J[o1 + k]!;
    a00 += x0 * x0;
    a01 += x0 * x1;
    a11 += x1 * x1;
    g0 += x0 * rk;
    g1 += x1 * rk;
    s += rk * rk;
  }
  out[0] = a00;
  out[1] = a01;
  out[2] = a11;
  out[3] = g0;
  out[4] = g1;
  out[5] = s;
  return s;
}

function sums3(out: Float64Array, r: Float64Array, J: Float64Array, rows: number, st: number): number {
  let a00 = 0, a01 = 0, a02 = 0, a11 = 0, a12 = 0, a22 = 0, g0 = 0, g1 = 0;
  let g2 = 0, s = 0;
  const o1 = st; const o2 = 2 * st;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[k]!; const x1 = J[o1 + k]!; const x2 = J[o2 + k]!;
    a00 += x0 * x0;
    a01 += x0 * x1;
    a02 += x0 * x2;
    a11 += x1 * x1;
    a12 += x1 * x2;
    a22 += x2 * x2;
    g0 += x0 * rk;
    g1 += x1 * rk;
    g2 += x2 * rk;
    s += rk * rk;
  }
  out[0] = a00;
  out[1] = a01;
  out[2] = a02;
  out[3] = a11;
  out[4] = a12;
  out[5] = a22;
  out[6] = g0;
  out[7] = g1;
  out[8] = g2;
  out[9] = s;
  return s;
}

function sums4(out: Float64Array, r: Float64Array, J: Float64Array, rows: number, st: number): number {
  let a00 = 0, a01 = 0, a02 = 0, a03 = 0, a11 = 0, a12 = 0, a13 = 0, a22 = 0;
  let a23 = 0, a33 = 0, g0 = 0, g1 = 0, g2 = 0, g3 = 0, s = 0;
  const o1 = st; const o2 = 2 * st; const o3 = 3 * st;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[k]!; const x1 = J[o1 + k]!; const x2 = J[o2 + k]!; const x3 = J[o3 + k]!;
    a00 += x0 * x0;
    a01 += x0 * x1;
    a02 += x0 * x2;
    a03 += x0 * x3;
    a11 += x1 * x1;
    a12 += x1 * x2;
    a13 += x1 * x3;
    a22 += x2 * x2;
    a23 += x2 * x3;
    a33 += x3 * x3;
    g0 += x0 * rk;
    g1 += x1 * rk;
    g2 += x2 * rk;
    g3 += x3 * rk;
    s += rk * rk;
  }
  out[0] = a00;
  out[1] = a01;
  out[2] = a02;
  out[3] = a03;
  out[4] = a11;
  out[5] = a12;
  out[6] = a13;
  out[7] = a22;
  out[8] = a23;
  out[9] = a33;
  out[10] = g0;
  out[11] = g1;
  out[12] = g2;
  out[13] = g3;
  out[14] = s;
  return s;
}

function sums5(out: Float64Array, r: Float64Array, J: Float64Array, rows: number, st: number): number {
  let a00 = 0, a01 = 0, a02 = 0, a03 = 0, a04 = 0, a11 = 0, a12 = 0, a13 = 0;
  let a14 = 0, a22 = 0, a23 = 0, a24 = 0, a33 = 0, a34 = 0, a44 = 0, g0 = 0;
  let g1 = 0, g2 = 0, g3 = 0, g4 = 0, s = 0;
  const o1 = st; const o2 = 2 * st; const o3 = 3 * st; const o4 = 4 * st;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[k]!; const x1 = J[o1 + k]!; const x2 = J[o2 + k]!; const x3 = J[o3 + k]!; const x4 = J[o4 + k]!;
    a00 += x0 * x0;
    a01 += x0 * x1;
    a02 += x0 * x2;
    a03 += x0 * x3;
    a04 += x0 * x4;
    a11 += x1 * x1;
    a12 += x1 * x2;
    a13 += x1 * x3;
    a14 += x1 * x4;
    a22 += x2 * x2;
    a23 += x2 * x3;
    a24 += x2 * x4;
    a33 += x3 * x3;
    a34 += x3 * x4;
    a44 += x4 * x4;
    g0 += x0 * rk;
    g1 += x1 * rk;
    g2 += x2 * rk;
    g3 += x3 * rk;
    g4 += x4 * rk;
    s += rk * rk;
  }
  out[0] = a00;
  out[1] = a01;
  out[2] = a02;
  out[3] = a03;
  out[4] = a04;
  out[5] = a11;
  out[6] = a12;
  out[7] = a13;
  out[8] = a14;
  out[9] = a22;
  out[10] = a23;
  out[11] = a24;
  out[12] = a33;
  out[13] = a34;
  out[14] = a44;
  out[15] = g0;
  out[16] = g1;
  out[17] = g2;
  out[18] = g3;
  out[19] = g4;
  out[20] = s;
  return s;
}

function sums6(out: Float64Array, r: Float64Array, J: Float64Array, rows: number, st: number): number {
  let a00 = 0, a01 = 0, a02 = 0, a03 = 0, a04 = 0, a05 = 0, a11 = 0, a12 = 0;
  let a13 = 0, a14 = 0, a15 = 0, a22 = 0, a23 = 0, a24 = 0, a25 = 0, a33 = 0;
  let a34 = 0, a35 = 0, a44 = 0, a45 = 0, a55 = 0, g0 = 0, g1 = 0, g2 = 0;
  let g3 = 0, g4 = 0, g5 = 0, s = 0;
  const o1 = st; const o2 = 2 * st; const o3 = 3 * st; const o4 = 4 * st; const o5 = 5 * st;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[k]!; const x1 = J[o1 + k]!; const x2 = J[o2 + k]!; const x3 = J[o3 + k]!; const x4 = J[o4 + k]!; const x5 = J[o5 + k]!;
    a00 += x0 * x0;
    a01 += x0 * x1;
    a02 += x0 * x2;
    a03 += x0 * x3;
    a04 += x0 * x4;
    a05 += x0 * x5;
    a11 += x1 * x1;
    a12 += x1 * x2;
    a13 += x1 * x3;
    a14 += x1 * x4;
    a15 += x1 * x5;
    a22 += x2 * x2;
    a23 += x2 * x3;
    a24 += x2 * x4;
    a25 += x2 * x5;
    a33 += x3 * x3;
    a34 += x3 * x4;
    a35 += x3 * x5;
    a44 += x4 * x4;
    a45 += x4 * x5;
    a55 += x5 * x5;
    g0 += x0 * rk;
    g1 += x1 * rk;
    g2 += x2 * rk;
    g3 += x3 * rk;
    g4 += x4 * rk;
    g5 += x5 * rk;
    s += rk * rk;
  }
  out[0] = a00;
  out[1] = a01;
  out[2] = a02;
  out[3] = a03;
  out[4] = a04;
  out[5] = a05;
  out[6] = a11;
  out[7] = a12;
  out[8] = a13;
  out[9] = a14;
  out[10] = a15;
  out[11] = a22;
  out[12] = a23;
  out[13] = a24;
  out[14] = a25;
  out[15] = a33;
  out[16] = a34;
  out[17] = a35;
  out[18] = a44;
  out[19] = a45;
  out[20] = a55;
  out[21] = g0;
  out[22] = g1;
  out[23] = g2;
  out[24] = g3;
  out[25] = g4;
  out[26] = g5;
  out[27] = s;
  return s;
}

function sums7(out: Float64Array, r: Float64Array, J: Float64Array, rows: number, st: number): number {
  let a00 = 0, a01 = 0, a02 = 0, a03 = 0, a04 = 0, a05 = 0, a06 = 0, a11 = 0;
  let a12 = 0, a13 = 0, a14 = 0, a15 = 0, a16 = 0, a22 = 0, a23 = 0, a24 = 0;
  let a25 = 0, a26 = 0, a33 = 0, a34 = 0, a35 = 0, a36 = 0, a44 = 0, a45 = 0;
  let a46 = 0, a55 = 0, a56 = 0, a66 = 0, g0 = 0, g1 = 0, g2 = 0, g3 = 0;
  let g4 = 0, g5 = 0, g6 = 0, s = 0;
  const o1 = st; const o2 = 2 * st; const o3 = 3 * st; const o4 = 4 * st; const o5 = 5 * st; const o6 = 6 * st;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[k]!; const x1 = J[o1 + k]!; const x2 = J[o2 + k]!; const x3 = J[o3 + k]!; const x4 = J[o4 + k]!; const x5 = J[o5 + k]!; const x6 = J[o6 + k]!;
    a00 += x0 * x0;
    a01 += x0 * x1;
    a02 += x0 * x2;
    a03 += x0 * x3;
    a04 += x0 * x4;
    a05 += x0 * x5;
    a06 += x0 * x6;
    a11 += x1 * x1;
    a12 += x1 * x2;
    a13 += x1 * x3;
    a14 += x1 * x4;
    a15 += x1 * x5;
    a16 += x1 * x6;
    a22 += x2 * x2;
    a23 += x2 * x3;
    a24 += x2 * x4;
    a25 += x2 * x5;
    a26 += x2 * x6;
    a33 += x3 * x3;
    a34 += x3 * x4;
    a35 += x3 * x5;
    a36 += x3 * x6;
    a44 += x4 * x4;
    a45 += x4 * x5;
    a46 += x4 * x6;
    a55 += x5 * x5;
    a56 += x5 * x6;
    a66 += x6 * x6;
    g0 += x0 * rk;
    g1 += x1 * rk;
    g2 += x2 * rk;
    g3 += x3 * rk;
    g4 += x4 * rk;
    g5 += x5 * rk;
    g6 += x6 * rk;
    s += rk * rk;
  }
  out[0] = a00;
  out[1] = a01;
  out[2] = a02;
  out[3] = a03;
  out[4] = a04;
  out[5] = a05;
  out[6] = a06;
  out[7] = a11;
  out[8] = a12;
  out[9] = a13;
  out[10] = a14;
  out[11] = a15;
  out[12] = a16;
  out[13] = a22;
  out[14] = a23;
  out[15] = a24;
  out[16] = a25;
  out[17] = a26;
  out[18] = a33;
  out[19] = a34;
  out[20] = a35;
  out[21] = a36;
  out[22] = a44;
  out[23] = a45;
  out[24] = a46;
  out[25] = a55;
  out[26] = a56;
  out[27] = a66;
  out[28] = g0;
  out[29] = g1;
  out[30] = g2;
  out[31] = g3;
  out[32] = g4;
  out[33] = g5;
  out[34] = g6;
  out[35] = s;
  return s;
}

function sums8(out: Float64Array, r: Float64Array, J: Float64Array, rows: number, st: number): number {
  let a00 = 0, a01 = 0, a02 = 0, a03 = 0, a04 = 0, a05 = 0, a06 = 0, a07 = 0;
  let a11 = 0, a12 = 0, a13 = 0, a14 = 0, a15 = 0, a16 = 0, a17 = 0, a22 = 0;
  let a23 = 0, a24 = 0, a25 = 0, a26 = 0, a27 = 0, a33 = 0, a34 = 0, a35 = 0;
  let a36 = 0, a37 = 0, a44 = 0, a45 = 0, a46 = 0, a47 = 0, a55 = 0, a56 = 0;
  let a57 = 0, a66 = 0, a67 = 0, a77 = 0, g0 = 0, g1 = 0, g2 = 0, g3 = 0;
  let g4 = 0, g5 = 0, g6 = 0, g7 = 0, s = 0;
  const o1 = st; const o2 = 2 * st; const o3 = 3 * st; const o4 = 4 * st; const o5 = 5 * st; const o6 = 6 * st; const o7 = 7 * st;
  for (let k = 0; k < rows; k++) {
    const rk = r[k]!;
    const x0 = J[k]!; const x1 = J[o1 + k]!; const x2 = J[o2 + k]!; const x3 = J[o3 + k]!; const x4 = J[o4 + k]!; const x5 = J[o5 + k]!; const x6 = J[o6 + k]!; const x7 = J[o7 + k]!;
    a00 += x0 * x0;
    a01 += x0 * x1;
    a02 += x0 * x2;
    a03 += x0 * x3;
    a04 += x0 * x4;
    a05 += x0 * x5;
    a06 += x0 * x6;
    a07 += x0 * x7;
    a11 += x1 * x1;
    a12 += x1 * x2;
    a13 += x1 * x3;
    a14 += x1 * x4;
    a15 += x1 * x5;
    a16 += x1 * x6;
    a17 += x1 * x7;
    a22 += x2 * x2;
    a23 += x2 * x3;
    a24 += x2 * x4;
    a25 += x2 * x5;
    a26 += x2 * x6;
    a27 += x2 * x7;
    a33 += x3 * x3;
    a34 += x3 * x4;
    a35 += x3 * x5;
    a36 += x3 * x6;
    a37 += x3 * x7;
    a44 += x4 * x4;
    a45 += x4 * x5;
    a46 += x4 * x6;
    a47 += x4 * x7;
    a55 += x5 * x5;
    a56 += x5 * x6;
    a57 += x5 * x7;
    a66 += x6 * x6;
    a67 += x6 * x7;
    a77 += x7 * x7;
    g0 += x0 * rk;
    g1 += x1 * rk;
    g2 += x2 * rk;
    g3 += x3 * rk;
    g4 += x4 * rk;
    g5 += x5 * rk;
    g6 += x6 * rk;
    g7 += x7 * rk;
    s += rk * rk;
  }
  out[0] = a00;
  out[1] = a01;
  out[2] = a02;
  out[3] = a03;
  out[4] = a04;
  out[5] = a05;
  out[6] = a06;
  out[7] = a07;
  out[8] = a11;
  out[9] = a12;
  out[10] = a13;
  out[11] = a14;
  out[12] = a15;
  out[13] = a16;
  out[14] = a17;
  out[15] = a22;
  out[16] = a23;
  out[17] = a24;
  out[18] = a25;
  out[19] = a26;
  out[20] = a27;
  out[21] = a33;
  out[22] = a34;
  out[23] = a35;
  out[24] = a36;
  out[25] = a37;
  out[26] = a44;
  out[27] = a45;
  out[28] = a46;
  out[29] = a47;
  out[30] = a55;
  out[31] = a56;
  out[32] = a57;
  out[33] = a66;
  out[34] = a67;
  out[35] = a77;
  out[36] = g0;
  out[37] = g1;
  out[38] = g2;
  out[39] = g3;
  out[40] = g4;
  out[41] = g5;
  out[42] = g6;
  out[43] = g7;
  out[44] = s;
  return s;
}

/** Largest parameter count with an unrolled kernel. */
export const UNROLLED_MAX_P = 8;

/**
 * Fills `out` with one chunk's sums (upper triangle of JᵀJ, Jᵀr, rᵀr) in a single pass over the
 * rows, for 1 ≤ p ≤ 8.
 *
 * Kernel: allocates nothing, never throws; non-finite inputs propagate.
 *
 * @param p - number of parameters (1…8)
 * @param out - chunk sums, length ≥ p(p+1)/2 + p + 1
 * @param r - residuals r[k], k < rows
 * @param J - column-major Jacobian, ∂r[k]/∂θⱼ at `J[j * stride + k]`
 * @param rows - number of rows
 * @param stride - distance between Jacobian columns
 * @returns the chunk's rᵀr, or NaN when p is outside 1…8
 * @example
 * const out = new Float64Array(3);
 * sumChunkUnrolled(1, out, Float64Array.of(1, 2), Float64Array.of(3, 4), 2, 2); // => 5
 * Array.from(out); // => [25, 11, 5]
 */
export function sumChunkUnrolled(
  p: number,
  out: Float64Array,
  r: Float64Array,
  J: Float64Array,
  rows: number,
  stride: number,
): number {
  switch (p) {
    case 1: return sums1(out, r, J, rows, stride);
    case 2: return sums2(out, r, J, rows, stride);
    case 3: return sums3(out, r, J, rows, stride);
    case 4: return sums4(out, r, J, rows, stride);
    case 5: return sums5(out, r, J, rows, stride);
    case 6: return sums6(out, r, J, rows, stride);
    case 7: return sums7(out, r, J, rows, stride);
    case 8: return sums8(out, r, J, rows, stride);
    default: return NaN;
  }
}
