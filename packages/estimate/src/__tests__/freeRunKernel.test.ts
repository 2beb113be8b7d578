/**
 * The WebAssembly free-run passes (motor/freeRunKernel.ts) against the JavaScript loops of
 * sweepLinearModel they stand for: on random specs (odd lengths, chunk strides that put the
 * accumulation points anywhere, absent channels, level classes or a per-sample input, residual
 * series kept or not, a stuck start, non-finite measurements and inputs) every buffer, the state,
 * the residual series and the accumulated normal equations must be the same bits; and whole fits
 * must give the same result to the bit with the kernels on and off.
 */
import { firstDifference } from '@motorprint/testkit';
import fc from 'fast-check';
import { afterEach, describe, expect, it } from 'vitest';
import { releaseKernelMemory } from '@motorprint/model/kernels';
import { useKernels } from '../estimateKernels.js';
import { KERNEL_MIN_LENGTH } from '../estimateKernels.js';
import { freeRunInKernel, kernelRuns } from '../motor/freeRunKernel.js';
import { fitMotor, scoreMotorExtensions } from '../motor/fitMotor.js';
import { sweepLinearModel } from '../motor/sweepLinearModel.js';
import type { SweepBuffers, SweepSpec } from '../motor/sweepLinearModel.js';
import { accumulateNormalEquations } from '../solver/accumulateNormalEquations.js';
import { createNormalEquations } from '../solver/createNormalEquations.js';
import { INVENTED_MOTORS, invented } from './motorFixtures.js';
import { expectSameNormalEquations } from './sameNormalEquations.js';

afterEach(() => { useKernels.on = true; });


/** A small deterministic generator (the property gives the seed). */
function generator(seed: number): () => number {
  let x = seed >>> 0 || 1;
  return () => { x ^= x << 13; x >>>= 0; x ^= x >>> 17; x ^= x << 5; x >>>= 0; return x / 2 ** 32; };
}

interface Case { n: number; st: number; hasI: boolean; hasW: boolean; levels: boolean; keep: boolean; wantJ: boolean; acc: boolean; stuck: boolean; tied: boolean; effects: boolean; jitter: boolean; basis: boolean; odd: number; seed: number }

const cases = fc.record({
  n: fc.integer({ min: KERNEL_MIN_LENGTH, max: 5000 }),
  st: fc.integer({ min: 1030, max: 3000 }),
  hasI: fc.boolean(), hasW: fc.boolean(), levels: fc.boolean(), keep: fc.boolean(), wantJ: fc.boolean(), acc: fc.boolean(),
  stuck: fc.boolean(), tied: fc.boolean(), effects: fc.boolean(), jitter: fc.boolean(), basis: fc.boolean(), odd: fc.integer({ min: 0, max: 3 }), seed: fc.integer(),
}).filter((c) => (c.hasI || c.hasW) && !(c.effects && c.stuck));

/** Buffers and spec of a random case (p free columns + the sink, columns placed at random, some in the sink). */
function setUp(c: Case): { b: SweepBuffers; s: SweepSpec } {
  const rnd = generator(c.seed);
  const { n, st } = c;
  const p = 3 + Math.floor(rnd() * 8);
  // Columns: p free ones, (score pass) four effect columns, then the sink.
  const sink = c.effects ? p + 4 : p;
  const colIdx = Array.from({ length: 9 }, () => (rnd() < 0.15 ? sink : Math.floor(rnd() * p)));
  const R = 0.5 + rnd(), L = 1e-3 * (0.5 + rnd()), Kt = 0.03 + 0.05 * rnd(), Ke = c.tied ? Kt : 0.03 + 0.05 * rnd();
  const J = 2e-5 * (0.5 + rnd()), bb = 1e-5 * (0.5 + rnd()), h = 1e-4 * (0.5 + rnd());
  // Times as a logger writes them (intervals differing in their last bits), or with a few odd intervals.
  const time = Float64Array.from({ length: n }, (_, k) => k * h);
  if (c.jitter) for (let j = 0; j < 3; j++) time[1 + Math.floor(rnd() * (n - 1))]! += h * 0.1 * rnd();
  const odd = [NaN, Infinity, -Infinity, -0, 1e300][Math.floor(rnd() * 5)]!;
  const noisy = (scale: number): Float64Array => {
    const a = Float64Array.from({ length: n }, () => scale * (rnd() - 0.5));
    for (let j = 0; j < c.odd; j++) a[Math.floor(rnd() * n)] = odd;
    return a;
  };
  const nLevels = 2 + Math.floor(rnd() * 3);
  const levels = Float64Array.from({ length: nLevels }, () => 24 * (rnd() - 0.5));
  const cls = c.levels ? Int32Array.from({ length: n }, () => Math.floor(rnd() * nLevels)) : null;
  // Fitted class levels: their sensitivities go to columns of their own (or anywhere, overlaps included).
  const m = c.levels && c.basis ? nLevels : 0;
  const colU = Int32Array.from({ length: m }, () => Math.floor(rnd() * p) * st);
  const b: SweepBuffers = {
    st, r: new Float64Array(st).map(() => rnd()), jac: new Float64Array((sink + 1) * st), sink, rows: 0,
    acc: c.acc ? createNormalEquations(sink) : null, wantJ: c.wantJ,
    mats: new Float64Array(56), work: new Float64Array(128), slot: new Float64Array(56), slot2: new Float64Array(56),
    x: new Float64Array(16), su: new Float64Array(2 * nLevels), phi: new Float64Array(nLevels),
    effects: c.effects ? { col: p, tau: 0.01 + rnd(), copper: 234.5 + 20 * rnd(), state: new Float64Array(10) } : null,
  };
  const s: SweepSpec = {
    n, time, h, mi: c.hasI ? noisy(20) : null, mw: c.hasW ? noisy(400) : null, sI: 1 / (0.01 + rnd()), sW: 1 / (0.1 + rnd()),
    outI: c.keep && c.hasI ? new Float64Array(n).fill(NaN) : null, outW: c.keep && c.hasW ? new Float64Array(n).fill(NaN) : null,
    off: 0.1 * (rnd() - 0.5), tau: c.stuck ? 0.002 : 0.001 * (rnd() - 0.5), col: Int32Array.from(colIdx, (j) => j * st),
    tcW: rnd() - 0.5, ldW: rnd(), offW: rnd(), input: noisy(24), cls, levels, basis: m > 0 ? 1 : 0, m, beta: new Float64Array(nLevels),
    colU, uScale: 0.5 + rnd(), omega: new Float64Array(0), stuck: c.stuck, direction: 1, load: 0.001, Tc: c.stuck ? 0.001 : 0,
    R, L, Kt, Ke, J, b: bb, tied: c.tied,
  };
  return { b, s };
}

describe('the WebAssembly free-run passes', () => {
  it('leave buffers, state, residual series and normal equations as the JavaScript loops do, to the bit', () => {
    let taken = 0, free = 0;
    fc.assert(fc.property(cases, (c) => {
      const js = setUp(c), wasm = setUp(c);
      useKernels.on = false;
      sweepLinearModel(js.b, js.s);
      useKernels.on = true;
      const before = kernelRuns.count;
      sweepLinearModel(wasm.b, wasm.s);
      // Without a stuck start the whole record is one free run, which the kernel must take (a
      // silent fallback would compare the loops with themselves).
      if (!c.stuck && !(c.effects && c.wantJ && !(c.hasI && c.hasW))) { free++; expect(kernelRuns.count).toBe(before + 1); }
      taken += kernelRuns.count - before;
      expect(wasm.b.rows).toBe(js.b.rows);
      expect(firstDifference(wasm.b.r, js.b.r)).toBe(-1);
      expect(firstDifference(wasm.b.jac, js.b.jac)).toBe(-1);
      expect(firstDifference(wasm.b.x, js.b.x)).toBe(-1);
      expect(firstDifference(wasm.b.su, js.b.su)).toBe(-1);
      if (c.effects) expect(firstDifference(wasm.b.effects!.state, js.b.effects!.state)).toBe(-1);
      expect(firstDifference(wasm.s.outI, js.s.outI)).toBe(-1);
      expect(firstDifference(wasm.s.outW, js.s.outW)).toBe(-1);
      if (js.b.acc !== null) {
        expectSameNormalEquations(wasm.b.acc!, js.b.acc);
      }
    }), { numRuns: 200 });
    expect(taken).toBeGreaterThanOrEqual(free);
    expect(taken).toBeGreaterThan(free);
  });

  it('take the run when they apply and decline it otherwise (so the comparison above tests the kernels)', () => {
    const c: Case = { n: 600, st: 1100, hasI: true, hasW: true, levels: false, keep: false, wantJ: true, acc: true, stuck: false, tied: false, effects: false, jitter: false, basis: false, odd: 0, seed: 5 };
    const { b, s } = setUp(c);
    expect(freeRunInKernel(b, s, 0, s.n)).toBe(true);
    expect(b.rows).toBeGreaterThan(0);
    const short = setUp({ ...c, n: KERNEL_MIN_LENGTH - 1 });
    expect(freeRunInKernel(short.b, short.s, 0, short.s.n)).toBe(false);
    useKernels.on = false;
    expect(freeRunInKernel(b, s, 0, s.n)).toBe(false);
    useKernels.on = true;
    // Effect columns on a time base with more distinct intervals than the kernel tabulates: declined.
    const jittery = setUp({ ...c, effects: true });
    for (let k = 1; k < jittery.s.n; k++) jittery.s.time[k] = jittery.s.time[k - 1]! + 1e-4 * (1 + k / 1e4);
    const before = Float64Array.from(jittery.b.jac);
    expect(freeRunInKernel(jittery.b, jittery.s, 0, jittery.s.n)).toBe(false);
    expect(firstDifference(jittery.b.jac, before)).toBe(-1);
    expect(jittery.b.rows).toBe(0);
    // With few distinct intervals it takes the run.
    const regular = setUp({ ...c, effects: true });
    expect(freeRunInKernel(regular.b, regular.s, 0, regular.s.n)).toBe(true);
  });

  it('keep the series between the sweeps of one problem only while nothing else wrote over them', () => {
    fc.assert(fc.property(cases, fc.integer({ min: 0, max: 2 }), (c, between) => {
      const js = setUp(c), wasm = setUp(c);
      const sweepTwice = (x: { b: SweepBuffers; s: SweepSpec }, on: boolean): void => {
        useKernels.on = on;
        for (let rep = 0; rep < 2; rep++) {
          if (x.b.wantJ) x.b.jac.fill(0);
          x.b.rows = 0;
          if (x.b.acc !== null) x.b.acc.high.fill(0);
          sweepLinearModel(x.b, x.s);
          // Between the sweeps: nothing, a small chunk sum (below the kept series) or a large one (over them).
          if (on && between > 0) accumulateNormalEquations(createNormalEquations(3), new Float64Array(between === 1 ? 100 : 50_000).fill(1), new Float64Array(3 * (between === 1 ? 100 : 50_000)).fill(2), between === 1 ? 100 : 50_000);
          // The second sweep at other measurements of the same arrays would be a caller's change: not done inside a problem.
        }
      };
      sweepTwice(js, false);
      sweepTwice(wasm, true);
      expect(firstDifference(wasm.b.r, js.b.r)).toBe(-1);
      expect(firstDifference(wasm.b.jac, js.b.jac)).toBe(-1);
      expect(firstDifference(wasm.b.x, js.b.x)).toBe(-1);
      expect(firstDifference(wasm.s.outI, js.s.outI)).toBe(-1);
      expect(firstDifference(wasm.s.outW, js.s.outW)).toBe(-1);
      if (js.b.acc !== null) expect(firstDifference(wasm.b.acc!.high, js.b.acc.high)).toBe(-1);
    }), { numRuns: 60 });
    // A new problem on arrays of the same identity but changed contents copies them again.
    const c: Case = { n: 700, st: 1100, hasI: true, hasW: true, levels: false, keep: true, wantJ: false, acc: true, stuck: false, tied: false, effects: false, jitter: false, basis: false, odd: 0, seed: 9 };
    const first = setUp(c);
    sweepLinearModel(first.b, first.s);
    const again = setUp(c);
    again.s.mi = first.s.mi; again.s.mw = first.s.mw; again.s.input = first.s.input;
    first.s.mi![5] = 123; first.s.input[7] = -4;
    const reference = setUp(c);
    reference.s.mi = first.s.mi; reference.s.mw = first.s.mw; reference.s.input = first.s.input;
    sweepLinearModel(again.b, again.s);
    useKernels.on = false;
    sweepLinearModel(reference.b, reference.s);
    expect(firstDifference(again.s.outI, reference.s.outI)).toBe(-1);
    expect(firstDifference(again.b.acc!.high, reference.b.acc!.high)).toBe(-1);
    // The kernels let go of their memories between two sweeps of one problem (the same arrays): the
    // kept series went with the memory and are copied in again.
    const released = setUp(c), plain = setUp(c);
    useKernels.on = true;
    sweepLinearModel(released.b, released.s);
    releaseKernelMemory();
    released.b.rows = 0; released.b.acc!.high.fill(0);
    sweepLinearModel(released.b, released.s);
    useKernels.on = false;
    for (let rep = 0; rep < 2; rep++) { plain.b.rows = 0; plain.b.acc!.high.fill(0); sweepLinearModel(plain.b, plain.s); }
    expect(firstDifference(released.s.outI, plain.s.outI)).toBe(-1);
    expect(firstDifference(released.b.acc!.high, plain.b.acc!.high)).toBe(-1);
    // One problem's buffers serve all its recordings: a second recording (other arrays, same length) is copied in.
    const two = (on: boolean): Float64Array => {
      useKernels.on = on;
      const rec1 = setUp(c), rec2 = setUp({ ...c, seed: 10 });
      rec2.s.outI = rec1.s.outI; rec2.s.mw = rec1.s.mw; rec2.s.input = rec1.s.input; // only the current differs
      for (const x of [rec1.s, rec2.s, rec1.s]) { rec1.b.rows = 0; sweepLinearModel(rec1.b, x); }
      return Float64Array.from([...rec1.b.acc!.high, ...rec1.s.outI!]);
    };
    expect(firstDifference(two(true), two(false))).toBe(-1);
  });

  it('give the same fit and score tests, to the bit, as the JavaScript loops (locked rotor, step and prbs of an invented motor)', () => {
    const m = INVENTED_MOTORS[Object.keys(INVENTED_MOTORS)[0]!]!;
    const recs = (['locked-rotor', 'step', 'prbs'] as const).map((kind) => ({ recording: invented(m, kind, 3), kind, name: kind }));
    const text = (x: unknown): string =>
      JSON.stringify(x, (_k, v: unknown) => (ArrayBuffer.isView(v) ? Array.from(v as Float64Array, String) : typeof v === 'number' ? String(Object.is(v, -0) ? '-0' : v) : v));
    const fitWith = (on: boolean): string => {
      useKernels.on = on;
      const fit = fitMotor(recs, { keepResiduals: true });
      // The score pass at that fit (the effect columns of the sweep).
      const before = kernelRuns.count;
      const scores = scoreMotorExtensions(recs, { warmStart: fit }, ['drag', 'heating']);
      expect(scores.drag).not.toBe(null);
      if (on) expect(kernelRuns.count).toBeGreaterThan(before);
      return text({ fit, scores });
    };
    const viaLoops = fitWith(false);
    const viaKernels = fitWith(true);
    expect(viaKernels.length).toBeGreaterThan(1000);
    expect(viaKernels === viaLoops).toBe(true);
    // The same recordings (the same arrays) again after the kernels let go of their memories: the
    // series kept from the last problem are gone, and must be copied in afresh.
    releaseKernelMemory();
    expect(fitWith(true) === viaLoops).toBe(true);
  });
});
