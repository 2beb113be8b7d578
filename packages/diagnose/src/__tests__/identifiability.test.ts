import { covarianceFromNormalMatrix } from '@motorprint/estimate';
import { describe, expect, it } from 'vitest';
import { fitMotor } from '@motorprint/estimate';
import { assessIdentifiability } from '../assessIdentifiability.js';
import { diagnoseFit } from '../diagnoseFit.js';
import { invented } from './inventedRecordings.js';
import type { RecordingDescription } from '../types.js';

// Descriptions of invented bench runs (no data needed: the verdicts read kinds, channels and dt).
const locked10k: RecordingDescription = { name: 'locked 10 kHz', kind: 'locked-rotor', channels: ['voltage', 'current'], sampleInterval: 1e-4 };
const prbsFull: RecordingDescription = { name: 'prbs', kind: 'prbs', channels: ['voltage', 'current', 'speed'], sampleInterval: 1e-4 };
const speedOnly1k: RecordingDescription = { name: 'step 1 kHz', kind: 'step', channels: ['voltage', 'speed'], sampleInterval: 1e-3 };
const coast: RecordingDescription = { name: 'coast', kind: 'coast-down', channels: ['voltage', 'speed'], sampleInterval: 1e-3 };
const byName = (v: ReturnType<typeof assessIdentifiability>): Record<string, (typeof v)[number]> => Object.fromEntries(v.map((x) => [x.name, x]));

describe('assessIdentifiability says which constants the recordings cannot inform, and why', () => {
  it('L from a 1 kHz speed-only log is not identifiable, and the reason compares τe with dt', () => {
    // FACTS.md §5 motor: τe = L/R = 1 mH / 2 Ω = 0.5 ms, half the 1 ms sample interval (derived here).
    const v = byName(assessIdentifiability(['L'], null, [speedOnly1k], { electricalTimeConstant: 5e-4 }));
    expect(v.L!.identifiable).toBe(false);
    expect(v.L!.reason).toContain('τe = 0.000500 s');
    expect(v.L!.reason).toContain('shorter than the sample interval dt = 0.00100 s');
    expect(v.L!.wouldInform).toContain('locked-rotor');
  });
  it('L from a current log sampled slower than τe/2 is not refused by a rule: the information at the optimum decides', () => {
    const slow: RecordingDescription = { ...locked10k, name: 'locked 1 kHz', sampleInterval: 1e-3 };
    const v = byName(assessIdentifiability(['R', 'L'], null, [slow], { electricalTimeConstant: 5e-4 }));
    expect(v.L!.identifiable).toBe(true);
    expect(v.R!.identifiable).toBe(true);
  });
  it('the exact discretisation pins L down from a locked-rotor step sampled at 2·τe (τe = 0.5 ms, 1 kHz)', () => {
    // FACTS.md §5 motor (τe = L/R = 0.5 ms, derived there); invented locked-rotor step at 1 kHz.
    const m = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };
    const rec = invented(m, 'locked-rotor', 7, { sampleRate: 1000, duration: 0.02 });
    const recs = [{ recording: rec, kind: 'locked-rotor' as const }];
    const d = diagnoseFit(fitMotor(recs), recs);
    expect(d.parameters.L!.identifiable, d.parameters.L!.reason).toBe(true);
    expect(Math.abs(d.parameters.L!.value! - 1e-3) / d.parameters.L!.standardError!).toBeLessThan(3);
  });
  it('J and Kt cannot be told apart without current or torque, and R is not informed without current', () => {
    const v = byName(assessIdentifiability(['R', 'Kt', 'J', 'b'], null, [speedOnly1k]));
    expect(v.Kt!.identifiable).toBe(false);
    expect(v.J!.identifiable).toBe(false);
    expect(v.J!.reason).toContain('Kt/J');
    expect(v.R!.identifiable).toBe(false);
    expect(v.R!.reason).toContain('no driven recording logs current');
    expect(v.R!.wouldInform).toContain('locked-rotor');
  });
  it('Kt apart from J needs a torque channel when Kt and Ke are fitted apart', () => {
    const v = byName(assessIdentifiability(['Kt', 'Ke', 'J'], null, [prbsFull]));
    expect(v.Kt!.identifiable).toBe(false);
    expect(v.Kt!.reason).toContain('torque');
    expect(v.Ke!.identifiable).toBe(true);
    const loaded: RecordingDescription = { name: 'loaded', kind: 'loaded', channels: ['voltage', 'current', 'speed', 'torque'], sampleInterval: 1e-4 };
    expect(assessIdentifiability(['Kt', 'Ke', 'J'], null, [prbsFull, loaded]).every((x) => x.identifiable)).toBe(true);
  });
  it('b and Tc from a coast-down alone are not identifiable (only b/J and Tc/J)', () => {
    const v = byName(assessIdentifiability(['b', 'Tc'], null, [coast]));
    expect(v.b!.identifiable).toBe(false);
    expect(v.b!.reason).toContain('b/J');
    expect(v.Tc!.identifiable).toBe(false);
    expect(v.Tc!.reason).toContain('Tc/J');
    // With a driven run that logs current the same constants are informed.
    expect(assessIdentifiability(['b', 'Tc'], null, [coast, prbsFull]).every((x) => x.identifiable)).toBe(true);
  });
  it('a locked-rotor and a PRBS run with current and speed inform every constant of the Kt = Ke model', () => {
    const v = assessIdentifiability(['R', 'L', 'Kt', 'J', 'b'], null, [locked10k, prbsFull], { electricalTimeConstant: 5e-4 });
    expect(v.filter((x) => !x.identifiable).map((x) => `${x.name}: ${x.reason}`)).toEqual([]);
    expect(v.every((x) => x.reason === '' && x.wouldInform === '')).toBe(true);
  });
  it('a rank-deficient covariance direction marks the parameters on it, even when the rules pass', () => {
    // JᵀJ = [[1, 2, 0], [2, 4, 0], [0, 0, 1]]: column 2 = 2·column 1, so R and L lie on a null
    // direction and J does not (derived here).
    const s = covarianceFromNormalMatrix(Float64Array.of(1, 2, 0, 2, 4, 0, 0, 0, 1), 3, 1, 20);
    const v = byName(assessIdentifiability(['R', 'L', 'J'], s, [locked10k, prbsFull]));
    expect(v.R!.identifiable).toBe(false);
    expect(v.R!.reason).toContain('rank-deficient');
    expect(v.L!.identifiable).toBe(false);
    expect(v.J!.identifiable).toBe(true);
  });
  it('rejects a non-positive sample interval, a bad τe and a summary of the wrong size, naming the path', () => {
    expect(() => assessIdentifiability(['R'], null, [{ ...locked10k, sampleInterval: 0 }])).toThrow('assessIdentifiability: recordings[0].sampleInterval must be > 0 (got 0)');
    expect(() => assessIdentifiability(['R'], null, [locked10k], { electricalTimeConstant: -1 })).toThrow('options.electricalTimeConstant must be > 0 (got -1)');
    const s = covarianceFromNormalMatrix(Float64Array.of(1), 1, 1, 5);
    expect(() => assessIdentifiability(['R', 'L'], s, [locked10k])).toThrow('summary.identifiable must have 2 entries');
  });
});
