/**
 * Test helpers: invented recordings from `@motorprint/model` (not measured on any real motor).
 */
import { createRandom, generateRecording, simulateDetailed } from '@motorprint/model';
import type { DetailedParams, ExperimentKind } from '@motorprint/model';
import type { RecordingLike } from '../types.js';

/** The FACTS.md §5 worked-example motor (invented there): R 2 Ω, L 1 mH, K 0.05, J 2e-5, b 1e-5. */
export const MOTOR: DetailedParams = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };

/** Bench noise: 0.05 V, 0.2 % of stall current, 0.2 % of no-load speed at 12 V (common practice, no source). */
export const NOISE = { voltage: 0.05, current: 0.012, speed: 0.48 };

/** Generator columns → recording. */
export function invented(p: DetailedParams, kind: ExperimentKind, seed: number, extra: { sampleRate?: number; duration?: number } = {}): RecordingLike {
  const g = generateRecording(p, kind, { seed, noise: NOISE, ...extra });
  const channels: Record<string, Float64Array> = {};
  for (const c of g.columns.slice(1)) channels[c.name] = c.values;
  return { time: g.columns[0]!.values, channels };
}

/**
 * Invented slow voltage ramp from rest through the detailed model (0 → 2 V over 1 s, then held to
 * 1.2 s, 2 kHz) — the generator has no ramp experiment, and stiction shows only when the current
 * rises slowly past the breakaway level (1 A/s here for the 2 Ω motor).
 */
export function inventedRamp(p: DetailedParams, seed: number): RecordingLike {
  const fs = 2000, n = 2400, dt = 1 / fs;
  const v = Float64Array.from({ length: n }, (_, k) => Math.min(2, (2 * k) / fs));
  const tr = simulateDetailed(p, v, dt);
  const rng = createRandom(seed);
  const g = (): number => rng.normal();
  return {
    time: Float64Array.from({ length: n }, (_, k) => k * dt),
    channels: {
      voltage: Float64Array.from(tr.terminalVoltage, (x) => x + NOISE.voltage * g()),
      current: Float64Array.from(tr.current, (x) => x + NOISE.current * g()),
      speed: Float64Array.from(tr.speed, (x) => x + NOISE.speed * g()),
    },
  };
}
