import { solveSymmetricSystem } from './solveSymmetricSystem.js';
import { zeroPhaseLowPass } from './zeroPhaseLowPass.js';

/** Input of `fitInverseDynamics`. */
export interface InverseDynamicsInput {
  /** Uniform sample interval h [s]. */
  sampleInterval: number;
  /** Measured position [m or rad]. */
  position: Float64Array;
  /** Drive force or torque [N or N·m], same length. */
  force: Float64Array;
  /** Cutoff of the zero-phase low-pass on the position before differentiation [Hz]. @default 0.1/h */
  positionCutoff?: number;
  /** Keep every `decimation`-th sample after the anti-alias low-pass. @default 10 */
  decimation?: number;
  /** Decimated samples dropped at each end (filter edges). @default 50 */
  trim?: number;
}

/** Result of `fitInverseDynamics`: force = inertia·acc + viscous·vel + coulomb·sgn(vel) + offset. */
export interface InverseDynamicsFit {
  /** Mass or inertia [kg or kg·m²]. */
  inertia: number;
  /** Viscous coefficient [N·s/m or N·m·s/rad]. */
  viscous: number;
  /** Coulomb force or torque [N or N·m]. */
  coulomb: number;
  /** Constant offset [N or N·m]. */
  offset: number;
  /** Standard errors in the same order (inertia, viscous, coulomb, offset), from s²(ΦᵀΦ)⁻¹. */
  standardErrors: [number, number, number, number];
  /** ‖force − fit‖/‖force‖ over the used samples. */
  relativeError: number;
  /** Samples used in the regression. */
  samples: number;
}

/**
 * Fits the mechanical inverse-dynamics model force = inertia·q̈ + viscous·q̇ + coulomb·sgn(q̇) +
 * offset by ordinary least squares on filtered derivatives (equation error). This is the
 * estimator's path for drives where only position and a force/torque command are logged, and the
 * starting-value path for loaded runs.
 *
 * ## Method
 * Position → zero-phase Butterworth low-pass (order 4, `positionCutoff`) → central differences
 * for q̇ and q̈. The regressors and the force are passed through the same zero-phase anti-alias
 * low-pass at 0.4·(fs/2)/decimation and decimated; `trim` samples are dropped at each end. OLS by
 * the normal equations; standard errors from s²(ΦᵀΦ)⁻¹ with s² = SSR/(n − 4).
 *
 * ## References
 * M. Gautier (1997), "Dynamic identification of robots with power model", Proc. IEEE ICRA,
 * 1922–1927, doi:10.1109/ROBOT.1997.619069 (inverse dynamic identification model with least squares).
 *
 * @param input - sample interval, position, force and filter settings
 * @returns the four coefficients, their standard errors and the relative error of the fit
 * @throws TypeError when the series are not Float64Arrays of equal length
 * @throws RangeError when the interval, cutoff, decimation or trim is out of range, or too few samples remain
 * @example
 * fitInverseDynamics({ sampleInterval: 1e-3, position: q, force: f }).inertia; // ≈ 95.1 (EMPS)
 */
export function fitInverseDynamics(input: InverseDynamicsInput): InverseDynamicsFit {
  const fn = 'fitInverseDynamics';
  if (input === null || typeof input !== 'object') throw new TypeError(`${fn}: input must be an object`);
  const { position, force } = input;
  if (!(position instanceof Float64Array)) throw new TypeError(`${fn}: input.position must be a Float64Array`);
  if (!(force instanceof Float64Array)) throw new TypeError(`${fn}: input.force must be a Float64Array`);
  if (force.length !== position.length) throw new TypeError(`${fn}: input.force has ${force.length} samples, input.position ${position.length}`);
  const h = input.sampleInterval;
  if (!(h > 0) || !Number.isFinite(h)) throw new RangeError(`${fn}: input.sampleInterval must be > 0 (got ${h})`);
  const dec = input.decimation ?? 10;
  if (!Number.isInteger(dec) || dec < 1) throw new RangeError(`${fn}: input.decimation must be an integer >= 1 (got ${dec})`);
  const trim = input.trim ?? 50;
  if (!Number.isInteger(trim) || trim < 0) throw new RangeError(`${fn}: input.trim must be an integer >= 0 (got ${trim})`);
  const cutoff = input.positionCutoff ?? 0.1 / h;
  if (!(cutoff > 0 && cutoff < 0.5 / h)) throw new RangeError(`${fn}: input.positionCutoff must be in (0, ${0.5 / h}) Hz (got ${cutoff})`);
  const n = position.length;
  for (let k = 0; k < n; k++) {
    if (!Number.isFinite(position[k]!)) throw new RangeError(`${fn}: input.position[${k}] must be finite (got ${position[k]})`);
    if (!Number.isFinite(force[k]!)) throw new RangeError(`${fn}: input.force[${k}] must be finite (got ${force[k]})`);
  }
  const q = zeroPhaseLowPass(position, h, cutoff);
  const v = new Float64Array(n);
  const a = new Float64Array(n);
  for (let k = 1; k + 1 < n; k++) {
    v[k] = (q[k + 1]! - q[k - 1]!) / (2 * h);
    a[k] = (q[k + 1]! - 2 * q[k]! + q[k - 1]!) / (h * h);
  }
  v[0] = v[1]!; v[n - 1] = v[n - 2]!; a[0] = a[1]!; a[n - 1] = a[n - 2]!;
  const s = Float64Array.from(v, (x) => (x > 0 ? 1 : x < 0 ? -1 : 0));
  const aa = 0.4 * (0.5 / h) / dec;
  const lp = (x: Float64Array): Float64Array => (dec > 1 ? zeroPhaseLowPass(x, h, aa, 8) : x);
  const cols = [lp(a), lp(v), lp(s)];
  const y = lp(force);
  const idx: number[] = [];
  for (let k = 0; k < n; k += dec) idx.push(k);
  const used = idx.slice(trim, idx.length - trim);
  const m = used.length;
  if (m < 8) throw new RangeError(`${fn}: only ${m} samples remain after decimation and trimming (need ≥ 8)`);
  const p = 4;
  const A = new Float64Array(p * p);
  const b = new Float64Array(p);
  const row = new Float64Array(p);
  let yy = 0;
  for (const k of used) {
    row[0] = cols[0]![k]!; row[1] = cols[1]![k]!; row[2] = cols[2]![k]!; row[3] = 1;
    const yk = y[k]!;
    yy += yk * yk;
    for (let i = 0; i < p; i++) {
      b[i] = b[i]! + row[i]! * yk;
      for (let j = 0; j < p; j++) A[i * p + j] = A[i * p + j]! + row[i]! * row[j]!;
    }
  }
  const beta = solveSymmetricSystem(A, b, p);
  if (beta === null) throw new RangeError(`${fn}: the regressors are collinear (no motion in both directions?)`);
  let ssr = 0;
  for (const k of used) {
    const e = y[k]! - (beta[0]! * cols[0]![k]! + beta[1]! * cols[1]![k]! + beta[2]! * cols[2]![k]! + beta[3]!);
    ssr += e * e;
  }
  const s2 = ssr / (m - p);
  const se: number[] = [];
  for (let j = 0; j < p; j++) {
    const e = new Float64Array(p);
    e[j] = 1;
    const col = solveSymmetricSystem(A, e, p);
    se.push(col === null ? NaN : Math.sqrt(s2 * col[j]!));
  }
  return {
    inertia: beta[0]!, viscous: beta[1]!, coulomb: beta[2]!, offset: beta[3]!,
    standardErrors: [se[0]!, se[1]!, se[2]!, se[3]!],
    relativeError: Math.sqrt(ssr / yy),
    samples: m,
  };
}
