import type { MotorParams } from './types.js';

const SERIES_TERMS = 24;

/**
 * Exact zero-order-hold discretisation of the linear motor model over one interval, in closed
 * form for the 2×2 system matrix. Writes 8 numbers into `out`:
 * [φ11, φ12, φ21, φ22, Γv1, Γv2, Γτ1, Γτ2] so that
 * [i, ω]⁺ = Φ·[i, ω] + Γv·v + Γτ·τ_load for v and τ_load held over the interval.
 *
 * ## Method
 * With A = [[−R/L, −Ke/L], [Kt/J, −b/J]], s = tr(A)/2, M = A − s·I and M² = δ·I
 * (δ = s² − det A, Cayley–Hamilton), every analytic function of A is f(A) = f₀·I + f₁·M with
 * f₀ the mean of f over the two eigenvalues λ₁,₂ = s ± √δ and f₁ their divided difference.
 * For Φ = e^{Ah}: f₀ = e^{sh}·cosh(√δ·h), f₁ = e^{sh}·sinh(√δ·h)/√δ (cos/sin for δ < 0, the limit
 * h·e^{sh} for repeated poles). For Ψ = ∫₀ʰ e^{Aτ}dτ (Γ = Ψ·B) the same with g(λ) = (e^{λh} − 1)/λ.
 * Cancellation is avoided by choosing, per case: a power series in (s·h, det·h²) when the spectral
 * radius times h is ≤ 1; divided differences of expm1-based g(λ) when the poles are well separated;
 * the identity A·Ψ = Φ − I when they are close but fast. Accurate to a few ulp for all positive
 * constants and any h ≥ 0 (huge h gives the steady state, never overflow).
 *
 * ## References
 * C. Moler, C. Van Loan, "Nineteen dubious ways to compute the exponential of a matrix, twenty-five
 * years later", SIAM Review 45(1):3–49, 2003, doi:10.1137/S00361445024180 (the 2×2 closed form and
 * the zero-order-hold integral).
 *
 * @param out - receives the 8 numbers (length ≥ 8)
 * @param p - motor constants (not validated; NaN out for bad values)
 * @param h - interval [s], ≥ 0
 * @returns `out`
 * @example
 * const m = zohInto(new Float64Array(8), { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }, 1e-4);
 * m[4]; // ≈ 0.0951 (A per V after one 0.1 ms step)
 */
export function zohInto(out: Float64Array, p: MotorParams, h: number): Float64Array {
  const a11 = -p.R / p.L;
  const a12 = -p.Ke / p.L;
  const a21 = p.Kt / p.J;
  const a22 = -p.b / p.J;
  const s = 0.5 * (a11 + a22);
  const m = 0.5 * (a11 - a22);
  const delta = m * m + a12 * a21;
  const det = a11 * a22 - a12 * a21;
  let E0: number;
  let E1: number;
  let F0: number;
  let F1: number;
  const rho = delta >= 0 ? Math.abs(s) + Math.sqrt(delta) : Math.sqrt(det);
  const x = delta * h * h;
  if (!(rho * h > 1)) {
    // Power series: v_k = (λ1^k + λ2^k)/2, u_k = (λ1^k − λ2^k)/(λ1 − λ2), scaled by h.
    const sig = s * h;
    const dh = det * h * h;
    let vPrev = 1;
    let v = sig;
    let uPrev = 0;
    let u = 1;
    let fact = 1; // k!
    E0 = 1;
    E1 = 0;
    F0 = 1;
    F1 = 0;
    for (let k = 1; k < SERIES_TERMS; k++) {
      fact *= k;
      E0 += v / fact;
      E1 += u / fact;
      F0 += v / (fact * (k + 1));
      F1 += u / (fact * (k + 1));
      const vn = 2 * sig * v - dh * vPrev;
      vPrev = v;
      v = vn;
      const un = 2 * sig * u - dh * uPrev;
      uPrev = u;
      u = un;
    }
    E1 *= h;
    F0 *= h;
    F1 *= h * h;
  } else {
    const q = Math.sqrt(Math.abs(delta));
    if (Math.abs(x) < 1) {
      const es = Math.exp(s * h);
      const qh = q * h;
      if (delta >= 0) {
        E0 = es * Math.cosh(qh);
        E1 = qh > 0 ? (es * Math.sinh(qh)) / q : es * h;
      } else {
        E0 = es * Math.cos(qh);
        E1 = (es * Math.sin(qh)) / q;
      }
    } else if (delta > 0) {
      const e1 = Math.exp((s + q) * h);
      const e2 = Math.exp((s - q) * h);
      E0 = 0.5 * (e1 + e2);
      E1 = (e1 - e2) / (2 * q);
    } else {
      const es = Math.exp(s * h);
      E0 = es * Math.cos(q * h);
      E1 = (es * Math.sin(q * h)) / q;
    }
    if (Math.abs(x) >= 0.0625) {
      if (delta > 0) {
        const l1 = s + q;
        const l2 = s - q;
        const g1 = l1 === 0 ? h : Math.expm1(l1 * h) / l1;
        const g2 = l2 === 0 ? h : Math.expm1(l2 * h) / l2;
        F0 = 0.5 * (g1 + g2);
        F1 = (g1 - g2) / (2 * q);
      } else {
        const es1 = Math.expm1(s * h);
        const c = Math.cos(q * h);
        const sh = Math.sin(0.5 * q * h);
        const nr = es1 * c - 2 * sh * sh;
        const ni = (es1 + 1) * Math.sin(q * h);
        F0 = (nr * s + ni * q) / det;
        F1 = (ni * s - nr * q) / det / q;
      }
    } else {
      F1 = (1 + s * E1 - E0) / det;
      F0 = E1 - s * F1;
    }
  }
  // Φ = E0·I + E1·M, Ψ = F0·I + F1·M, M = [[m, a12], [a21, −m]].
  out[0] = E0 + E1 * m;
  out[1] = E1 * a12;
  out[2] = E1 * a21;
  out[3] = E0 - E1 * m;
  const psi11 = F0 + F1 * m;
  const psi12 = F1 * a12;
  const psi21 = F1 * a21;
  const psi22 = F0 - F1 * m;
  out[4] = psi11 / p.L;
  out[5] = psi21 / p.L;
  out[6] = -psi12 / p.J;
  out[7] = -psi22 / p.J;
  return out;
}
