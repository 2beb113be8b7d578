/**
 * Test helpers: an invented motor (the FACTS.md §5 worked example, itself invented there), invented
 * bench recordings from the project's generator with an invented winding temperature, and one fit.
 */
import { fitMotor } from '@motorprint/estimate';
import type { MotorFit, MotorRecordingInput, RecordingData } from '@motorprint/estimate';
import { generateRecording } from '@motorprint/model';
import type { ExperimentKind } from '@motorprint/model';
import type { Provenance } from '../types.js';

/** FACTS.md §5 worked example constants (invented there). */
export const FACTS_MOTOR = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };

/** Generator columns → recording; adds an invented temperature channel around `temperature` °C. */
export function inventedRecording(kind: ExperimentKind, seed: number, temperature: number | null = 40): RecordingData {
  // Noise: 0.05 V, 0.2 % of stall current, 0.2 % of no-load speed (common practice, no source).
  const g = generateRecording(FACTS_MOTOR, kind, { seed, noise: { voltage: 0.05, current: 0.012, speed: 0.48 } });
  const channels: Record<string, Float64Array> = {};
  for (const c of g.columns.slice(1)) channels[c.name] = c.values;
  const time = g.columns[0]!.values;
  if (temperature !== null) {
    // Invented winding temperature: a slow 1 °C ramp centred on `temperature`.
    const t = new Float64Array(time.length);
    for (let k = 0; k < t.length; k++) t[k] = temperature - 0.5 + k / Math.max(1, t.length - 1);
    channels.temperature = t;
  }
  return { time, channels };
}

/** The invented recordings of the shared fit: a free-run step and a locked-rotor step. */
export function inventedInputs(): MotorRecordingInput[] {
  return [
    { recording: inventedRecording('step', 11), kind: 'step', name: 'free-run step (invented)' },
    { recording: inventedRecording('locked-rotor', 12), kind: 'locked-rotor', name: 'locked rotor (invented)' },
  ];
}

/** Fit of `inventedInputs()`. */
export function inventedFit(inputs = inventedInputs()): MotorFit {
  return fitMotor(inputs, {});
}

/** Invented provenance (made-up file names, hashes of nothing in particular). */
export const INVENTED_PROVENANCE: Provenance = {
  tool: { name: 'motorprint', version: '0.1.0' },
  date: '2025-03-01T10:00:00Z',
  inputs: [
    { file: 'invented-step.csv', sha256: 'a'.repeat(64) },
    { file: 'invented-locked.csv', sha256: '0123456789abcdef'.repeat(4) },
  ],
  options: { fit: { voltage: 'auto' }, report: { referenceTemperature: 25 } },
};
