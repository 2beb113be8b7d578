import { zeroPhaseLowPass } from '@motorprint/estimate';
import { compareNestedModels } from './compareNestedModels.js';
import { noiseLevel } from './internal.js';
import { speedScan } from './passes.js';
import { fitLinearModel } from './fitLinearModel.js';
import type { LinearFit, ModelComparison } from './types.js';

/** Input of `mechanicalRegression`. */
export interface MechanicalRegressionInput {
  /** Uniform sample interval h [s]. */
  sampleInterval: number;
  /** Drive quantity proportional to motor torque: armature current [A], torque [N·m] or force [N]. */
  drive: Float64Array;
  /** Measured speed [rad/s or m/s]; give this or `position`. */
  speed?: Float64Array;
  /** Measured position [rad or m]; differentiated after the low-pass when `speed` is absent. */
  position?: Float64Array;
  /** Cutoff of the zero-phase low-pass applied to every column [Hz]. @default 1/(40·h) */
  cutoff?: number;
  /** Keep every `decimation`-th filtered sample. @default round(1/(2·h·cutoff)) */
  decimation?: number;
  /** Decimated rows dropped at each end (filter edges). @default 5 */
  trim?: number;
  /** Significance level of the model comparisons. @default 0.01 */
  alpha?: number;
  /**
   * Fit a constant offset e as well. Without motion in both directions (or rest) the offset and
   * the Coulomb term cannot be told apart, so for a current drive the offset is assumed 0 (the
   * `sensor-offset` detector checks it at rest). @default false
   */
  offset?: boolean;
}

/** Result of `mechanicalRegression`: drive = a·acc + β·speed + c·sgn(speed) + d·speed·|speed| (+ e). */
export interface MechanicalRegression {
  /** Viscous-only model [acc, speed] (+ offset column last when asked). */
  viscous: LinearFit;
  /** Viscous + Coulomb [acc, speed, sgn] (+ offset). */
  coulomb: LinearFit;
  /** Viscous + drag [acc, speed, speed·|speed|] (+ offset). */
  drag: LinearFit;
  /** Viscous + Coulomb + drag [acc, speed, sgn, speed·|speed|] (+ offset). */
  coulombDrag: LinearFit;
  /** Viscous + drag → + Coulomb (the Coulomb question when drag is present). */
  coulombGivenDragComparison: ModelComparison;
  /** Viscous → viscous + Coulomb. */
  coulombComparison: ModelComparison;
  /** Viscous + Coulomb → + speed-squared drag. */
  dragComparison: ModelComparison;
  /** Rows used after decimation and trimming. */
  samples: number;
  /** Speed dead band used for the sign [speed unit]. */
  deadBand: number;
  /** Fraction of rows with the rotor moving (|speed| above the dead band). */
  movingFraction: number;
  /** Whether the speed changes sign within the record. */
  bothDirections: boolean;
  /** Filtered full-rate series (for detectors that need them): drive, speed, acceleration. */
  filtered: { drive: Float64Array; speed: Float64Array; acceleration: Float64Array; decimation: number };
  /**
   * The decimated regression rows: response `drive` and the columns in the order of `coulombDrag`
   * — acceleration, speed, sign, speed·|speed| (+ ones when `offset`).
   */
  rows: { drive: Float64Array; columns: Float64Array[] };
}

/**
 * Equation-error regression of the rotor equation — drive = a·dω/dt + β·ω + c·sgn(ω) +
 * d·ω|ω| (+ e) — on filtered, decimated data, with nested comparisons of the viscous-only, Coulomb
 * and drag models. With the drive in amperes, a = J/Kt, β = b/Kt, c = Tc/Kt, d = cd/Kt. At steady
 * state it reduces to the steady current–speed line i = (b·ω + Tc)/Kt (intercept c, curvature d).
 *
 * ## Method
 * Every column (drive, speed or position, sign) is passed through the same zero-phase Butterworth
 * low-pass (order 4, `zeroPhaseLowPass` from `@motorprint/estimate`), so the linear relation holds
 * between the filtered columns; speed from position and acceleration from speed by central
 * differences. sgn uses a dead band of 4 SD of the filtered speed noise plus 1e-3 of the speed
 * range. The filtered rows are decimated to about the Nyquist rate of the filter (so the residual
 * rows are close to independent) and trimmed at the ends; then OLS (`fitLinearModel`) and
 * `compareNestedModels` (F-test, likelihood ratio, AIC, BIC).
 *
 * ## References
 * M. Gautier (1997), "Dynamic identification of robots with power model", Proc. IEEE ICRA,
 * 1922–1927, doi:10.1109/ROBOT.1997.619069 (inverse-dynamics least squares on filtered data).
 * N. R. Draper, H. Smith (1998), Applied Regression Analysis, 3rd ed., §6.1 (extra sum of squares).
 *
 * @param input - sample interval [s], drive, speed or position, filter settings
 * @returns the three fits, the two comparisons and the filtered series
 * @throws TypeError when the series are missing or of unequal length
 * @throws RangeError when the interval, cutoff or decimation is out of range, or fewer than 20 rows remain
 * @example
 * mechanicalRegression({ sampleInterval: 1e-4, drive: current, speed }).coulombComparison.preferred; // => 'full' with Coulomb friction
 */
export function mechanicalRegression(input: MechanicalRegressionInput): MechanicalRegression {
  return mechanicalRegressionOf(input, false);
}

/**
 * `mechanicalRegression`, skipping the scan for samples that are not finite when `finiteChecked`
 * says the drive and the speed (or position) are channels `checkRecording` has already checked
 * (the scan's regression: the same arrays, read twice otherwise).
 */
export function mechanicalRegressionOf(input: MechanicalRegressionInput, finiteChecked: boolean): MechanicalRegression {
  const fn = 'mechanicalRegression';
  if (input === null || typeof input !== 'object') throw new TypeError(`${fn}: input must be an object`);
  const { drive, speed, position } = input;
  if (!(drive instanceof Float64Array)) throw new TypeError(`${fn}: input.drive must be a Float64Array`);
  const motion = speed ?? position;
  if (!(motion instanceof Float64Array)) throw new TypeError(`${fn}: input.speed or input.position must be a Float64Array`);
  const n = drive.length;
  if (motion.length !== n) throw new TypeError(`${fn}: input.drive has ${n} samples, the speed/position ${motion.length}`);
  const h = input.sampleInterval;
  if (!(h > 0) || !Number.isFinite(h)) throw new RangeError(`${fn}: input.sampleInterval must be > 0 (got ${h})`);
  const fc = input.cutoff ?? 1 / (40 * h);
  if (!(fc > 0 && fc < 0.5 / h)) throw new RangeError(`${fn}: input.cutoff must be in (0, ${0.5 / h}) Hz (got ${fc})`);
  const dec = input.decimation ?? Math.max(1, Math.round(1 / (2 * h * fc)));
  if (!Number.isInteger(dec) || dec < 1) throw new RangeError(`${fn}: input.decimation must be an integer >= 1 (got ${dec})`);
  const trim = input.trim ?? 5;
  if (!Number.isInteger(trim) || trim < 0) throw new RangeError(`${fn}: input.trim must be an integer >= 0 (got ${trim})`);
  for (let k = 0; !finiteChecked && k < n; k++) {
    if (!Number.isFinite(drive[k]!)) throw new RangeError(`${fn}: input.drive[${k}] must be finite (got ${drive[k]})`);
    if (!Number.isFinite(motion[k]!)) throw new RangeError(`${fn}: input.${speed ? 'speed' : 'position'}[${k}] must be finite (got ${motion[k]})`);
  }
  const lp = (x: Float64Array): Float64Array => zeroPhaseLowPass(x, h, fc);
  const y = lp(drive);
  // The filtered speed itself (a fresh array of length n), or the differenced filtered position.
  const w = speed ? lp(speed) : new Float64Array(n);
  let rawSigma: number;
  if (speed) {
    rawSigma = noiseLevel(speed).sigma;
  } else {
    const q = lp(position!);
    for (let k = 1; k + 1 < n; k++) w[k] = (q[k + 1]! - q[k - 1]!) / (2 * h);
    w[0] = w[1]!;
    w[n - 1] = w[n - 2]!;
    // Position noise σq becomes speed noise ≈ σq/h (difference of two samples, divided by 2h).
    rawSigma = noiseLevel(position!).sigma / h;
  }
  // The central differences and the speed's range in one pass (the range still read in order of k).
  const scan = speedScan(w, 2 * h);
  const { acc, wmin, wmax } = scan;
  acc[0] = acc[1]!;
  acc[n - 1] = acc[n - 2]!;
  // Filtered white noise keeps the fraction ≈ √(2·fc·h·(π/4)) of its SD (4th-order response, squared by the two passes);
  // √(2·fc·h) is used as a slightly generous bound.
  const deadBand = 4 * rawSigma * Math.sqrt(Math.min(1, 2 * fc * h)) + 1e-3 * (wmax - wmin);
  const rows: number[] = [];
  for (let k = 0; k < n; k += dec) rows.push(k);
  const used = rows.slice(trim, rows.length - trim);
  const m = used.length;
  if (m < 20) throw new RangeError(`${fn}: only ${m} rows remain after decimation by ${dec} and trimming (need >= 20)`);
  // The sign (a view of the scan kernel's memory: read here and by the low-pass, before any other scan).
  const sgnRaw = scan.sign(deadBand);
  let moving = 0, pos = 0, neg = 0;
  for (const k of used) {
    if (sgnRaw[k]! !== 0) moving++;
    if (sgnRaw[k]! > 0) pos++;
    if (sgnRaw[k]! < 0) neg++;
  }
  const sgn = lp(sgnRaw);
  // The decimated rows (plain loops: a typed array's from() with a map function is slow).
  const cAcc = new Float64Array(m), cW = new Float64Array(m), cS = new Float64Array(m), cY = new Float64Array(m), cD = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    const k = used[j]!;
    const v = w[k]!;
    cAcc[j] = acc[k]!; cW[j] = v; cS[j] = sgn[k]!; cY[j] = y[k]!; cD[j] = v * Math.abs(v);
  }
  const extra = input.offset === true ? [new Float64Array(m).fill(1)] : [];
  const q = extra.length;
  const viscous = fitLinearModel([cAcc, cW, ...extra], cY);
  const coulomb = fitLinearModel([cAcc, cW, cS, ...extra], cY);
  const drag = fitLinearModel([cAcc, cW, cD, ...extra], cY);
  const coulombDrag = fitLinearModel([cAcc, cW, cS, cD, ...extra], cY);
  const alpha = input.alpha ?? 0.01;
  return {
    viscous,
    coulomb,
    drag,
    coulombDrag,
    coulombGivenDragComparison: compareNestedModels('viscous + drag vs + Coulomb friction',
      { name: 'viscous + drag', ssr: drag.ssr, parameters: 3 + q }, { name: 'viscous + Coulomb + drag', ssr: coulombDrag.ssr, parameters: 4 + q }, m, alpha),
    coulombComparison: compareNestedModels('viscous friction vs viscous + Coulomb friction',
      { name: 'viscous', ssr: viscous.ssr, parameters: 2 + q }, { name: 'viscous + Coulomb', ssr: coulomb.ssr, parameters: 3 + q }, m, alpha),
    dragComparison: compareNestedModels('viscous + Coulomb vs + speed-squared drag',
      { name: 'viscous + Coulomb', ssr: coulomb.ssr, parameters: 3 + q }, { name: 'viscous + Coulomb + drag', ssr: coulombDrag.ssr, parameters: 4 + q }, m, alpha),
    samples: m,
    deadBand,
    movingFraction: moving / m,
    bothDirections: pos > 0 && neg > 0,
    filtered: { drive: y, speed: w, acceleration: acc, decimation: dec },
    rows: { drive: cY, columns: [cAcc, cW, cS, cD, ...extra] },
  };
}
