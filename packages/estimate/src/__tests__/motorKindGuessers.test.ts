import { describe, expect, it } from 'vitest';
import { classifyRecording } from '../motor/classifyRecording.js';
import type { MotorExperimentKind } from '../motor/types.js';
import { INVENTED_MOTORS, invented } from './motorFixtures.js';

// Ingest's guesser is compared in a throw-away script for the report (estimate does not depend on
// ingest; adding that dependency only for a test would reverse the package order). Observed on
// these recordings: ingest says 'rich' for coast-down, prbs and multisine (its kinds merge PRBS and
// multisine into 'rich') and 'step' with loaded = true for a loaded run; both agree elsewhere.
const KINDS: MotorExperimentKind[] = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'];

describe('classifyRecording names the seven kinds of the invented generator', () => {
  for (const motor of Object.keys(INVENTED_MOTORS)) {
    for (const kind of KINDS) {
      it(`${kind} of the invented "${motor}" motor is classified as ${kind}`, () => {
        // A small Coulomb friction (1e-4 N·m, invented) so the coast-down stops within the record.
        const m = kind === 'coast-down' ? { ...INVENTED_MOTORS[motor]!, Tc: 1e-4 } : INVENTED_MOTORS[motor]!;
        const g = classifyRecording(invented(m, kind, 3));
        expect(g.kind, g.reason).toBe(kind);
        expect(g.reason.length).toBeGreaterThan(0);
      });
    }
  }
});
