/**
 * Shared by the plan test and `pnpm bench plan`: the spread of fitted constants over seeded
 * simulations of a plan, against the plan's predicted standard errors.
 */
import { fitMotor, planExperiments, simulatePlannedRun } from '../index.js';
import type { MotorParams } from '@motorprint/model';
import type { PlannedRun, PlanOptions } from '../index.js';

/** One scenario: a set of runs checked together (the kind under test and what it needs beside it). */
export interface PlanScenario { label: string; runs: PlannedRun[] }

/** Per constant: predicted SE, the SD of the fitted values over the seeds, their ratio. */
export interface SpreadRow { constant: string; predicted: number; spread: number; ratio: number; fits: number }

/** The Tern 24 demo motor (invented; fixtures/tern24.params.json). */
export const TERN24: MotorParams = { R: 1.9, L: 0.00062, Kt: 0.052, Ke: 0.052, J: 1.1e-5, b: 4e-6 };
/** The demo recordings' noise (fixtures/make-demo.sh; invented). */
export const DEMO_NOISE = { voltage: 0.05, current: 0.02, speed: 0.3, torque: 1e-4 };

/** Scenarios per kind on the demo motor, kept small (a few thousand samples each). */
export const SCENARIOS: PlanScenario[] = [
  { label: 'locked-rotor', runs: [{ kind: 'locked-rotor', levels: [0, 6], sampleRate: 50000 }] },
  { label: 'step', runs: [{ kind: 'step', levels: [0, 24], sampleRate: 10000, duration: 0.3 }] },
  { label: 'coast-down', runs: [{ kind: 'coast-down', levels: [24], sampleRate: 1000, duration: 2 }] },
  { label: 'coast-down speed only + step', runs: [{ kind: 'coast-down', levels: [24], sampleRate: 2000, duration: 2, voltage: false }, { kind: 'step', levels: [0, 24], sampleRate: 5000, duration: 0.1 }] },
  { label: 'steady-state', runs: [{ kind: 'steady-state', sampleRate: 2000, duration: 0.5, levels: [4.8, 9.6, 14.4, 19.2, 24] }] },
  { label: 'prbs', runs: [{ kind: 'prbs', levels: [12, 24], sampleRate: 5000, duration: 0.5 }] },
  { label: 'multisine', runs: [{ kind: 'multisine', levels: [12, 10], sampleRate: 5000, duration: 0.3 }] },
  { label: 'loaded', runs: [{ kind: 'loaded', levels: [0, 24], sampleRate: 5000, duration: 0.3 }] },
];

/**
 * Fits `seeds` seeded simulations of a scenario with `fitMotor` (lumped model, viscous friction:
 * the model the plan predicts for) and compares the SD of each identified constant's estimates
 * with the predicted SE. Fits that do not converge are left out (counted in `fits`).
 */
export function spreadOf(draft: MotorParams, sc: PlanScenario, seeds: number, options: PlanOptions = { noise: DEMO_NOISE, suggest: false }): SpreadRow[] {
  const plan = planExperiments(draft, sc.runs, options);
  const wanted = plan.constants.filter((c) => c.status === 'identified');
  const values = new Map<string, number[]>(wanted.map((c) => [c.name, []]));
  for (let s = 0; s < seeds; s++) {
    const recs = sc.runs.map((r, i) => {
      const sim = simulatePlannedRun(draft, { ...r, name: `${r.kind} ${i + 1}` }, 1000 + 97 * s + i, options);
      return { recording: sim.recording, kind: sim.kind, name: sim.name };
    });
    const fit = fitMotor(recs, { coulomb: false, keepResiduals: false });
    if (!fit.converged) continue;
    for (const c of wanted) {
      const e = fit.parameters[c.name === 'K' ? 'Kt' : c.name];
      if (e !== undefined && Number.isFinite(e.value)) values.get(c.name)!.push(e.value);
    }
  }
  return wanted.map((c) => {
    const v = values.get(c.name)!;
    const m = v.reduce((a, b) => a + b, 0) / v.length;
    const sd = Math.sqrt(v.reduce((a, b) => a + (b - m) ** 2, 0) / (v.length - 1));
    return { constant: c.name, predicted: c.standardError!, spread: sd, ratio: sd / c.standardError!, fits: v.length };
  });
}
