import { describe, it, expect } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { fitMotor, planExperiments, simulatePlannedRun } from '../index.js';
import { DEMO_NOISE, SCENARIOS, spreadOf, TERN24 } from './planSpread.js';

/**
 * Statistics of the band: with m = 48 fits the sample SD s of normal estimates has a relative SD
 * of about 1/√(2(m − 1)) ≈ 10 % (derived here), so a correct prediction gives s/SE in 0.7–1.3
 * with about three SDs to spare on either side; the constants of one scenario are correlated, so
 * the checks are not independent. The full check (150 seeds, goal: within 20 %) is `pnpm bench plan`.
 */
const SEEDS = 48;

describe('planExperiments predicts the spread of fitMotor over seeded simulations of the plan', () => {
  it.each(SCENARIOS.map((s) => [s.label, s] as const))('%s', (_, sc) => {
    const rows = spreadOf(TERN24, sc, SEEDS);
    expect(rows.length).toBeGreaterThan(0);
    for (const r of rows) {
      expect(r.fits, `${r.constant}: converged fits`).toBeGreaterThanOrEqual(SEEDS - 2);
      expect(r.ratio, `${r.constant}: spread/predicted`).toBeGreaterThan(0.7);
      expect(r.ratio, `${r.constant}: spread/predicted`).toBeLessThan(1.3);
    }
  }, 120_000);
});

describe('planExperiments', () => {
  const lr = { kind: 'locked-rotor' as const, levels: [0, 6], sampleRate: 50000 };
  it('agrees with the SEs fitMotor states on one simulated run of the same plan (within 10 %)', () => {
    const runs = [lr, { kind: 'step' as const, levels: [0, 24], sampleRate: 10000, duration: 0.3 }];
    const plan = planExperiments(TERN24, runs, { noise: DEMO_NOISE, suggest: false });
    const fit = fitMotor(runs.map((r, i) => { const s = simulatePlannedRun(TERN24, { ...r, name: `${r.kind} ${i + 1}` }, 5, { noise: DEMO_NOISE }); return { recording: s.recording, kind: s.kind, name: s.name }; }), { coulomb: false });
    for (const c of plan.constants) {
      const e = fit.parameters[c.name === 'K' ? 'Kt' : c.name]!;
      expectClose(e.standardError!, c.standardError!, { rel: 0.1 }, c.name);
    }
  });
  it('sets a barely informed constant aside and predicts the others as if it were pinned', () => {
    // A 10 ms step (under τm) without its running steady state: b is barely informed (invented plan).
    const plan = planExperiments(TERN24, [{ kind: 'step', levels: [0, 24], sampleRate: 5000, duration: 0.01 }], { noise: DEMO_NOISE, suggest: false });
    const b = plan.constants.find((c) => c.name === 'b')!;
    expect(b.status).toBe('set-aside');
    expect(b.relativeErrorFree).toBeGreaterThan(0.5);
    expect(plan.setAside.names).toContain('b');
    expect(plan.constants.find((c) => c.name === 'R')!.status).toBe('identified');
    expect(plan.notes.some((n) => /not reached/.test(n))).toBe(true);
  });
  it('suggests a change that meets the target and says so in one line', () => {
    const plan = planExperiments(TERN24, [{ kind: 'step', levels: [0, 24], sampleRate: 2000, duration: 0.3 }], { noise: DEMO_NOISE, target: 0.01 });
    const b = plan.constants.find((c) => c.name === 'b')!;
    expect(b.met).toBe(false);
    const s = plan.suggestions.find((x) => x.constant === 'b')!;
    expect(s.to).toBeLessThanOrEqual(0.01);
    expect(s.text).toMatch(/→/);
    // The suggested plan, planned again, meets the target.
    const changed: Record<string, number> = { duration: 0.3, sampleRate: 2000 };
    for (const ch of s.changes) changed[ch.knob] = ch.to;
    const again = planExperiments(TERN24, [{ kind: 'step', levels: [0, 24], sampleRate: changed.sampleRate!, duration: changed.duration! }], { noise: DEMO_NOISE, suggest: false });
    expect(again.constants.find((c) => c.name === 'b')!.relativeError!).toBeLessThanOrEqual(0.01);
  }, 60_000);
  it('raises the levels only up to the stated supply', () => {
    // A 12 V step with a 24 V supply stated (invented plan): L misses 0.5 % and the full supply meets it.
    const runs = [{ kind: 'step' as const, levels: [0, 12], sampleRate: 2000, duration: 0.3 }];
    const plan = planExperiments(TERN24, runs, { noise: DEMO_NOISE, volts: 24, target: 0.005 });
    const s = plan.suggestions.find((x) => x.constant === 'L')!;
    expect(s.changes).toEqual([{ knob: 'levels', from: 12, to: 24 }]);
    const without = planExperiments(TERN24, runs, { noise: DEMO_NOISE, target: 0.005 });
    expect(without.suggestions.flatMap((x) => x.changes).some((c) => c.knob === 'levels')).toBe(false);
  }, 60_000);
  it('gives the locked-rotor budget with the conservative default stated', () => {
    const plan = planExperiments(TERN24, [lr], { noise: DEMO_NOISE, suggest: false });
    const lb = plan.lockedRotor[0]!;
    expectClose(lb.current, 6 / 1.9, { rel: 1e-12 }, 'stall current V/R');
    expect(lb.note).toMatch(/conservative default/);
    expect(lb.over).toBe(false);
  });
  it('names bad runs and options', () => {
    expect(() => planExperiments(TERN24, [{ kind: 'spin' as never }])).toThrow(/runs\[0\]\.kind/);
    expect(() => planExperiments(TERN24, [{ kind: 'step' }])).toThrow(/runs\[0\]: give the noise/);
    expect(() => planExperiments(TERN24, [lr], { noise: DEMO_NOISE, target: 2 })).toThrow(/options\.target/);
    expect(() => planExperiments(TERN24, [{ ...lr, bitTime: 1e-3 }], { noise: DEMO_NOISE })).toThrow(/bitTime applies to prbs/);
  });
});

describe('checkLockedRotorHold', () => {
  it('finds a hold longer than the budget, and none for a short one', async () => {
    const { checkLockedRotorHold } = await import('../index.js');
    // Derived here: 6 V on 1.9 Ω holds 3.16 A; adiabatic, Cth 1 J/K gives ≈ 1.0 s for 20 K. A 3 s hold is over.
    const long = simulatePlannedRun(TERN24, { kind: 'locked-rotor', levels: [0, 6], sampleRate: 2000, duration: 3 / 0.9 }, 3, { noise: DEMO_NOISE });
    const r = checkLockedRotorHold(long.recording, { R: 1.9, name: 'lr' });
    expectClose(r.holdSeconds, 3, { rel: 1e-3 }, 'hold');
    expectClose(r.current, 6 / 1.9, { rel: 0.01 }, 'stall current');
    expect(r.finding?.code).toBe('locked-rotor-hold-over-budget');
    expect(r.finding?.advice).toMatch(/local codes/);
    expect(r.finding?.advice).not.toMatch(/--/);
    const short = simulatePlannedRun(TERN24, { kind: 'locked-rotor', levels: [0, 6], sampleRate: 50000 }, 3, { noise: DEMO_NOISE });
    expect(checkLockedRotorHold(short.recording, { R: 1.9 }).finding).toBeUndefined();
  });
});
