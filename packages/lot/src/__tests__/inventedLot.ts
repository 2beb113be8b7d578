/**
 * Test helper: writes a small INVENTED lot of "Tern 24" motors (the project's demo scenario) into a
 * folder, one sub-folder per motor with a locked-rotor run and a step run made by the project's own
 * generator. Nothing here is a measurement.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { formatRecordingCsv, generateRecording } from '@motorprint/model';

/** Invented true constants of one motor [SI]. */
export interface InventedMotor {
  serial: string;
  R: number;
  L: number;
  K: number;
  J: number;
  b: number;
}

// Noise as in fixtures/make-demo.sh (invented bench: 0.05 V, 0.02 A, 0.3 rad/s).
const NOISE = { voltage: 0.05, current: 0.02, speed: 0.3 };

/** Writes the two runs of each motor into `dir/<serial>/`; seeds from `seed` upwards. */
export function writeInventedLot(dir: string, motors: readonly InventedMotor[], seed = 500): void {
  motors.forEach((m, i) => {
    const folder = join(dir, m.serial);
    mkdirSync(folder, { recursive: true });
    const p = { R: m.R, L: m.L, Kt: m.K, Ke: m.K, J: m.J, b: m.b };
    const runs = [
      ['locked-rotor.csv', generateRecording(p, 'locked-rotor', { volts: 6, sampleRate: 50000, noise: NOISE, seed: seed + 2 * i })],
      ['step.csv', generateRecording(p, 'step', { volts: 24, sampleRate: 8000, duration: 0.3, noise: NOISE, seed: seed + 2 * i + 1 })],
    ] as const;
    for (const [name, g] of runs) {
      writeFileSync(join(folder, name), `# INVENTED recording (test helper); not a measurement.\n${formatRecordingCsv(g.columns)}`);
    }
  });
}

/** Nominal invented Tern 24 constants (fixtures/tern24.params.json). */
export const TERN24 = { R: 1.9, L: 0.00062, K: 0.052, J: 1.1e-5, b: 4e-6 };
