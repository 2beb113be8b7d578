/**
 * Test helpers for the motor estimator: invented motors and a converter from the generator's
 * columns to the estimator's recording shape. All motors here are invented (not real products).
 */
import { generateRecording } from '@motorprint/model';
import type { DetailedParams, ExperimentKind } from '@motorprint/model';
import type { RecordingData } from '../motor/types.js';

/** Invented motors spanning R 0.1–20 Ω, L 20 µH–10 mH, J 1e-7–1e-3 kg·m². */
export const INVENTED_MOTORS: Record<string, DetailedParams> = {
  // The worked example of FACTS.md §5 (R 2 Ω, L 1 mH, K 0.05, J 2e-5, b 1e-5): invented there.
  'facts-example': { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 },
  // Invented small, high-resistance motor: τe 0.5 ms, τm′ ≈ 5 ms.
  'tiny-20ohm': { R: 20, L: 10e-3, Kt: 0.02, Ke: 0.02, J: 1e-7, b: 1e-8 },
  // Invented large, low-resistance motor: τe 0.2 ms, τm′ ≈ 10 ms.
  'big-0.1ohm': { R: 0.1, L: 20e-6, Kt: 0.1, Ke: 0.1, J: 1e-3, b: 1e-4 },
};

/** Realistic noise for a motor at `volts`: 0.05 V on the voltage, 0.2 % of stall current, 0.2 % of no-load speed (common practice, no source). */
export function benchNoise(m: DetailedParams, volts = 12): { voltage: number; current: number; speed: number } {
  return { voltage: 0.05, current: (0.002 * volts) / m.R, speed: (0.002 * volts) / m.Ke };
}

/** Generator columns → estimator recording. */
export function invented(m: DetailedParams, kind: ExperimentKind, seed: number, noise = benchNoise(m), extra: { sampleRate?: number; duration?: number } = {}): RecordingData {
  const g = generateRecording(m, kind, { seed, noise, ...extra });
  const channels: Record<string, Float64Array> = {};
  for (const c of g.columns.slice(1)) channels[c.name] = c.values;
  return { time: g.columns[0]!.values, channels };
}
