/**
 * `pnpm bench findings`: false alarms of the findings and the model choice on clean invented
 * recordings with logger artefacts (12-bit ADC, a 1000-count encoder, sample-time jitter), per
 * experiment kind, over many seeds; and detection at modest effect sizes. The seeded test
 * (packages/diagnose/src/__tests__/loggerFalseAlarms.test.ts) runs a few of these.
 */
import { effectCalls, falseAlarmRates, loggedRecording, RATE_MOTOR } from './lib/findingRates.js';
import type { ExperimentKind } from '@motorprint/model';

export default async function findings(): Promise<void> {
  const seeds = Array.from({ length: Number(process.env.MOTORPRINT_FINDING_SEEDS ?? 20) }, (_, i) => 100 + i);
  const kinds: ExperimentKind[] = ['step', 'prbs', 'steady-state', 'multisine', 'locked-rotor', 'coast-down'];
  console.log(`false alarms on clean recordings (${seeds.length} seeds each): any effect finding or extension chosen`);
  console.log('kind           artefacts        alarms   rate    calls');
  for (const r of falseAlarmRates(kinds, seeds, ['adc12', 'adc12+encoder', 'adc12+jitter'])) {
    console.log(`${r.kind.padEnd(14)} ${r.artefacts.padEnd(16)} ${`${r.alarms}/${r.tried}`.padEnd(8)} ${((100 * r.alarms) / r.tried).toFixed(0).padStart(3)} %   ${Object.entries(r.codes).map(([c, k]) => `${c} ×${k}`).join(', ') || '—'}`);
  }
  // Detection at modest effect sizes (invented): Coulomb friction at 5 % of the stall torque, drag
  // giving 10 % of the viscous torque at 300 rad/s.
  const stall = (RATE_MOTOR.Kt * 24) / RATE_MOTOR.R;
  const effects: { name: string; kind: ExperimentKind; add: Record<string, number>; calls: string[] }[] = [
    { name: `Coulomb Tc = ${(0.05 * stall).toPrecision(2)} N·m`, kind: 'prbs', add: { Tc: 0.05 * stall }, calls: ['model:coulomb', 'coulomb-friction'] },
    { name: `Coulomb Tc = ${(0.05 * stall).toPrecision(2)} N·m`, kind: 'coast-down', add: { Tc: 0.05 * stall }, calls: ['model:coulomb', 'coulomb-friction'] },
    { name: 'drag c = 0.1·b/300', kind: 'steady-state', add: { cd: (0.1 * RATE_MOTOR.b) / 300 }, calls: ['model:drag', 'speed-squared-drag'] },
  ];
  console.log('\ndetection (adc12)');
  console.log('effect                         kind          detected');
  for (const e of effects) {
    let hit = 0;
    const few = seeds.slice(0, Math.min(10, seeds.length));
    for (const s of few) {
      const c = effectCalls(loggedRecording(e.kind, s, 'adc12', e.add), `${e.kind}-${s}.csv`);
      const all = [...c.findings, ...c.extensions.map((x) => `model:${x}`)];
      if (e.calls.some((k) => all.includes(k))) hit++;
    }
    console.log(`${e.name.padEnd(30)} ${e.kind.padEnd(13)} ${hit}/${few.length}`);
  }
}
