import { describe, it, expect } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { formatRecordingCsv, generateRecording, prbsBits } from '../index.js';
import type { ExperimentKind } from '../index.js';

const motor = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 }; // FACTS.md §5 motor (invented)
const col = (r: ReturnType<typeof generateRecording>, name: string) => r.columns.find((c) => c.name === name)!.values;

describe('generateRecording', () => {
  it('is deterministic for a seed and differs between seeds', () => {
    const o = { noise: { current: 0.01, speed: 0.5, voltage: 0.05 }, seed: 11 };
    const a = generateRecording(motor, 'step', o), b = generateRecording(motor, 'step', o);
    const c = generateRecording(motor, 'step', { ...o, seed: 12 });
    expect(Array.from(col(a, 'current'))).toEqual(Array.from(col(b, 'current')));
    expect(col(a, 'current')[500]).not.toBe(col(c, 'current')[500]);
  });
  it('adds noise with the requested σ (sample std within 3 % for 10⁴+ samples; 3 % ≈ 3·1/√(2n), derived here)', () => {
    const sigma = { voltage: 0.05, current: 0.02, speed: 0.7 };
    const clean = generateRecording(motor, 'prbs', { seed: 3 });
    const noisy = generateRecording(motor, 'prbs', { seed: 3, noise: sigma });
    for (const [name, s] of Object.entries(sigma)) {
      const a = col(noisy, name), b = col(clean, name);
      expect(a.length).toBeGreaterThan(10000);
      let m = 0;
      for (let k = 0; k < a.length; k++) m += a[k]! - b[k]!;
      m /= a.length;
      let ss = 0;
      for (let k = 0; k < a.length; k++) ss += (a[k]! - b[k]! - m) ** 2;
      expectClose(Math.sqrt(ss / (a.length - 1)), s, { rel: 0.03 }, `σ ${name}`);
    }
    // the commanded input in the truth stays clean
    expect(Array.from(noisy.truth.input.voltage)).toEqual(Array.from(col(clean, 'voltage')));
  });
  it.each(['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'] as ExperimentKind[])(
    '%s produces finite columns and a truth sidecar labelled invented',
    (kind) => {
      const r = generateRecording(motor, kind, { seed: 5 });
      expect(r.columns[0]!.name).toBe('time');
      for (const c of r.columns) for (const x of c.values) expect(Number.isFinite(x)).toBe(true);
      expect(r.truth.provenance).toMatch(/invented/);
      expect(r.truth.experiment).toBe(kind);
    },
  );
  it('locked-rotor current follows V/R·(1 − e^{−t/τe}) after the step; coast-down current is 0 after opening with voltage = Ke·ω', () => {
    const lr = generateRecording(motor, 'locked-rotor', { seed: 1 });
    const t = col(lr, 'time'), i = col(lr, 'current');
    const ts = lr.truth.input.eventTime!;
    const k = t.findIndex((x) => x >= ts + 5e-4 - 1e-12);
    const kOn = t.findIndex((x) => x >= ts - 1e-12);
    // derived here: 6·(1 − e^{−(t − t_on)/5e-4})
    expectClose(i[k]!, 6 * -Math.expm1(-(t[k]! - t[kOn]!) / 5e-4), { rel: 1e-12 }, 'locked-rotor i');
    const cd = generateRecording(motor, 'coast-down', { seed: 1 });
    const tc = col(cd, 'time'), ic = col(cd, 'current'), vc = col(cd, 'voltage'), wc = col(cd, 'speed');
    const ko = tc.findIndex((x) => x > cd.truth.input.eventTime! + 1e-3);
    expect(ic[ko]).toBe(0);
    expectClose(vc[ko]!, 0.05 * wc[ko]!, { rel: 1e-12 }, 'back-EMF');
  });
  it('logs encoder counts (integers) instead of speed, and a torque channel for the loaded run', () => {
    const r = generateRecording(motor, 'step', { encoderCounts: 2000, seed: 2 });
    expect(r.columns.map((c) => c.name)).toEqual(['time', 'voltage', 'current', 'position']);
    for (const x of col(r, 'position')) expect(Number.isInteger(x)).toBe(true);
    const l = generateRecording(motor, 'loaded', { seed: 2 });
    // default load = 25 % of stall torque = 0.075 N·m (derived here: 0.25·0.05·12/2)
    expectClose(col(l, 'torque')[10]!, 0.075, { rel: 1e-15 }, 'shaft torque');
  });
  it('rejects bad options with named messages', () => {
    expect(() => generateRecording(motor, 'spin' as ExperimentKind)).toThrow('generateRecording: experiment must be one of');
    expect(() => generateRecording(motor, 'step', { sampleRate: 0 })).toThrow('generateRecording: options.sampleRate must be a finite number > 0 (got 0)');
    expect(() => generateRecording(motor, 'step', { noise: { current: -1 } })).toThrow('options.noise.current must be >= 0 (got -1)');
    expect(() => generateRecording(motor, 'step', { timeJitter: 1e-3 })).toThrow('options.timeJitter must be >= 0 and < 0.25 sample interval');
  });
  it('jitters sample times but keeps them increasing', () => {
    const r = generateRecording(motor, 'step', { timeJitter: 1e-5, seed: 4 });
    const t = col(r, 'time');
    let off = 0;
    for (let k = 1; k < t.length; k++) { expect(t[k]!).toBeGreaterThan(t[k - 1]!); off = Math.max(off, Math.abs(t[k]! - k * 1e-4)); }
    expect(off).toBeGreaterThan(0);
  });
});

describe('formatRecordingCsv and prbsBits', () => {
  it('writes a header of `name [unit]` columns', () => {
    const r = generateRecording(motor, 'loaded', { duration: 0.001, seed: 1 });
    const csv = formatRecordingCsv(r.columns);
    const [header, first] = csv.split('\n');
    expect(header).toBe('time [s],voltage [V],current [A],speed [rad/s],torque [N·m]');
    expect(first!.split(',').length).toBe(5);
    expect(csv.split('\n').length).toBe(r.columns[0]!.values.length + 2);
  });
  it('rejects a unit with a bracket', () => {
    expect(() => formatRecordingCsv([{ name: 'x', unit: 'a]', values: new Float64Array(1) }])).toThrow('columns[0].unit');
  });
  it('the 9-bit LFSR has the maximal period 511 with 256 ones (a property of maximal-length sequences)', () => {
    const bits = prbsBits(1022);
    let ones = 0;
    for (let k = 0; k < 511; k++) { ones += bits[k]!; expect(bits[k + 511]).toBe(bits[k]); }
    expect(ones).toBe(256);
    for (const p of [1, 7, 73]) { // proper divisors of 511: the sequence must not repeat with them
      let differs = false;
      for (let k = 0; k < 511; k++) if (bits[k] !== bits[k + p]) differs = true;
      expect(differs).toBe(true);
    }
  });
});
