/**
 * Internal: the derived datasheet figures, each with its formula (docs/derived-figures.md gives the
 * same list in words). Relations as in FACTS.md §4; unit factors as in FACTS.md §2.
 */
import { motorRelations } from '@motorprint/model';
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

/** The motor's relations are the model package's; this table adds labels, units and unit conversions. */
const f = motorRelations;

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
    evaluate: (c) => f.electricalTimeConstant(c) },
  { key: 'mechanicalTimeConstant', label: 'mechanical time constant τm', unit: 's', formula: 'J·R/(Kt·Ke)', uses: ['J', 'R', 'Kt', 'Ke'], needsVoltage: false,
    evaluate: (c) => f.mechanicalTimeConstant(c) },
  { key: 'mechanicalTimeConstantViscous', label: 'mechanical time constant with viscous friction τm′', unit: 's', formula: 'J·R/(R·b + Kt·Ke)',
    uses: ['J', 'R', 'Kt', 'Ke', 'b'], needsVoltage: false, evaluate: (c) => f.mechanicalTimeConstantViscous(c) },
  { key: 'noLoadSpeed', label: 'no-load speed ω0', unit: 'rad/s', formula: '(Kt·V − R·Tc)/(R·b + Kt·Ke)', uses: M, needsVoltage: true,
    evaluate: f.noLoadSpeed },
  { key: 'noLoadSpeedRpm', label: 'no-load speed ω0', unit: 'r/min', formula: '(Kt·V − R·Tc)/(R·b + Kt·Ke) · 60/(2π)', uses: M, needsVoltage: true,
    evaluate: (c, V) => f.noLoadSpeed(c, V) * RPM_PER_RAD_S },
  { key: 'noLoadCurrent', label: 'no-load current i0', unit: 'A', formula: '(b·ω0 + Tc)/Kt', uses: M, needsVoltage: true,
    evaluate: f.noLoadCurrent },
  { key: 'idealNoLoadSpeed', label: 'ideal no-load speed (friction left out)', unit: 'rad/s', formula: 'V/Ke', uses: ['Ke'], needsVoltage: true,
    evaluate: f.idealNoLoadSpeed },
  { key: 'stallTorque', label: 'stall torque', unit: 'N·m', formula: 'Kt·V/R', uses: ['Kt', 'R'], needsVoltage: true,
    evaluate: f.stallTorque },
  { key: 'stallCurrent', label: 'stall current', unit: 'A', formula: 'V/R', uses: ['R'], needsVoltage: true, evaluate: f.stallCurrent },
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
    evaluate: (c) => f.motorConstant(c) },
  { key: 'speedDropPerLoadTorque', label: 'speed drop per load torque', unit: 'rad/s/(N·m)', formula: 'R/(R·b + Kt·Ke)',
    uses: ['R', 'Kt', 'Ke', 'b'], needsVoltage: false, evaluate: (c) => f.speedDropPerLoadTorque(c) },
  { key: 'speedDropPerLoadTorqueRpm', label: 'speed drop per load torque', unit: 'r/min/(mN·m)',
    formula: 'R/(R·b + Kt·Ke) · 60/(2π) / 1000', uses: ['R', 'Kt', 'Ke', 'b'], needsVoltage: false,
    evaluate: (c) => (f.speedDropPerLoadTorque(c) * RPM_PER_RAD_S) / 1000 },
  { key: 'maxOutputPower', label: 'maximum output power', unit: 'W', formula: 'a²/(4·c), a = Kt·V/R − Tc, c = Kt·Ke/R + b', uses: M, needsVoltage: true,
    evaluate: f.maxOutputPower },
  { key: 'peakEfficiency', label: 'peak efficiency', unit: '%', formula: '100·T·ω/(V·i) at ω*', uses: M, needsVoltage: true,
    evaluate: (c, V) => 100 * f.peakEfficiency(c, V) },
  { key: 'peakEfficiencySpeed', label: 'speed at peak efficiency ω*', unit: 'rad/s', formula: '(V/Ke)·(1 − √((b·V + Ke·Tc)/(c·V)))', uses: M,
    needsVoltage: true, evaluate: f.peakEfficiencySpeed },
  { key: 'peakEfficiencyTorque', label: 'load torque at peak efficiency', unit: 'N·m', formula: 'a − c·ω*', uses: M, needsVoltage: true,
    evaluate: f.peakEfficiencyTorque },
  { key: 'peakEfficiencyCurrent', label: 'current at peak efficiency', unit: 'A', formula: '(V − Ke·ω*)/R', uses: M, needsVoltage: true,
    evaluate: f.peakEfficiencyCurrent },
];
