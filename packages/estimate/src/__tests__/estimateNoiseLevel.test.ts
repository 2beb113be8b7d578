import { describe, expect, it } from 'vitest';
import { estimateNoiseLevel, keepsUnchanged, onceForUnchanged, shareUnchangedNoise } from '../motor/estimateNoiseLevel.js';
import { fitMotor } from '../motor/fitMotor.js';
import { sharePreparation } from '../motor/prepareRecording.js';

/** Deterministic standard normal draws (a small linear congruential generator and Box–Muller). */
function normals(n: number, start: number): Float64Array {
  let state = start >>> 0;
  const uniform = (): number => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return (state + 0.5) / 4294967296;
  };
  const out = new Float64Array(n);
  for (let k = 0; k < n; k++) out[k] = Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
  return out;
}

/** A slow sine with white noise of SD `sigma`, rounded to a grid of step `q` when q > 0. */
function channel(n: number, sigma: number, q: number, start: number): Float64Array {
  const e = normals(n, start);
  const x = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const v = Math.sin(k / 400) + sigma * e[k]!;
    x[k] = q > 0 ? Math.round(v / q) * q : v;
  }
  return x;
}

describe('estimateNoiseLevel', () => {
  it('recovers the SD of white noise on a smooth signal (long record, strided differences)', () => {
    const lvl = estimateNoiseLevel(channel(100_000, 0.02, 0, 7));
    expect(lvl.method).toBe('second-difference');
    expect(lvl.quantum).toBeNull();
    expect(lvl.sigma).toBeGreaterThan(0.02 * 0.97);
    expect(lvl.sigma).toBeLessThan(0.02 * 1.03);
  });

  it('finds the grid of quantised samples, and its q/√12 floor when the noise is below a code', () => {
    const q = 0.01;
    const noisy = estimateNoiseLevel(channel(60_000, 0.05, q, 11));
    expect(noisy.quantum).not.toBeNull();
    expect(Math.abs(noisy.quantum! - q)).toBeLessThan(1e-9);
    expect(noisy.sigma).toBeGreaterThan(0.05 * 0.95);
    expect(noisy.sigma).toBeLessThan(0.05 * 1.1);
    // Noise a tenth of a code: the rounding dominates, and σ is never below q/√12.
    const quiet = estimateNoiseLevel(channel(60_000, 0.001, q, 12));
    expect(Math.abs(quiet.quantum! - q)).toBeLessThan(1e-9);
    expect(quiet.sigma).toBeGreaterThanOrEqual(q / Math.sqrt(12) - 1e-15);
  });

  it('sees no grid in a two-level series, and gives σ = 0 for an exact two-level command', () => {
    const x = new Float64Array(5000);
    for (let k = 0; k < x.length; k++) x[k] = Math.floor(k / 500) % 2 === 0 ? 0 : 12;
    expect(estimateNoiseLevel(x)).toEqual({ sigma: 0, method: 'exact', quantum: null });
  });

  it('treats −0 and +0 as one value of a grid', () => {
    const q = 0.25;
    const x = channel(20_000, 0.3, q, 5);
    const flipped = Float64Array.from(x, (v) => (v === 0 ? -0 : v));
    expect(flipped.some((v) => Object.is(v, -0))).toBe(true);
    expect(estimateNoiseLevel(flipped)).toEqual(estimateNoiseLevel(Float64Array.from(x)));
  });

  it('answers again for the samples as they are now when the array was changed after an estimate', () => {
    const x = channel(50_000, 0.01, 0, 3);
    const first = estimateNoiseLevel(x);
    // Four times the noise on every sample: the new answer is that of the changed samples.
    const e = normals(x.length, 3);
    for (let k = 0; k < x.length; k++) x[k] = x[k]! + 0.03 * e[k]!;
    const second = estimateNoiseLevel(x);
    expect(second).toEqual(estimateNoiseLevel(Float64Array.from(x)));
    expect(second.sigma).toBeGreaterThan(3.5 * first.sigma);
    // One changed sample is enough to be seen.
    x[x.length >> 1] = 1e6;
    expect(estimateNoiseLevel(x)).toEqual(estimateNoiseLevel(Float64Array.from(x)));
  });

  it('inside sharePreparation shares the level of a prepared recording\'s channel by identity, and checks every other array as before', () => {
    const current = channel(40_000, 0.02, 0, 11);
    const time = Float64Array.from({ length: current.length }, (_, k) => 1e-4 * k);
    const voltage = Float64Array.from({ length: current.length }, (_, k) => (Math.floor(k / 4000) % 2 === 0 ? 6 : -6));
    const other = channel(40_000, 0.02, 0, 12);
    const alone = estimateNoiseLevel(Float64Array.from(current));
    sharePreparation(() => {
      fitMotor([{ recording: { time, channels: { voltage, current } }, kind: 'locked-rotor' }]);
      const first = estimateNoiseLevel(current);
      expect(first).toEqual(alone);
      // The contract is broken on purpose to show which arrays are trusted: the prepared channel's
      // level is the one estimated (by identity), while any other array is still compared sample by sample.
      const saved = Float64Array.from(current);
      for (let k = 0; k < current.length; k++) current[k] = 4 * current[k]!;
      expect(estimateNoiseLevel(Float64Array.from(current)).sigma).toBeGreaterThan(3.5 * alone.sigma);
      expect(estimateNoiseLevel(current)).toEqual(alone);
      current.set(saved);
      const o1 = estimateNoiseLevel(other);
      for (let k = 0; k < other.length; k++) other[k] = 4 * other[k]!;
      const o2 = estimateNoiseLevel(other);
      expect(o2).toEqual(estimateNoiseLevel(Float64Array.from(other)));
      expect(o2.sigma).toBeGreaterThan(3.5 * o1.sigma);
      // A caller changing the returned object does not change the next one.
      first.sigma = -1;
      expect(estimateNoiseLevel(current)).toEqual(alone);
    });
    // Outside it the prepared channel is checked again.
    for (let k = 0; k < current.length; k++) current[k] = 4 * current[k]!;
    expect(estimateNoiseLevel(current).sigma).toBeGreaterThan(3.5 * alone.sigma);
  });

  it('gives the same answer on a repeated call, and a caller changing the returned object does not change the next one', () => {
    const x = channel(30_000, 0.05, 0.001, 9);
    const a = estimateNoiseLevel(x);
    a.sigma = -1;
    a.quantum = 99;
    const b = estimateNoiseLevel(x);
    expect(b).toEqual(estimateNoiseLevel(Float64Array.from(x)));
    expect(b.sigma).toBeGreaterThan(0);
  });

  it('onceForUnchanged: computes once per name, arrays and numbers while the arrays are kept unchanged, and every time elsewhere', () => {
    const x = Float64Array.of(1, 2, 3), y = Float64Array.of(4, 5), other = Float64Array.of(1, 2, 3);
    let runs = 0;
    const segs = (k: number): { at: number }[] => onceForUnchanged('segs', [x, y], [k], () => { runs++; return [{ at: k }]; }, (v) => v.map((s) => ({ ...s })));
    segs(1);
    segs(1);
    expect(runs).toBe(2); // outside a scope: no sharing
    shareUnchangedNoise(() => {
      keepsUnchanged([x, y]);
      runs = 0;
      const first = segs(1);
      first[0]!.at = 99; // the caller's own copy
      const second = segs(1);
      expect(second).toEqual([{ at: 1 }]);
      second[0]!.at = 98; // a later caller's too
      expect(segs(1)).toEqual([{ at: 1 }]);
      expect(runs).toBe(1);
      segs(2); // other numbers
      segs(-0); // −0 is not 0
      segs(0);
      expect(runs).toBe(4);
      onceForUnchanged('segs', [x, other], [1], () => runs++, (v) => v); // an array not kept
      onceForUnchanged('segs', [x, other], [1], () => runs++, (v) => v);
      expect(runs).toBe(6);
      onceForUnchanged('segs', [y, x], [1], () => runs++, (v) => v); // other arrays, by identity and order
      onceForUnchanged('other', [x, y], [1], () => runs++, (v) => v); // another name
      expect(runs).toBe(8);
    });
    segs(1);
    expect(runs).toBe(9); // the scope has ended
  });

  it('rejects what is not a Float64Array and too few finite samples', () => {
    expect(() => estimateNoiseLevel([1, 2, 3] as unknown as Float64Array)).toThrow(TypeError);
    expect(() => estimateNoiseLevel(Float64Array.of(1, 2, NaN, NaN, NaN, NaN, NaN, NaN, 3))).toThrow(RangeError);
  });
});
