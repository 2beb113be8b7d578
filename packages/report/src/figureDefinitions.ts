/**
 * Internal: the derived datasheet figures, each with its formula (docs/derived-figures.md gives the
 * same list in words). Relations as in FACTS.md §4; unit factors as in FACTS.md §2.
 */
import type { ConstantName, ConstantValues } from './types.js';

/** rad/s → r/min: 60/(2π) (FACTS.md §2). */
export const RPM_PER_RAD_S = 60 / (2 * Math.PI);
/** ozf·in → N·m, exact: 0.0254 × 0.45359237 × 9.80665 / 16 (FACTS.md §2). */
export const NEWTON_METRE_PER_OZF_IN = 0.00706155181422604375;

/** One derived figure: how to compute it and what it needs. */
export interface FigureDefinition {
  key: string;
  label: string;
  unit: string;
  formula: string;
  uses: ConstantName[];
  needsVoltage: boolean;
  evaluate: (c: ConstantValues, V: number) => number;
}

/** Steady-state no-load speed with viscous and Coulomb friction [rad/s]. */
function noLoadSpeed(c: ConstantValues, V: number): number {
  return (c.Kt * V - c.R * c.Tc) / (c.R * c.b + c.Kt * c.Ke);
}

/**
 * Speed of peak efficiency [rad/s]: the smaller root of c·Ke·ω² − 2·c·V·ω + a·V = 0 with
 * a = Kt·V/R − Tc and c = Kt·Ke/R + b, written with 1 − Ke·a/(c·V) = (b·V + Ke·Tc)/(c·V) to avoid
 * cancellation. NaN when friction exceeds the stall torque.
 */
function peakEfficiencySpeed(c: ConstantValues, V: number): number {
  const a = (c.Kt * V) / c.R - c.Tc;
  const cc = (c.Kt * c.Ke) / c.R + c.b;
  if (!(a > 0) || !(V > 0)) return NaN;
  const r = (c.b * V + c.Ke * c.Tc) / (cc * V);
  return (V / c.Ke) * (1 - Math.sqrt(r));
}

function efficiencyAt(c: ConstantValues, V: number, w: number): number {
  const i = (V - c.Ke * w) / c.R;
  const T = c.Kt * i - c.b * w - c.Tc;
  return (T * w) / (V * i);
}

const M = ['R', 'Kt', 'Ke', 'b', 'Tc'] as ConstantName[];

/**
 * Figure keys renamed since they were first written, old → new. Readers of older parameter sets
 * and specs map them (the parameter-set reader silently, the lot spec with a hint).
 */
export const RENAMED_FIGURE_KEYS: Readonly<Record<string, string>> = {
  speedTorqueGradient: 'speedDropPerLoadTorque',
  speedTorqueGradientRpm: 'speedDropPerLoadTorqueRpm',
};

/** The figures in report order. */
export const FIGURES: readonly FigureDefinition[] = [
  { key: 'electricalTimeConstant', label: 'electrical time constant τe', unit: 's', formula: 'L/R', uses: ['L', 'R'], needsVoltage: false,
    evaluate: (c) => c.L / c.R },
  { key: 'mechanicalTimeConstant', label: 'mechanical time constant τm', unit: 's', formula: 'J·R/(Kt·Ke)', uses: ['J', 'R', 'Kt', 'Ke'], needsVoltage: false,
    evaluate: (c) => (c.J * c.R) / (c.Kt * c.Ke) },
  { key: 'mechanicalTimeConstantViscous', label: 'mechanical time constant with viscous friction τm′', unit: 's', formula: 'J·R/(R·b + Kt·Ke)',
    uses: ['J', 'R', 'Kt', 'Ke', 'b'], needsVoltage: false, evaluate: (c) => (c.J * c.R) / (c.R * c.b + c.Kt * c.Ke) },
  { key: 'noLoadSpeed', label: 'no-load speed ω0', unit: 'rad/s', formula: '(Kt·V − R·Tc)/(R·b + Kt·Ke)', uses: M, needsVoltage: true,
    evaluate: noLoadSpeed },
  { key: 'noLoadSpeedRpm', label: 'no-load speed ω0', unit: 'r/min', formula: '(Kt·V − R·Tc)/(R·b + Kt·Ke) · 60/(2π)', uses: M, needsVoltage: true,
    evaluate: (c, V) => noLoadSpeed(c, V) * RPM_PER_RAD_S },
  { key: 'noLoadCurrent', label: 'no-load current i0', unit: 'A', formula: '(b·ω0 + Tc)/Kt', uses: M, needsVoltage: true,
    evaluate: (c, V) => (c.b * noLoadSpeed(c, V) + c.Tc) / c.Kt },
  { key: 'idealNoLoadSpeed', label: 'ideal no-load speed (friction left out)', unit: 'rad/s', formula: 'V/Ke', uses: ['Ke'], needsVoltage: true,
    evaluate: (c, V) => V / c.Ke },
  { key: 'stallTorque', label: 'stall torque', unit: 'N·m', formula: 'Kt·V/R', uses: ['Kt', 'R'], needsVoltage: true,
    evaluate: (c, V) => (c.Kt * V) / c.R },
  { key: 'stallCurrent', label: 'stall current', unit: 'A', formula: 'V/R', uses: ['R'], needsVoltage: true, evaluate: (c, V) => V / c.R },
  { key: 'torqueConstant', label: 'torque constant Kt', unit: 'N·m/A', formula: 'Kt', uses: ['Kt'], needsVoltage: false, evaluate: (c) => c.Kt },
  { key: 'torqueConstantMilli', label: 'torque constant Kt', unit: 'mN·m/A', formula: '1000·Kt', uses: ['Kt'], needsVoltage: false,
    evaluate: (c) => 1000 * c.Kt },
  { key: 'torqueConstantOzfIn', label: 'torque constant Kt', unit: 'ozf·in/A', formula: 'Kt/0.00706155181422604375', uses: ['Kt'], needsVoltage: false,
    evaluate: (c) => c.Kt / NEWTON_METRE_PER_OZF_IN },
  { key: 'backEmfConstantPerKrpm', label: 'back-EMF constant Ke', unit: 'V/krpm', formula: 'Ke·1000·2π/60', uses: ['Ke'], needsVoltage: false,
    evaluate: (c) => (c.Ke * 1000) / RPM_PER_RAD_S },
  { key: 'speedConstant', label: 'speed constant Kv', unit: 'r/min/V', formula: '60/(2π·Ke)', uses: ['Ke'], needsVoltage: false,
    evaluate: (c) => RPM_PER_RAD_S / c.Ke },
  { key: 'motorConstant', label: 'motor constant Km', unit: 'N·m/√W', formula: 'Kt/√R', uses: ['Kt', 'R'], needsVoltage: false,
    evaluate: (c) => c.Kt / Math.sqrt(c.R) },
  { key: 'speedDropPerLoadTorque', label: 'speed drop per load torque', unit: 'rad/s/(N·m)', formula: 'R/(R·b + Kt·Ke)',
    uses: ['R', 'Kt', 'Ke', 'b'], needsVoltage: false, evaluate: (c) => c.R / (c.R * c.b + c.Kt * c.Ke) },
  { key: 'speedDropPerLoadTorqueRpm', label: 'speed drop per load torque', unit: 'r/min/(mN·m)',
    formula: 'R/(R·b + Kt·Ke) · 60/(2π) / 1000', uses: ['R', 'Kt', 'Ke', 'b'], needsVoltage: false,
    evaluate: (c) => ((c.R / (c.R * c.b + c.Kt * c.Ke)) * RPM_PER_RAD_S) / 1000 },
  { key: 'maxOutputPower', label: 'maximum output power', unit: 'W', formula: 'a²/(4·c), a = Kt·V/R − Tc, c = Kt·Ke/R + b', uses: M, needsVoltage: true,
    evaluate: (c, V) => {
      const a = (c.Kt * V) / c.R - c.Tc;
      const cc = (c.Kt * c.Ke) / c.R + c.b;
      return a > 0 ? (a * a) / (4 * cc) : NaN;
    } },
  { key: 'peakEfficiency', label: 'peak efficiency', unit: '%', formula: '100·T·ω/(V·i) at ω*', uses: M, needsVoltage: true,
    evaluate: (c, V) => 100 * efficiencyAt(c, V, peakEfficiencySpeed(c, V)) },
  { key: 'peakEfficiencySpeed', label: 'speed at peak efficiency ω*', unit: 'rad/s', formula: '(V/Ke)·(1 − √((b·V + Ke·Tc)/(c·V)))', uses: M,
    needsVoltage: true, evaluate: peakEfficiencySpeed },
  { key: 'peakEfficiencyTorque', label: 'load torque at peak efficiency', unit: 'N·m', formula: 'a − c·ω*', uses: M, needsVoltage: true,
    evaluate: (c, V) => {
      const w = peakEfficiencySpeed(c, V);
      return (c.Kt * V) / c.R - c.Tc - ((c.Kt * c.Ke) / c.R + c.b) * w;
    } },
  { key: 'peakEfficiencyCurrent', label: 'current at peak efficiency', unit: 'A', formula: '(V − Ke·ω*)/R', uses: M, needsVoltage: true,
    evaluate: (c, V) => (V - c.Ke * peakEfficiencySpeed(c, V)) / c.R },
];
