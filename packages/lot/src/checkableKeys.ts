import { derivedFigures } from '@motorprint/report';

/** What a spec key refers to. */
export interface CheckableKey {
  /** Key as written in a spec. */
  key: string;
  /** Unit of the value. */
  unit: string;
  /** Plain-words label. */
  label: string;
  /** `constant` (fitted) or `derived` (a datasheet figure computed from the constants). */
  source: 'constant' | 'derived';
  /** Whether the figure depends on the supply voltage (then the spec must state `ratedVoltage`). */
  needsVoltage: boolean;
}

const CONSTANTS: readonly CheckableKey[] = [
  { key: 'R', unit: 'Ω', label: 'armature resistance', source: 'constant', needsVoltage: false },
  { key: 'L', unit: 'H', label: 'armature inductance', source: 'constant', needsVoltage: false },
  { key: 'Kt', unit: 'N·m/A', label: 'torque constant', source: 'constant', needsVoltage: false },
  { key: 'Ke', unit: 'V·s/rad', label: 'back-EMF constant', source: 'constant', needsVoltage: false },
  { key: 'J', unit: 'kg·m²', label: 'rotor inertia', source: 'constant', needsVoltage: false },
  { key: 'b', unit: 'N·m·s/rad', label: 'viscous friction', source: 'constant', needsVoltage: false },
  { key: 'Tc', unit: 'N·m', label: 'Coulomb friction torque', source: 'constant', needsVoltage: false },
];

/**
 * Every key a spec may check: the motor constants and the derived datasheet figures of
 * `@motorprint/report` (docs/derived-figures.md), with unit, label and whether the figure needs a
 * supply voltage.
 *
 * ## Method
 * The figure list is read from `derivedFigures` itself, so a figure added there can be checked
 * without a change here: evaluated on a plain invented motor once with a voltage and once without,
 * a figure that has a value only with the voltage is voltage-dependent.
 *
 * @returns the keys, constants first, then figures in report order
 * @example
 * checkableKeys().find((k) => k.key === 'stallTorque'); // => { key: 'stallTorque', unit: 'N·m', label: 'stall torque', source: 'derived', needsVoltage: true }
 */
export function checkableKeys(): CheckableKey[] {
  // Any motor with finite, positive constants will do; these are invented round numbers.
  const plain = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 0 };
  const withVoltage = derivedFigures(plain, 12);
  const withoutVoltage = derivedFigures(plain, null);
  const figures = Object.entries(withVoltage).map(([key, f]): CheckableKey => ({
    key, unit: f.unit, label: f.label, source: 'derived',
    needsVoltage: f.value !== null && withoutVoltage[key]?.value === null,
  }));
  return [...CONSTANTS.map((c) => ({ ...c })), ...figures];
}
