import type { MotorParams } from './types.js';

/** The constants a steady-state relation reads; `Tc` is the Coulomb friction torque [N·m], 0 when absent. */
export type SteadyConstants = Pick<MotorParams, 'R' | 'Kt' | 'Ke' | 'b'> & { Tc?: number };

const coulomb = (c: SteadyConstants): number => c.Tc ?? 0;

/** R·b + Kt·Ke: the denominator of the steady state (viscous plus back-EMF damping, times R). */
const damping = (c: SteadyConstants): number => c.R * c.b + c.Kt * c.Ke;

/** No-load steady speed with viscous and Coulomb friction [rad/s]: (Kt·V − R·Tc)/(R·b + Kt·Ke). */
function noLoadSpeed(c: SteadyConstants, V: number): number {
  return (c.Kt * V - c.R * coulomb(c)) / damping(c);
}

/** Current at steady speed ω [A]: (V − Ke·ω)/R. */
function currentAtSpeed(c: SteadyConstants, V: number, w: number): number {
  return (V - c.Ke * w) / c.R;
}

/** Efficiency T·ω/(V·i) at steady speed ω [1], T = Kt·i − b·ω − Tc the shaft torque. */
function efficiencyAtSpeed(c: SteadyConstants, V: number, w: number): number {
  const i = currentAtSpeed(c, V, w);
  const T = c.Kt * i - c.b * w - coulomb(c);
  return (T * w) / (V * i);
}

/**
 * Speed of peak efficiency [rad/s]: the smaller root of k·Ke·ω² − 2·k·V·ω + a·V = 0 with
 * a = Kt·V/R − Tc and k = Kt·Ke/R + b, written with 1 − Ke·a/(k·V) = (b·V + Ke·Tc)/(k·V) to avoid
 * cancellation. NaN when friction reaches the stall torque (a ≤ 0) or V ≤ 0.
 */
function peakEfficiencySpeed(c: SteadyConstants, V: number): number {
  const a = (c.Kt * V) / c.R - coulomb(c);
  const k = (c.Kt * c.Ke) / c.R + c.b;
  if (!(a > 0) || !(V > 0)) return NaN;
  const r = (c.b * V + c.Ke * coulomb(c)) / (k * V);
  return (V / c.Ke) * (1 - Math.sqrt(r));
}

/**
 * The relations of the lumped motor that give its datasheet figures, one function each, stated
 * once: `motorFigures` and the report's derived figures and operating curve evaluate these.
 * Plain formulas: they validate nothing and never throw (a figure that does not exist for the
 * constants, such as the maximum power when friction reaches the stall torque, is NaN).
 * Friction (b and Tc) is included wherever it changes the figure; `Tc` defaults to 0.
 *
 * ## Method
 * Steady state of V = R·i + Ke·ω and Kt·i = T + b·ω + Tc: the shaft torque falls on the line
 * T(ω) = a − k·ω with a = Kt·V/R − Tc and k = Kt·Ke/R + b, so the output power T·ω peaks at
 * a²/(4·k); the efficiency T·ω/(V·i) peaks at the smaller root of k·Ke·ω² − 2·k·V·ω + a·V = 0.
 *
 * @example
 * motorRelations.noLoadSpeed({ R: 2, Kt: 0.05, Ke: 0.05, b: 1e-5, Tc: 2e-3 }, 12); // ≈ 236.5079 rad/s
 */
export const motorRelations = Object.freeze({
  /** Electrical time constant L/R [s]. */
  electricalTimeConstant: (c: Pick<MotorParams, 'R' | 'L'>): number => c.L / c.R,
  /** Mechanical time constant J·R/(Kt·Ke) [s]. */
  mechanicalTimeConstant: (c: Pick<MotorParams, 'R' | 'Kt' | 'Ke' | 'J'>): number => (c.J * c.R) / (c.Kt * c.Ke),
  /** Mechanical time constant with viscous friction J·R/(R·b + Kt·Ke) [s]. */
  mechanicalTimeConstantViscous: (c: Pick<MotorParams, 'R' | 'Kt' | 'Ke' | 'J' | 'b'>): number => (c.J * c.R) / damping(c),
  noLoadSpeed,
  /** No-load current (b·ω0 + Tc)/Kt [A], ω0 the no-load speed. */
  noLoadCurrent: (c: SteadyConstants, V: number): number => (c.b * noLoadSpeed(c, V) + coulomb(c)) / c.Kt,
  /** Ideal no-load speed V/Ke [rad/s] (friction left out). */
  idealNoLoadSpeed: (c: Pick<MotorParams, 'Ke'>, V: number): number => V / c.Ke,
  /** Stall torque Kt·V/R [N·m]. */
  stallTorque: (c: Pick<MotorParams, 'R' | 'Kt'>, V: number): number => (c.Kt * V) / c.R,
  /** Stall current V/R [A]. */
  stallCurrent: (c: Pick<MotorParams, 'R'>, V: number): number => V / c.R,
  /** Motor constant Km = Kt/√R [N·m/√W]. */
  motorConstant: (c: Pick<MotorParams, 'R' | 'Kt'>): number => c.Kt / Math.sqrt(c.R),
  /** Speed drop per load torque R/(R·b + Kt·Ke) [rad/s/(N·m)]. */
  speedDropPerLoadTorque: (c: SteadyConstants): number => c.R / damping(c),
  /** Maximum output power a²/(4·k) [W]; NaN when a ≤ 0 (friction at or above the stall torque). */
  maxOutputPower: (c: SteadyConstants, V: number): number => {
    const a = (c.Kt * V) / c.R - coulomb(c);
    const k = (c.Kt * c.Ke) / c.R + c.b;
    return a > 0 ? (a * a) / (4 * k) : NaN;
  },
  currentAtSpeed,
  /** Shaft torque at steady speed ω [N·m]: Kt·i − b·ω − Tc with i the current at ω. */
  torqueAtSpeed: (c: SteadyConstants, V: number, w: number): number => c.Kt * currentAtSpeed(c, V, w) - c.b * w - coulomb(c),
  efficiencyAtSpeed,
  peakEfficiencySpeed,
  /** Peak efficiency [1]: the efficiency at the speed of peak efficiency. */
  peakEfficiency: (c: SteadyConstants, V: number): number => efficiencyAtSpeed(c, V, peakEfficiencySpeed(c, V)),
  /** Load torque at peak efficiency a − k·ω* [N·m]. */
  peakEfficiencyTorque: (c: SteadyConstants, V: number): number => {
    const w = peakEfficiencySpeed(c, V);
    return (c.Kt * V) / c.R - coulomb(c) - ((c.Kt * c.Ke) / c.R + c.b) * w;
  },
  /** Current at peak efficiency (V − Ke·ω*)/R [A]. */
  peakEfficiencyCurrent: (c: SteadyConstants, V: number): number => currentAtSpeed(c, V, peakEfficiencySpeed(c, V)),
});
