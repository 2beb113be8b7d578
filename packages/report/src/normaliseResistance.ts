import { copperResistance } from '@motorprint/model';
import type { CopperLawConstant, ResistanceAtReference } from './types.js';

/**
 * Carry a winding resistance measured at the winding temperature to a reference temperature by
 * the copper law, and state the form used.
 *
 * ## Method
 * R_ref = R·(k + T_ref)/(k + T_winding) with k = 234.5 °C (IEEE Std 113 form) or 235 °C
 * (IEC 60034-1 form). The interval is carried by the same factor: the temperature is taken as exact.
 *
 * ## References
 * FACTS.md §3 (copper law, both forms, worked correction 2.0 Ω at 20 °C → 2.432220039 Ω at 75 °C).
 *
 * @param resistance - fitted R [Ω]
 * @param ci95 - its 95 % interval [Ω], or null
 * @param windingTemperature - mean winding temperature during the fit [°C], or null when unknown
 * @param referenceTemperature - target temperature [°C] @default 25
 * @param copperConstant - k [°C] @default 234.5
 * @param source - where the winding temperature came from @default 'option'
 * @returns the resistance at the reference temperature with the factor and a plain statement;
 *   `value: null` when the winding temperature is unknown
 * @throws RangeError for R ≤ 0, non-finite temperatures, temperatures at or below −k, or k not 234.5/235
 * @example
 * normaliseResistance(2.0, null, 20, 75).value; // ≈ 2.432220039 Ω (FACTS.md §3)
 */
export function normaliseResistance(
  resistance: number,
  ci95: [number, number] | null,
  windingTemperature: number | null,
  referenceTemperature = 25,
  copperConstant: CopperLawConstant = 234.5,
  source: 'temperature channel' | 'option' = 'option',
): ResistanceAtReference {
  const fn = 'normaliseResistance';
  if (copperConstant !== 234.5 && copperConstant !== 235) {
    throw new RangeError(`${fn}: copperConstant must be 234.5 or 235 (got ${String(copperConstant)})`);
  }
  if (!Number.isFinite(referenceTemperature) || !(referenceTemperature > -copperConstant)) {
    throw new RangeError(`${fn}: referenceTemperature must be finite and above −${copperConstant} °C (got ${referenceTemperature})`);
  }
  if (!(resistance > 0) || !Number.isFinite(resistance)) throw new RangeError(`${fn}: resistance must be finite and > 0 (got ${resistance})`);
  const form = copperConstant === 234.5 ? 'IEEE Std 113 form' : 'IEC 60034-1 form';
  if (windingTemperature === null) {
    return {
      value: null, unit: 'Ω', ci95: null, referenceTemperature, windingTemperature: null, windingTemperatureSource: 'unknown',
      copperConstant, form, factor: null,
      note: 'not computed: the winding temperature is unknown (no temperature channel in the recordings and no winding temperature given), so R is stated as fitted, not normalised',
    };
  }
  if (!Number.isFinite(windingTemperature) || !(windingTemperature > -copperConstant)) {
    throw new RangeError(`${fn}: windingTemperature must be finite and above −${copperConstant} °C (got ${windingTemperature})`);
  }
  const value = copperResistance(resistance, windingTemperature, referenceTemperature, copperConstant);
  const factor = (copperConstant + referenceTemperature) / (copperConstant + windingTemperature);
  return {
    value, unit: 'Ω', ci95: ci95 === null ? null : [ci95[0] * factor, ci95[1] * factor], referenceTemperature, windingTemperature,
    windingTemperatureSource: source, copperConstant, form, factor,
    note: `R carried from ${fmt(windingTemperature)} °C (${source}) to ${fmt(referenceTemperature)} °C by the copper law ` +
      `R·(k + T_ref)/(k + T), k = ${copperConstant} °C (${form}); temperature taken as exact`,
  };
}

function fmt(t: number): string {
  return Number(t.toPrecision(4)).toString();
}
