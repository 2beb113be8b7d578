import type { MotorParams } from './types.js';

const TERMS = 16;
/** Length of the `work` array `zohSensitivitiesInto` needs. */
const WORK_LENGTH = 128;

// 2×2 row-major helpers on Float64Array slots (offsets), used once per discretisation.
function mul(a: Float64Array, ao: number, b: Float64Array, bo: number, c: Float64Array, co: number): void {
  const a0 = a[ao]!, a1 = a[ao + 1]!, a2 = a[ao + 2]!, a3 = a[ao + 3]!;
  const b0 = b[bo]!, b1 = b[bo + 1]!, b2 = b[bo + 2]!, b3 = b[bo + 3]!;
  c[co] = a0 * b0 + a1 * b2;
  c[co + 1] = a0 * b1 + a1 * b3;
  c[co + 2] = a2 * b0 + a3 * b2;
  c[co + 3] = a2 * b1 + a3 * b3;
}

/**
 * Exact zero-order-hold matrices (as `zohInto`) together with their derivatives with respect to
 * R, L, Kt, Ke, J and b. Writes 56 numbers into `out`: the 8 of `zohInto`
 * ([Φ (4), Γv (2), Γτ (2)]) then, for each constant j = 0..5 in the order R, L, Kt, Ke, J, b,
 * the 8 derivatives ∂[Φ, Γv, Γτ]/∂θj at `out[8 + 8j]`.
 *
 * ## Method
 * The derivative of e^{Ah} in the direction E = ∂A/∂θ is the Fréchet derivative, the upper-right
 * block of exp([[A, E], [0, A]]·h). It is evaluated by a Taylor series with scaling and squaring:
 * h is halved m times until ‖A‖₁·h/2^m ≤ 1/2, the series Σ (A·h′)^k/k! and its directional
 * derivative d(X^{k+1}) = X·d(X^k) + E·X^k (and the same for Ψ = ∫e^{Aτ}dτ) are summed to 16
 * terms, then doubled back with Φ(2h) = Φ², Ψ(2h) = Ψ + Φ·Ψ and their product-rule derivatives.
 * Γ = Ψ·B adds the derivative of B = diag(1/L, −1/J).
 *
 * ## References
 * A. H. Al-Mohy, N. J. Higham, "Computing the Fréchet derivative of the matrix exponential, with an
 * application to condition number estimation", SIAM J. Matrix Anal. Appl. 30(4):1639–1657, 2009,
 * doi:10.1137/080716426.
 *
 * @param out - receives 56 numbers
 * @param p - motor constants (not validated)
 * @param h - interval [s], ≥ 0
 * @param work - scratch, length ≥ 128 (allocate once, reuse)
 * @returns `out`
 * @example
 * const out = zohSensitivitiesInto(new Float64Array(56), motor, 1e-4, new Float64Array(128));
 * out[8 + 4]; // ∂Γv1/∂R [A/(V·Ω)]
 */
export function zohSensitivitiesInto(out: Float64Array, p: MotorParams, h: number, work: Float64Array): Float64Array {
  const { R, L, Kt, Ke, J, b } = p;
  const a11 = -R / L, a12 = -Ke / L, a21 = Kt / J, a22 = -b / J;
  const norm = Math.max(Math.abs(a11) + Math.abs(a21), Math.abs(a12) + Math.abs(a22)) * h;
  let squarings = 0;
  if (norm > 0.5) squarings = Math.ceil(Math.log2(norm / 0.5));
  if (!(squarings < 1100)) squarings = 0; // NaN/∞ inputs: fall through and produce NaN
  const hs = h / 2 ** squarings;
  // Layout in work: X 0, P 4, Phi 8, Psi 12, T 16 (temp), T2 20, E 24+4j, D 48+4j, dPhi 72+4j, dPsi 96+4j (j<6) → 120
  const w = work;
  w[0] = a11 * hs; w[1] = a12 * hs; w[2] = a21 * hs; w[3] = a22 * hs;
  // ∂A/∂θ · hs for θ = R, L, Kt, Ke, J, b
  const dA = [
    [-1 / L, 0, 0, 0],
    [R / (L * L), Ke / (L * L), 0, 0],
    [0, 0, 1 / J, 0],
    [0, -1 / L, 0, 0],
    [0, 0, -Kt / (J * J), b / (J * J)],
    [0, 0, 0, -1 / J],
  ];
  for (let j = 0; j < 6; j++) {
    for (let e = 0; e < 4; e++) {
      w[24 + 4 * j + e] = dA[j]![e]! * hs;
      w[48 + 4 * j + e] = 0;
      w[72 + 4 * j + e] = 0;
      w[96 + 4 * j + e] = 0;
    }
  }
  // P = I, Phi = I, Psi = I (Psi scaled by hs at the end)
  for (const o of [4, 8, 12]) { w[o] = 1; w[o + 1] = 0; w[o + 2] = 0; w[o + 3] = 1; }
  let fact = 1;
  for (let k = 1; k < TERMS; k++) {
    fact *= k;
    const c = 1 / fact;
    const d = 1 / (fact * (k + 1));
    for (let j = 0; j < 6; j++) {
      const Do = 48 + 4 * j;
      // D ← X·D + E·P (P = X^{k−1})
      mul(w, 0, w, Do, w, 16);
      mul(w, 24 + 4 * j, w, 4, w, 20);
      for (let e = 0; e < 4; e++) {
        const v = w[16 + e]! + w[20 + e]!;
        w[Do + e] = v;
        w[72 + 4 * j + e] = w[72 + 4 * j + e]! + c * v;
        w[96 + 4 * j + e] = w[96 + 4 * j + e]! + d * v;
      }
    }
    mul(w, 0, w, 4, w, 16);
    for (let e = 0; e < 4; e++) {
      const v = w[16 + e]!;
      w[4 + e] = v;
      w[8 + e] = w[8 + e]! + c * v;
      w[12 + e] = w[12 + e]! + d * v;
    }
  }
  for (let e = 0; e < 4; e++) {
    w[12 + e] = w[12 + e]! * hs;
    for (let j = 0; j < 6; j++) w[96 + 4 * j + e] = w[96 + 4 * j + e]! * hs;
  }
  for (let r = 0; r < squarings; r++) {
    for (let j = 0; j < 6; j++) {
      const dPhi = 72 + 4 * j, dPsi = 96 + 4 * j;
      // dPsi ← dPsi + dPhi·Psi + Phi·dPsi
      mul(w, dPhi, w, 12, w, 16);
      mul(w, 8, w, dPsi, w, 20);
      for (let e = 0; e < 4; e++) w[dPsi + e] = w[dPsi + e]! + w[16 + e]! + w[20 + e]!;
      // dPhi ← dPhi·Phi + Phi·dPhi
      mul(w, dPhi, w, 8, w, 16);
      mul(w, 8, w, dPhi, w, 20);
      for (let e = 0; e < 4; e++) w[dPhi + e] = w[16 + e]! + w[20 + e]!;
    }
    // Psi ← Psi + Phi·Psi ; Phi ← Phi·Phi
    mul(w, 8, w, 12, w, 16);
    for (let e = 0; e < 4; e++) w[12 + e] = w[12 + e]! + w[16 + e]!;
    mul(w, 8, w, 8, w, 16);
    for (let e = 0; e < 4; e++) w[8 + e] = w[16 + e]!;
  }
  const invL = 1 / L, invJ = 1 / J;
  out[0] = w[8]!; out[1] = w[9]!; out[2] = w[10]!; out[3] = w[11]!;
  out[4] = w[12]! * invL; out[5] = w[14]! * invL;
  out[6] = -w[13]! * invJ; out[7] = -w[15]! * invJ;
  for (let j = 0; j < 6; j++) {
    const o = 8 + 8 * j, dPhi = 72 + 4 * j, dPsi = 96 + 4 * j;
    out[o] = w[dPhi]!; out[o + 1] = w[dPhi + 1]!; out[o + 2] = w[dPhi + 2]!; out[o + 3] = w[dPhi + 3]!;
    out[o + 4] = w[dPsi]! * invL; out[o + 5] = w[dPsi + 2]! * invL;
    out[o + 6] = -w[dPsi + 1]! * invJ; out[o + 7] = -w[dPsi + 3]! * invJ;
    if (j === 1) { // ∂(1/L)/∂L = −1/L²
      out[o + 4] = out[o + 4]! - w[12]! * invL * invL; out[o + 5] = out[o + 5]! - w[14]! * invL * invL;
    } else if (j === 4) { // ∂(−1/J)/∂J = 1/J²
      out[o + 6] = out[o + 6]! + w[13]! * invJ * invJ; out[o + 7] = out[o + 7]! + w[15]! * invJ * invJ;
    }
  }
  return out;
}

export { WORK_LENGTH as ZOH_SENSITIVITY_WORK_LENGTH };
