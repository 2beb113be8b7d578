import type { DetailedParams, ExperimentKind } from '@motorprint/model';
import { describe, expect, it } from 'vitest';
import { scanRecording } from '../scanRecording.js';
import type { RecordingKind, RecordingLike } from '../types.js';
import { MOTOR, invented, inventedRamp } from './inventedRecordings.js';

const SEEDS = 8;

function codes(rec: RecordingLike, kind: RecordingKind): string[] {
  return scanRecording(rec, { kind }).findings.map((f) => f.code);
}

/** Fraction of seeds on which `code` fires. */
function rate(make: (seed: number) => RecordingLike, kind: RecordingKind, code: string): number {
  let hits = 0;
  for (let s = 1; s <= SEEDS; s++) if (codes(make(s), kind).includes(code)) hits++;
  return hits / SEEDS;
}

// Effect sizes (invented, chosen as realistic for this 0.3 N·m-stall motor, common practice, no source):
// Tc = 2e-3 N·m (FACTS.md §5 value, 0.7 % of stall torque); cd = 1e-7 N·m·s²/rad² (5.8e-3 N·m at 240 rad/s);
// Imax = 3 A (half the 6 A stall current); Rth 3 K/W, Cth 5 J/K (a small winding heating ≈ 10 K/s locked at 12 V);
// Ts = 5e-3 N·m (2.5 × Tc).
describe('each effect switched on in an invented recording fires its finding', () => {
  const cases: { code: string; p: DetailedParams; kind: ExperimentKind; extra?: { sampleRate?: number; duration?: number } }[] = [
    { code: 'coulomb-friction', p: { ...MOTOR, Tc: 2e-3 }, kind: 'steady-state' },
    { code: 'coulomb-friction', p: { ...MOTOR, Tc: 2e-3 }, kind: 'prbs' },
    { code: 'coulomb-friction', p: { ...MOTOR, Tc: 2e-3 }, kind: 'coast-down', extra: { duration: 3 } },
    { code: 'speed-squared-drag', p: { ...MOTOR, cd: 1e-7 }, kind: 'steady-state' },
    { code: 'drive-saturation', p: { ...MOTOR, Imax: 3 }, kind: 'step' },
    { code: 'winding-heating', p: { ...MOTOR, Rth: 3, Cth: 5 }, kind: 'locked-rotor', extra: { duration: 5, sampleRate: 1000 } },
    { code: 'slow-sampling', p: MOTOR, kind: 'locked-rotor', extra: { sampleRate: 1000, duration: 0.05 } },
  ];
  for (const c of cases) {
    it(`${c.code} on a ${c.kind} recording fires on every one of ${SEEDS} seeds`, () => {
      expect(rate((s) => invented(c.p, c.kind, s, c.extra), c.kind, c.code)).toBe(1);
    });
  }
  it('stiction on an invented slow voltage ramp (Ts 5 mN·m > Tc 2 mN·m) fires on every one of 20 seeds, and never on 20 seeds without it', () => {
    // Breakaway current Ts/Kt = 0.1 A against a running level Tc/Kt = 0.04 A: 0.06 A = 5 current noise SDs
    // raw, ≈ 10 residual SDs after filtering (derived here from the invented motor). Rates 20/20 and 0/20
    // observed when the rule was set; a false-alarm allowance of 0 is strict but the no-stiction excess
    // stayed below 1 SD on 60 seeds (bench/diagnose.ts prints the rates).
    const SEEDS_ST = 20;
    let hit = 0, falseHit = 0;
    for (let s = 1; s <= SEEDS_ST; s++) {
      if (codes(inventedRamp({ ...MOTOR, Tc: 2e-3, Ts: 5e-3 }, s), 'unknown').includes('stiction')) hit++;
      if (codes(inventedRamp({ ...MOTOR, Tc: 2e-3 }, 300 + s), 'unknown').includes('stiction')) falseHit++;
    }
    expect(hit, `detections ${hit}/${SEEDS_ST}`).toBe(SEEDS_ST);
    expect(falseHit, `false alarms ${falseHit}/${SEEDS_ST}`).toBe(0);
  }, 60_000);
  it('a current sensor offset of 0.05 A (4 noise SDs) fires sensor-offset', () => {
    expect(rate((s) => {
      const r = invented(MOTOR, 'step', s);
      return { time: r.time, channels: { ...r.channels, current: r.channels.current!.map((x) => x + 0.05) } };
    }, 'step', 'sensor-offset')).toBe(1);
  });
  it('a current channel logged 3 samples late fires input-delay with a delay of 3 samples', () => {
    const r = invented(MOTOR, 'prbs', 1);
    const i = r.channels.current!;
    const late = new Float64Array(i.length);
    late.set(i.subarray(0, i.length - 3), 3);
    const f = scanRecording({ time: r.time, channels: { ...r.channels, current: late } }, { kind: 'prbs' }).findings.find((x) => x.code === 'input-delay');
    expect(f?.evidence['delay [samples]']).toBe(3);
  });
  it('a speed channel railed at 200 rad/s fires clipped-samples', () => {
    const r = invented(MOTOR, 'step', 2);
    const w = r.channels.speed!.map((x) => Math.min(x, 200));
    expect(codes({ time: r.time, channels: { ...r.channels, speed: w } }, 'step')).toContain('clipped-samples');
  });
});

describe('clean linear invented recordings fire no findings beyond the expected false-alarm rate', () => {
  const kinds: { kind: ExperimentKind; extra?: { duration?: number } }[] = [
    { kind: 'step' }, { kind: 'prbs' }, { kind: 'steady-state' }, { kind: 'multisine' }, { kind: 'locked-rotor' },
    { kind: 'coast-down', extra: { duration: 3 } },
  ];
  it(`over ${kinds.length} experiment kinds × ${SEEDS} seeds at most 1 recording has any finding`, () => {
    // Each model comparison runs at alpha 0.01 and the other detectors at ≥ 4 SD, so across
    // ≈ 3 tests per recording the expected rate is ≲ 3 %, i.e. ≲ 1.5 of 48 recordings (derived here).
    const fired: string[] = [];
    for (const k of kinds) {
      for (let s = 1; s <= SEEDS; s++) {
        const c = codes(invented(MOTOR, k.kind, 100 + s, k.extra), k.kind);
        if (c.length > 0) fired.push(`${k.kind}/${s}: ${c.join(', ')}`);
      }
    }
    expect(fired.length, fired.join('; ')).toBeLessThanOrEqual(1);
  });
});

describe('friction findings hold their false-alarm rate on clean recordings and still detect the effects', () => {
  it('speed-squared-drag and coulomb-friction fire on at most 1 of 20 clean 2 kHz PRBS and 20 clean steady-state recordings, and cd 1e-7 / Tc 2e-3 fire on ≥ 19 of 20', () => {
    // Before the rule change speed-squared-drag fired on 7–8 of 30 clean 2 kHz PRBS recordings (measured, bench (g)).
    // Allowance: at α 0.01 the expected count over 40 clean recordings × 2 tests is 0.8; ≤ 1 false alarm in 40
    // (≤ 2.5 %) — bench/diagnose.ts (g) measured 100 seeds per kind. Detection ≥ 19/20: observed 100/100
    // for both effects (bench (g)); one miss allowed (common practice, no source).
    const clean: string[] = [];
    let drag = 0, coul = 0;
    for (let s = 1; s <= 20; s++) {
      for (const [kind, extra] of [['prbs', { sampleRate: 2000 }], ['steady-state', {}]] as const) {
        const c = codes(invented(MOTOR, kind, 7000 + s, extra), kind).filter((x) => x === 'speed-squared-drag' || x === 'coulomb-friction');
        if (c.length > 0) clean.push(`${kind}/${s}: ${c.join(', ')}`);
      }
      if (codes(invented({ ...MOTOR, cd: 1e-7 }, 'steady-state', 7100 + s), 'steady-state').includes('speed-squared-drag')) drag++;
      if (codes(invented({ ...MOTOR, Tc: 2e-3 }, 'prbs', 7200 + s, { sampleRate: 2000 }), 'prbs').includes('coulomb-friction')) coul++;
    }
    expect(clean.length, clean.join('; ')).toBeLessThanOrEqual(1);
    expect(drag, `cd detections ${drag}/20`).toBeGreaterThanOrEqual(19);
    expect(coul, `Tc detections ${coul}/20`).toBeGreaterThanOrEqual(19);
  }, 60_000);
  it('a dynamic recording gives no speed-squared-drag verdict even with drag present (the rule needs settled plateaus)', () => {
    const c = codes(invented({ ...MOTOR, cd: 1e-7 }, 'prbs', 3, { sampleRate: 2000 }), 'prbs');
    expect(c).not.toContain('speed-squared-drag');
  });
});
