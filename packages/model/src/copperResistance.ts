import type { CopperConstant } from './types.js';

/**
 * Winding resistance at another temperature by the copper law R₂ = R₁·(k + T₂)/(k + T₁).
 *
 * ## References
 * FACTS.md §3: k = 234.5 °C as in IEEE Std 113 (DC machines) and IEEE Std 112; k = 235 °C as in
 * IEC 60034-1 and IEC 60034-2-1 (both "from memory, unverified" there).
 *
 * @param resistance - R₁ at `fromTemperature` [Ω]
 * @param fromTemperature - T₁ [°C]
 * @param toTemperature - T₂ [°C]
 * @param k - copper law constant [°C] @default 234.5
 * @returns R₂ [Ω]
 * @throws RangeError for non-finite input, R₁ ≤ 0, k not 234.5 / 235, or a temperature ≤ −k
 * @example
 * copperResistance(2.0, 20, 75); // ≈ 2.432220039 Ω (FACTS.md §3)
 * copperResistance(2.0, 20, 75, 235); // ≈ 2.431372549 Ω
 */
export function copperResistance(resistance: number, fromTemperature: number, toTemperature: number, k: CopperConstant = 234.5): number {
  if (!(resistance > 0) || !Number.isFinite(resistance)) {
    throw new RangeError(`copperResistance: resistance must be a finite number > 0 (got ${resistance})`);
  }
  if (k !== 234.5 && k !== 235) throw new RangeError(`copperResistance: k must be 234.5 or 235 (got ${String(k)})`);
  for (const [name, v] of [['fromTemperature', fromTemperature], ['toTemperature', toTemperature]] as const) {
    if (!Number.isFinite(v) || !(v > -k)) {
      throw new RangeError(`copperResistance: ${name} must be finite and above −${k} °C (got ${v})`);
    }
  }
  return (resistance * (k + toTemperature)) / (k + fromTemperature);
}
