import { checkMotorParams } from './checkMotorParams.js';
import { checkSeries } from './checkSeries.js';
import { dpStep, rhs, NV, I, W, TH, TEMP, EIN, ECU, EFR, ELD, ESRC, EMIS } from './detailedKernel.js';
import type { DetailedContext } from './detailedKernel.js';
import type { DetailedOptions, DetailedParams, DetailedTrace, TimeBase } from './types.js';

/**
 * Simulates the detailed (nonlinear) motor model for a sampled commanded voltage held between
 * samples, with an adaptive embedded Runge–Kutta integrator that locates friction events, and
 * returns the state at the sample times plus energy totals.
 *
 * ## Equations (each term off when its parameter is absent)
 * - Armature: L·di/dt = v_t − R(T)·i − Ke·ω, v_t = clip(v, ±Vmax) − Rs·i. Current limit: while
 *   i ≥ Imax with di/dt > 0 (or i ≤ −Imax with di/dt < 0) the drive sets di/dt = 0 by lowering v_t
 *   to R(T)·i + Ke·ω (ideal current regulator).
 * - Rotor: (J + J_load)·dω/dt = Kt·i − b·ω − Tc·sgn(ω) − cd·ω|ω| − τ_load − b_load·ω.
 * - Stick–slip (when Tc or Ts > 0): at rest the rotor stays while |Kt·i − τ_load| ≤ Ts
 *   (Ts defaults to Tc); when that torque exceeds Ts it breaks away in its direction. When ω
 *   crosses zero while sliding, the crossing is located; the rotor sticks if |Kt·i − τ_load| ≤ Ts,
 *   else it reverses.
 * - Thermal (Rth, Cth set): R(T) = R·(k + T)/(k + T_ref), Cth·dT/dt = i²·R(T) − (T − T_amb)/Rth.
 * - Open circuit from `options.openCircuitFrom`: i = 0, the terminals show v_t = Ke·ω (the
 *   magnetic energy ½·L·i² present at the opening is dumped and not counted in the totals).
 *
 * ## Method
 * Dormand–Prince 5(4) with error control on i, ω and T (relative tolerance `relativeTolerance`,
 * absolute floors scaled by V/R, V/Ke and 1 K), restarted at every sample because the held
 * voltage jumps there. Events (ω = 0 while sliding; |Kt·i − τ_load| = Ts while stuck) are
 * bracketed after each accepted step and located by the Illinois variant of regula falsi on the
 * step length, re-integrating a single step each time, so the friction sign never chatters.
 * Energy integrals are integrated as extra components of the same system.
 *
 * ## References
 * J. R. Dormand, P. J. Prince, "A family of embedded Runge–Kutta formulae", J. Comput. Appl. Math.
 * 6(1):19–26, 1980, doi:10.1016/0771-050X(80)90013-3.
 * M. Dowell, P. Jarratt, "A modified regula falsi method for computing the root of an equation",
 * BIT 11:168–174, 1971, doi:10.1007/BF01934364.
 *
 * @param params - motor constants and effect terms
 * @param voltage - commanded voltage per sample [V], held on [t_k, t_{k+1})
 * @param time - sample interval [s] or sample times [s]
 * @param options - initial state, tolerance, step budget, open-circuit time
 * @returns per-sample current, speed, position, terminal voltage, temperature, shaft torque,
 *   energy totals and integrator statistics
 * @throws TypeError / RangeError for bad input; RangeError when a sample interval is too large
 *   for the explicit integrator (the stiffest mode would need more than maxStepsPerInterval steps)
 * @example
 * const r = simulateDetailed({ ...motor, Tc: 2e-3, Ts: 3e-3 }, new Float64Array(1000).fill(12), 1e-4);
 * r.energy.balance; // ≈ 0 (J)
 */
export function simulateDetailed(
  params: DetailedParams,
  voltage: Float64Array,
  time: TimeBase,
  options: DetailedOptions = {},
): DetailedTrace {
  const fn = 'simulateDetailed';
  checkMotorParams(fn, params);
  checkSeries(fn, 'voltage', voltage, time);
  if (options === null || typeof options !== 'object') throw new TypeError(`${fn}: options must be an object (got ${String(options)})`);
  const opt = (key: keyof DetailedOptions, def: number): number => {
    const v = options[key];
    if (v === undefined) return def;
    if (typeof v !== 'number') throw new TypeError(`${fn}: options.${key} must be a number (got ${String(v)})`);
    if (Number.isNaN(v) || (key !== 'openCircuitFrom' && !Number.isFinite(v))) {
      throw new RangeError(`${fn}: options.${key} must be finite (got ${v})`);
    }
    return v;
  };
  const rtol = opt('relativeTolerance', 1e-9);
  if (!(rtol >= 1e-14 && rtol <= 1e-2)) throw new RangeError(`${fn}: options.relativeTolerance must be in [1e-14, 1e-2] (got ${rtol})`);
  const maxSteps = opt('maxStepsPerInterval', 200000);
  if (!(maxSteps >= 1)) throw new RangeError(`${fn}: options.maxStepsPerInterval must be >= 1 (got ${maxSteps})`);
  const openFrom = opt('openCircuitFrom', Infinity);

  const n = voltage.length;
  const tAt = (k: number): number => (typeof time === 'number' ? k * time : time[k]! - time[0]!);
  const t0 = typeof time === 'number' ? 0 : time[0]!;
  const Tc = params.Tc ?? 0;
  const thermal = params.Rth !== undefined && params.Cth !== undefined;
  const Tref = params.referenceTemperature ?? 20;
  const Tamb = params.ambientTemperature ?? Tref;
  const c: DetailedContext = {
    R: params.R, L: params.L, Kt: params.Kt, Ke: params.Ke, Jtot: params.J + (params.loadInertia ?? 0), b: params.b,
    Tc, Ts: params.Ts ?? Tc, cd: params.cd ?? 0, Vmax: params.Vmax ?? Infinity, Imax: params.Imax ?? Infinity,
    Rs: params.Rs ?? 0, thermal, k: params.copperConstant ?? 234.5, Tref, Tamb,
    Rth: params.Rth ?? Infinity, Cth: params.Cth ?? 1,
    loadTorque: params.loadTorque ?? 0, loadDamping: params.loadDamping ?? 0,
    v: 0, open: false, stuck: false, dir: 1, vt: 0,
    k1: new Float64Array(NV), k2: new Float64Array(NV), k3: new Float64Array(NV), k4: new Float64Array(NV),
    k5: new Float64Array(NV), k6: new Float64Array(NV), k7: new Float64Array(NV), tmp: new Float64Array(NV),
  };
  const stickSlip = c.Tc > 0 || c.Ts > 0;

  // Too-large interval check: explicit RK stability needs h·ρ ≲ 3.3 for the stiffest mode.
  const rho = Math.max((params.R + c.Rs) / params.L + params.Ke / params.L, params.Kt / c.Jtot + (params.b + c.loadDamping) / c.Jtot);
  for (let k = 1; k < n; k++) {
    const dt = tAt(k) - tAt(k - 1);
    const need = (dt * rho) / 3.3;
    if (need > maxSteps) {
      throw new RangeError(
        `${fn}: sample interval ${dt} s before sample ${k} is too large for the adaptive integrator: the stiffest mode ` +
          `(time constant ${(1 / rho).toPrecision(3)} s) needs about ${Math.ceil(need)} internal steps > options.maxStepsPerInterval ${maxSteps}; ` +
          'resample at a finer interval or raise maxStepsPerInterval',
      );
    }
    if (typeof time === 'number') break;
  }

  let vmax = 1;
  for (let k = 0; k < n; k++) vmax = Math.max(vmax, Math.abs(voltage[k]!));
  const sc = new Float64Array(NV);
  sc[I] = (rtol * vmax) / params.R;
  sc[W] = (rtol * vmax) / params.Ke;
  sc[TEMP] = rtol;

  const y = new Float64Array(NV);
  const y1 = new Float64Array(NV);
  const yb = new Float64Array(NV);
  y[I] = options.initialCurrent ?? 0;
  y[W] = options.initialSpeed ?? 0;
  y[TH] = options.initialPosition ?? 0;
  y[TEMP] = params.initialTemperature ?? Tamb;
  for (const [key, v] of [['initialCurrent', y[I]], ['initialSpeed', y[W]], ['initialPosition', y[TH]]] as const) {
    if (!Number.isFinite(v!)) throw new RangeError(`${fn}: options.${key} must be finite (got ${v})`);
  }
  const iStart = y[I]!;
  const wStart = y[W]!;
  const tauDrive = (): number => (c.open ? 0 : c.Kt * y[I]!) - c.loadTorque;
  if (stickSlip && y[W] === 0) {
    const td = tauDrive();
    if (Math.abs(td) <= c.Ts) c.stuck = true;
    else c.dir = td > 0 ? 1 : -1;
  } else if (y[W]! < 0) c.dir = -1;

  const current = new Float64Array(n), speed = new Float64Array(n), position = new Float64Array(n);
  const terminalVoltage = new Float64Array(n), temperature = new Float64Array(n), shaftTorque = new Float64Array(n);
  const stats = { steps: 0, rejected: 0, stickEvents: 0, breakawayEvents: 0, reversals: 0 };
  let h = Math.min(typeof time === 'number' ? time : Infinity, params.L / (params.R + c.Rs), c.Jtot * params.R / (params.Kt * params.Ke)) * 0.1;
  const record = (k: number): void => {
    rhs(c, y, c.k1);
    current[k] = c.open ? 0 : y[I]!;
    speed[k] = c.stuck ? 0 : y[W]!;
    position[k] = y[TH]!;
    terminalVoltage[k] = c.vt;
    temperature[k] = y[TEMP]!;
    shaftTorque[k] = c.loadTorque + c.loadDamping * speed[k]! + (params.loadInertia ?? 0) * c.k1[W]!;
  };
  // Event function: sliding → ω·dir (crosses to < 0); stuck → |τ_drive| − Ts (crosses to > 0).
  const eventValue = (yy: Float64Array): number => {
    if (c.stuck) {
      const td = (c.open ? 0 : c.Kt * yy[I]!) - c.loadTorque;
      return Math.abs(td) - c.Ts;
    }
    return yy[W]! * c.dir;
  };
  let eMag = 0;
  for (let k = 0; k < n; k++) {
    const tk = tAt(k);
    if (!c.open && t0 + tk >= openFrom) {
      c.open = true;
      y[I] = 0;
    }
    c.v = voltage[k]!;
    record(k);
    if (k === n - 1) break;
    const tEnd = tAt(k + 1);
    let t = tk;
    let steps = 0;
    while (t < tEnd) {
      if (++steps > maxSteps) {
        throw new RangeError(`${fn}: more than options.maxStepsPerInterval ${maxSteps} internal steps between samples ${k} and ${k + 1}; the record is too stiff for this sample interval`);
      }
      const last = h >= tEnd - t;
      const hs = last ? tEnd - t : h;
      rhs(c, y, c.k1);
      const err = dpStep(c, y, hs, y1, sc, rtol);
      if (!(err <= 1)) {
        stats.rejected++;
        if (!Number.isFinite(err)) { h = hs * 0.1; } else h = hs * Math.max(0.1, 0.9 * err ** -0.2);
        if (h < 1e-15 * Math.max(1, Math.abs(tEnd))) {
          throw new RangeError(`${fn}: step size underflow at t = ${t0 + t} s (the model state became non-finite or too stiff)`);
        }
        continue;
      }
      let hUsed = hs;
      let reached = last;
      if (stickSlip) {
        const g0 = eventValue(y);
        const g1 = eventValue(y1);
        const crossed = c.stuck ? g1 > 0 : g1 < 0 && g0 >= 0;
        if (crossed) {
          // Illinois regula falsi on the step length; yb/y1 hold the state on the far side.
          let a = 0, fa = g0, bb = hs, fb = g1, side = 0;
          for (let it = 0; it < 80 && bb - a > 1e-14 * hs; it++) {
            let m = (a * fb - bb * fa) / (fb - fa);
            if (!(m > a && m < bb)) m = 0.5 * (a + bb);
            rhs(c, y, c.k1);
            dpStep(c, y, m, yb, sc, rtol);
            const fm = eventValue(yb);
            const crossedM = c.stuck ? fm > 0 : fm < 0;
            if (crossedM) {
              bb = m; fb = fm; y1.set(yb);
              if (side === -1) fa *= 0.5;
              side = -1;
            } else {
              a = m; fa = fm;
              if (side === 1) fb *= 0.5;
              side = 1;
            }
          }
          hUsed = bb;
          reached = last && bb === hs;
          if (c.stuck) {
            c.stuck = false;
            const td = (c.open ? 0 : c.Kt * y1[I]!) - c.loadTorque;
            c.dir = td > 0 ? 1 : -1;
            stats.breakawayEvents++;
          } else {
            y1[W] = 0;
            const td = (c.open ? 0 : c.Kt * y1[I]!) - c.loadTorque;
            if (Math.abs(td) <= c.Ts) {
              c.stuck = true;
              stats.stickEvents++;
            } else {
              c.dir = td > 0 ? 1 : -1;
              stats.reversals++;
            }
          }
        }
      }
      const iOld = y[I]!, iNew = y1[I]!;
      eMag += 0.5 * params.L * (iNew * iNew - iOld * iOld);
      y.set(y1);
      t = reached ? tEnd : t + hUsed;
      stats.steps++;
      if (!last || hUsed < hs) h = hs * Math.min(5, 0.9 * Math.max(err, 1e-10) ** -0.2);
    }
  }
  const Jt = c.Jtot;
  const wEnd = c.stuck ? 0 : y[W]!;
  const energy = {
    electricalInput: y[EIN]!,
    copperLoss: y[ECU]!,
    sourceLoss: y[ESRC]!,
    magneticEnergyChange: eMag,
    frictionLoss: y[EFR]!,
    loadWork: y[ELD]!,
    kineticEnergyChange: 0.5 * Jt * (wEnd * wEnd - wStart * wStart),
    conversionMismatch: y[EMIS]!,
    balance: 0,
  };
  void iStart;
  energy.balance =
    energy.electricalInput - energy.copperLoss - energy.magneticEnergyChange - energy.frictionLoss -
    energy.loadWork - energy.kineticEnergyChange - energy.conversionMismatch;
  return { current, speed, position, terminalVoltage, temperature, shaftTorque, energy, stats };
}
