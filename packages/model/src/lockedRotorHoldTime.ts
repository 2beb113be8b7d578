import type { LockedRotorHoldOptions, LockedRotorHold } from './types.js';

/**
 * Conservative default thermal capacitance of a winding [J/K]: 1 J/K, the heat capacity of
 * about 2.6 g of copper at a specific heat of 385 J/(kg·K) (copper's specific heat from memory).
 * Small, so that the budget it gives is short; not a property of any motor.
 */
export const DEFAULT_WINDING_CAPACITANCE = 1;

/**
 * Longest locked-rotor hold before the winding warms by ΔT, in closed form, from the copper law
 * and a first-order thermal model; the current is taken as held constant (a current-limited
 * drive: the loss then grows with the resistance, the safe side).
 *
 * ## Method
 * Copper law R(T) = R_ref·(k + T)/(k + T_ref), i.e. R(T) = R20·(1 + α·(T − 20)) with
 * α = 1/(k + 20) = 0.00393 /K for k = 234.5 °C. With θ = T − T_start, P0 = I²·R(T_start) and
 * α' = 1/(k + T_start): Cth·dθ/dt = P0·(1 + α'·θ) − θ/Rth. With g = 1/Rth − P0·α' (net
 * conductance) and x = g·ΔT/P0 < 1, the winding reaches ΔT after
 * t = (Cth·ΔT/P0)·(−ln(1 − x)/x); never when x ≥ 1 (it settles below ΔT). Without Rth the winding
 * is taken as not cooled at all (adiabatic, g = −P0·α'); without Cth, {@link
 * DEFAULT_WINDING_CAPACITANCE}. Both defaults shorten the budget, and say so in `note`.
 *
 * ## References
 * FACTS.md §3: the copper law constant k = 234.5 °C (IEEE Std 113 form) or 235 °C (IEC 60034-1
 * form), both "from memory, unverified" there. First-order thermal model: common practice, no source.
 *
 * This is arithmetic, not a rating: the motor maker's stall rating and local codes decide.
 *
 * @param options - R, the held current, the allowed rise and the thermal data
 * @returns the hold time and the data it used
 * @throws RangeError for non-finite or out-of-domain numbers (the message names the option)
 * @example
 * lockedRotorHoldTime({ R: 1.9, current: 3.16, riseK: 20 }).holdSeconds; // ≈ 1.0 s (adiabatic, Cth 1 J/K)
 */
export function lockedRotorHoldTime(options: LockedRotorHoldOptions): LockedRotorHold {
  const fn = 'lockedRotorHoldTime';
  if (options === null || typeof options !== 'object') throw new TypeError(`${fn}: options must be an object (got ${String(options)})`);
  const num = (key: keyof LockedRotorHoldOptions, v: unknown, test: (x: number) => boolean, rule: string): number => {
    if (typeof v !== 'number' || !Number.isFinite(v) || !test(v)) throw new RangeError(`${fn}: options.${key} must be ${rule} (got ${String(v)})`);
    return v;
  };
  const R = num('R', options.R, (x) => x > 0, 'a finite number > 0');
  const I = Math.abs(num('current', options.current, () => true, 'a finite number'));
  const rise = num('riseK', options.riseK ?? 20, (x) => x > 0, 'a finite number > 0');
  const k = options.copperConstant ?? 234.5;
  if (k !== 234.5 && k !== 235) throw new RangeError(`${fn}: options.copperConstant must be 234.5 or 235 (got ${String(k)})`);
  const tRef = num('resistanceTemperature', options.resistanceTemperature ?? 20, (x) => x > -k, `finite and above −${k} °C`);
  const tStart = num('startTemperature', options.startTemperature ?? tRef, (x) => x > -k, `finite and above −${k} °C`);
  const Rth = options.Rth === undefined ? Infinity : num('Rth', options.Rth, (x) => x > 0, 'a finite number > 0');
  const Cth = options.Cth === undefined ? DEFAULT_WINDING_CAPACITANCE : num('Cth', options.Cth, (x) => x > 0, 'a finite number > 0');
  const thermalData = options.Rth !== undefined && options.Cth !== undefined ? 'given' : 'default';
  const gaps: string[] = [];
  if (options.Rth === undefined) gaps.push('no cooling (adiabatic)');
  if (options.Cth === undefined) gaps.push(`Cth ${DEFAULT_WINDING_CAPACITANCE} J/K (about 2.6 g of copper)`);
  const note = thermalData === 'given'
    ? `thermal data given: Rth ${Rth} K/W, Cth ${Cth} J/K`
    : `conservative default thermal data: ${gaps.join(', ')}${options.Rth !== undefined ? `, Rth ${Rth} K/W` : ''}${options.Cth !== undefined ? `, Cth ${Cth} J/K` : ''}`;
  const P0 = I * I * R * (k + tStart) / (k + tRef);
  let hold: number;
  if (!(P0 > 0)) hold = Infinity;
  else {
    const g = 1 / Rth - P0 / (k + tStart);
    const x = (g * rise) / P0;
    if (x >= 1) hold = Infinity;
    else hold = ((Cth * rise) / P0) * (Math.abs(x) < 1e-12 ? 1 : -Math.log1p(-x) / x);
  }
  return { holdSeconds: hold, riseK: rise, powerAtStart: P0, Rth, Cth, thermalData, note };
}
