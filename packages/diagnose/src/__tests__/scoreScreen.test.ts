/**
 * The score-test screen of identifyMotor on long invented recordings (generator of @motorprint/model,
 * not a measurement) with a logger's artefacts added: 12-bit quantisation of current and speed over
 * their full scales (the quantisation leaves the residuals slightly non-white, as a real logger does).
 */
import { scoreMotorExtensions, fitMotor } from '@motorprint/estimate';
import type { MotorRecordingInput } from '@motorprint/estimate';
import type { DetailedParams } from '@motorprint/model';
import { describe, expect, it } from 'vitest';
import { identifyMotor } from '../identifyMotor.js';
import { MOTOR, invented } from './inventedRecordings.js';

/** 1.5 s of PRBS at 10 kHz (30 000 residual rows) with 12-bit current (±4 A) and speed (±400 rad/s). */
function loggedPrbs(p: DetailedParams, seed: number): MotorRecordingInput {
  const r = invented(p, 'prbs', seed, { sampleRate: 10000, duration: 1.5 });
  const q = (x: Float64Array, full: number): Float64Array => { const lsb = (2 * full) / 4096; return Float64Array.from(x, (v) => Math.round(v / lsb) * lsb); };
  const ch = r.channels as Record<string, Float64Array>;
  return { recording: { time: r.time, channels: { ...ch, current: q(ch.current!, 4), speed: q(ch.speed!, 400) } }, kind: 'prbs', name: `prbs-${seed}` };
}

describe('identifyMotor screens candidates by the score test on long recordings', () => {
  it('clean motor, 3 runs: the lumped model is chosen, and candidates the test turns down are not fitted, with bounds that hold 0', () => {
    let screenedAll = 0;
    for (const s of [1, 2, 3]) {
      const rec = [loggedPrbs(MOTOR, 200 + s)];
      const id = identifyMotor(rec);
      expect(id.model.extensions, `run ${s}`).toEqual([]);
      const tried = id.model.candidates.filter((c) => c.added !== null);
      expect(tried.map((c) => c.added).sort()).toEqual(['coulomb', 'drag']);
      for (const c of tried) expect(c.scoreTest, `run ${s} ${c.added}`).toBeDefined();
      if (tried.every((c) => !c.converged && c.comparison === null)) screenedAll++;
      for (const u of id.unsupported) {
        for (const [name, b] of Object.entries(u.bounds)) {
          // A bound above zero (the truth): the linearised interval, floored at zero, holds 0.
          expect(b.upper95, `run ${s} ${name}`).toBeGreaterThan(0);
        }
      }
    }
    // Under the null each screen passes with probability 0.99; all three runs screen both
    // candidates with probability 0.99⁶ ≈ 0.94 — at least two of three fail with ≈ 0.2 %.
    expect(screenedAll).toBeGreaterThanOrEqual(2);
  }, 300_000);

  it('drag 30 % of the viscous torque at the top speed: the test finds it, the candidate is fitted and chosen, c within 3 SE', () => {
    // Top speed of the PRBS at ±12 V ≈ 230 rad/s; b·ω ≈ 2.3e-3 N·m there; c·ω² = 0.3·b·ω → c ≈ 1.3e-8 (derived here).
    const c = 1.3e-8;
    const rec = [loggedPrbs({ ...MOTOR, cd: c }, 211)];
    const id = identifyMotor(rec);
    expect(id.model.extensions).toContain('drag');
    const cand = id.model.candidates.find((x) => x.added === 'drag' && x.accepted)!;
    expect(cand.scoreTest!.pValue).toBeLessThan(1e-6);
    const est = id.fit.parameters.c!;
    expect(Math.abs(est.value - c) / est.standardError!).toBeLessThan(3);
  }, 300_000);

  it('the score F and its one-step estimate agree with a fitted drag candidate (same weights)', () => {
    const rec = [loggedPrbs({ ...MOTOR, cd: 4e-9 }, 212)];
    const fit = fitMotor(rec);
    const noise = fit.recordings.map((r) => Object.fromEntries(r.channels.filter((x) => x.sigma > 0).map((x) => [x.channel, x.sigma])));
    const sc = scoreMotorExtensions(rec, { warmStart: fit, noise, reweight: false }, ['drag']).drag!;
    expect(sc).not.toBeNull();
    const full = fitMotor(rec, { warmStart: fit, extensions: { drag: true }, noise, reweight: false });
    // F of the fitted candidate against the score problem's own null sum of squares.
    const fFit = (sc.ssr - full.ssr) / (full.ssr / (full.rows - full.theta.length));
    expect(sc.statistic / fFit).toBeGreaterThan(0.7);
    expect(sc.statistic / fFit).toBeLessThan(1.4);
    const oneStep = sc.oneStep.c!;
    expect(Math.abs(oneStep.value - full.parameters.c!.value)).toBeLessThan(2 * oneStep.standardError);
  }, 300_000);
});

describe('the score test at a fit of the streamed linear kernel', () => {
  it('takes one kernel pass and agrees with the simulator secants (Coulomb friction, drag, heating, each small)', () => {
    // Small effects (invented): Tc 0.4 mN·m (≈ 4 % of the running torque), drag at ≈ 5 % of the
    // viscous torque at the top speed, a 0.5 K rise over the run (Rth 2 K/W, τ 0.5 s).
    const rec = [loggedPrbs({ ...MOTOR, Tc: 4e-4, Ts: 4e-4, cd: 2e-9, Rth: 2, Cth: 0.25 }, 213)];
    const fit = fitMotor(rec);
    const noise = fit.recordings.map((r) => Object.fromEntries(r.channels.filter((x) => x.sigma > 0).map((x) => [x.channel, x.sigma])));
    const opts = { warmStart: fit, noise, reweight: false };
    const kernel = scoreMotorExtensions(rec, opts, ['coulomb', 'drag', 'heating']);
    // A copy of the fit is not the kernel's own fit object, so this one runs the hybrid simulator.
    const secant = scoreMotorExtensions(rec, { ...opts, warmStart: { ...fit } }, ['coulomb', 'drag', 'heating']);
    for (const e of ['coulomb', 'drag', 'heating'] as const) {
      const a = kernel[e]!, b = secant[e]!;
      expect(a.simulations, e).toBe(1);
      expect(b.simulations, e).toBeGreaterThan(1);
      expect(a.df1, e).toBe(b.df1);
      expect(a.rows, e).toBe(b.rows);
      // Each finds its effect (F in the hundreds to thousands here) …
      expect(a.statistic, e).toBeGreaterThan(50);
      // … and the two columns agree: 0.3 % apart on this record (the kernel holds the effect
      // inputs over each interval, the simulator integrates them); 5 % allowed, and one-step values within 0.1 SE (tolerances of ours, no source).
      expect(a.statistic / b.statistic, e).toBeGreaterThan(0.95);
      expect(a.statistic / b.statistic, e).toBeLessThan(1.05);
      for (const [name, x] of Object.entries(a.oneStep)) {
        expect(Math.abs(x.value - b.oneStep[name]!.value), `${e} ${name}`).toBeLessThan(0.1 * x.standardError);
        expect(x.standardError / b.oneStep[name]!.standardError, `${e} ${name}`).toBeCloseTo(1, 1);
      }
    }
  }, 300_000);
});

describe('the score test at a lumped fit of a recording without a current channel', () => {
  it('takes the generic rows: quiet on a clean motor, finds drag that is there', () => {
    const speedOnly = (p: DetailedParams, seed: number): MotorRecordingInput[] => {
      const full = loggedPrbs(p, seed);
      const { current: _drop, ...channels } = full.recording.channels as Record<string, Float64Array>;
      return [{ ...full, recording: { ...full.recording, channels } }];
    };
    const score = (rec: MotorRecordingInput[]) => {
      // Speed alone shows R only with J and b: R pinned, as a test engineer would from a locked-rotor run.
      const fit = fitMotor(rec, { fix: { R: MOTOR.R } });
      const noise = fit.recordings.map((r) => Object.fromEntries(r.channels.filter((x) => x.sigma > 0).map((x) => [x.channel, x.sigma])));
      return scoreMotorExtensions(rec, { warmStart: fit, noise, reweight: false, fix: { R: MOTOR.R } }, ['coulomb', 'drag']);
    };
    const clean = score(speedOnly(MOTOR, 215));
    const dragged = score(speedOnly({ ...MOTOR, cd: 1.3e-8 }, 216));
    for (const s of [clean.coulomb!, clean.drag!, dragged.drag!]) expect(s.simulations).toBe(1);
    // F(1, ∞) exceeds 10.83 with probability 0.001 under the null (χ²₁ table).
    expect(clean.coulomb!.statistic).toBeLessThan(10.83);
    expect(clean.drag!.statistic).toBeLessThan(10.83);
    // Drag at 30 % of the viscous torque at the top speed: F 47.6 on this record (p < 1e-10).
    expect(dragged.drag!.statistic).toBeGreaterThan(20);
  }, 300_000);
});
