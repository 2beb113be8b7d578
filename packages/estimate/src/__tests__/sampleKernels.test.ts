/**
 * The preparation's WebAssembly passes (sampleKernels.wat) against the JavaScript they stand for:
 * the same bits (Object.is on every element), on random series with the things logs have —
 * repeats and grids, NaN and infinite gaps, signed zeros, odd lengths.
 */
import { firstDifference } from '@motorprint/testkit';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { differenceStats, differenceStatsKernel, gridStepKernel, gridStepPlain, sameSamples } from '../motor/estimateNoiseLevel.js';
import { channelStatsKernel, KERNEL_MIN_LENGTH, sampleKernels, sortInKernel, sortSpare, timeStatsKernel } from '../motor/sampleKernels.js';
import { medianInPlace, selectKth, selectKthPlain } from '../motor/selectKth.js';
import { medianInterval, medianIntervalPlain } from '../motor/medianInterval.js';
import { timeLine, timeLineKernel } from '../motor/nominalTimeGrid.js';
import { rmsDiff, rmsDiffPlain, segmentDifferences, segmentDifferencesKernel } from '../motor/rebuildCommand.js';
import { countSteps, countStepsKernel } from '../motor/detectEncoderSpeed.js';
import { headAndEndSums, largestMagnitude, segmentMisfit } from '../motor/classifyRecording.js';
import { fitMotor } from '../motor/fitMotor.js';
import { crossSums, crossSumsKernel, derivativeKernel, derivativePlain } from '../motor/guessConstants.js';
import { lowPassKernel, lowPassPlain, zeroPhaseLowPass } from '../motor/zeroPhaseLowPass.js';
import { bestSplit, detectVoltageSegments, jumps, jumpsKernel } from '../motor/detectVoltageSegments.js';

const SEED = 20261204;

/** Series of the lengths the kernels take, finite or with gaps. */
const sample = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }),
  fc.integer({ min: -40, max: 40 }).map((k) => k * 0.0125),
  fc.constantFrom(0, -0, 1e-300, -1e-300),
);
const finiteSeries = fc.array(sample, { minLength: KERNEL_MIN_LENGTH, maxLength: 1500 }).map((a) => Float64Array.from(a));
const gappySeries = fc
  .array(fc.oneof({ weight: 12, arbitrary: sample }, { weight: 1, arbitrary: fc.constantFrom(NaN, Infinity, -Infinity) }), { minLength: KERNEL_MIN_LENGTH, maxLength: 1500 })
  .map((a) => Float64Array.from(a));

/** Element-by-element Object.is (tells −0 from +0 and compares NaN with itself). */
const sameBits = (a: Float64Array, b: Float64Array): boolean => firstDifference(a, b) === -1;

describe('the sample kernels', () => {
  it('compile here (WebAssembly is part of every Node the package supports)', () => {
    expect(sampleKernels.room(8 * KERNEL_MIN_LENGTH)).not.toBeNull();
  });
  it('select: the same value and the same arrangement as the JavaScript selection', () => {
    fc.assert(
      fc.property(finiteSeries, fc.nat(), (x, at) => {
        const k = at % x.length;
        const viaKernel = Float64Array.from(x);
        const plain = Float64Array.from(x);
        expect(Object.is(selectKth(viaKernel, k), selectKthPlain(plain, k))).toBe(true);
        expect(sameBits(viaKernel, plain)).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
  it("the radix sort: the typed array's own order to the bit (−0 before +0, infinities, subnormals, repeats), and NaN left to it", () => {
    const wide = fc.oneof(sample, fc.double({ noNaN: true }), fc.constantFrom(Infinity, -Infinity, 5e-324, -5e-324, Number.MAX_VALUE));
    fc.assert(
      fc.property(fc.array(wide, { minLength: 0, maxLength: 1500 }), fc.nat({ max: 64 }), (a, offset) => {
        const x = Float64Array.from(a);
        const n = x.length;
        const room = sampleKernels.room(8 * (offset + n + sortSpare(n)))!;
        room.f64.set(x, offset);
        sortInKernel(room, offset, n, offset + n);
        expect(sameBits(room.f64.slice(offset, offset + n), Float64Array.from(x).sort())).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
    // A series with NaN: the kernel declines and leaves it as it was; sortInKernel then sorts it as the typed array does.
    const withNaN = Float64Array.from([3, NaN, -1, -0, 0, NaN, 2]);
    const room = sampleKernels.room(8 * (withNaN.length + sortSpare(withNaN.length)))!;
    room.f64.set(withNaN, 0);
    expect(room.exports.sortDoubles(0, withNaN.length, 8 * withNaN.length, 16 * withNaN.length)).toBe(1);
    expect(sameBits(room.f64.slice(0, withNaN.length), withNaN)).toBe(true);
    sortInKernel(room, 0, withNaN.length, withNaN.length);
    expect(sameBits(room.f64.slice(0, withNaN.length), Float64Array.from(withNaN).sort())).toBe(true);
    // Values that differ only in their lowest byte, and only in their highest: every pass is needed.
    const low = Float64Array.from({ length: 3000 }, (_, k) => 1 + ((k * 7919) % 3000) * Number.EPSILON);
    const r2 = sampleKernels.room(8 * (low.length + sortSpare(low.length)))!;
    r2.f64.set(low, 0);
    sortInKernel(r2, 0, low.length, low.length);
    expect(sameBits(r2.f64.slice(0, low.length), Float64Array.from(low).sort())).toBe(true);
  });
  it('the median interval: the same value as the JavaScript, on jittered, repeated, stalled and gappy clocks', () => {
    const clock = fc.tuple(fc.array(fc.oneof({ weight: 20, arbitrary: fc.double({ min: 1e-5, max: 2e-4, noNaN: true }) },
      { weight: 1, arbitrary: fc.constantFrom(0, -0, NaN, -1e-4, Infinity) }), { minLength: KERNEL_MIN_LENGTH, maxLength: 1500 }), fc.double({ min: -10, max: 10, noNaN: true }))
      .map(([steps, t0]) => { const t = new Float64Array(steps.length + 1); t[0] = t0; steps.forEach((h, k) => { t[k + 1] = t[k]! + h; }); return t; });
    fc.assert(
      fc.property(clock, (t) => {
        expect(Object.is(medianInterval(t), medianIntervalPlain(t))).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
    // A uniform clock goes through the kernel's selection (no zero or NaN step) and agrees too.
    const uniform = Float64Array.from({ length: 5000 }, (_, k) => k * 1e-4);
    expect(medianInterval(uniform)).toBe(medianIntervalPlain(uniform));
  });
  it('the noise level passes: the same finite count, quantum, deviations and MAD as the JavaScript', () => {
    fc.assert(
      fc.property(fc.oneof(finiteSeries, gappySeries), fc.integer({ min: 1, max: 7 }), (x, stride) => {
        const plain = differenceStats(x, stride);
        const kernel = differenceStatsKernel(x, stride)!;
        expect(kernel).not.toBeNull();
        expect(kernel.finite).toBe(plain.finite);
        expect(Object.is(kernel.quantum, plain.quantum)).toBe(true);
        expect(Object.is(kernel.mad, plain.mad)).toBe(true);
        expect(sameBits(kernel.deviations, plain.deviations)).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
  it('the noise level passes on series with no finite second difference, and a constant one', () => {
    const gaps = new Float64Array(KERNEL_MIN_LENGTH).fill(NaN);
    for (let k = 0; k < gaps.length; k += 3) gaps[k] = k;
    const constant = new Float64Array(KERNEL_MIN_LENGTH + 1).fill(2.5);
    for (const x of [gaps, constant]) {
      const plain = differenceStats(x, 1);
      const kernel = differenceStatsKernel(x, 1)!;
      expect([kernel.finite, kernel.quantum, kernel.mad]).toEqual([plain.finite, plain.quantum, plain.mad]);
      expect(sameBits(kernel.deviations, plain.deviations)).toBe(true);
    }
    expect(differenceStatsKernel(gaps, 1)!.mad).toBeNaN();
    expect(differenceStatsKernel(constant, 1)!.quantum).toBe(Infinity);
  });
  it('the grid step: the same step (or none) as the JavaScript, on grids with rounding in the file, off-grid values and gaps', () => {
    // Values on a grid of step q, printed with a few digits (so each gap is a whole number of q only
    // roughly), plus a share of values off the grid and of non-finite ones.
    const gridded = fc
      .record({
        q: fc.constantFrom(0.001, 0.0025, 0.01, 0.1, 1 / 3),
        digits: fc.integer({ min: 3, max: 12 }),
        codes: fc.array(fc.integer({ min: -60, max: 60 }), { minLength: KERNEL_MIN_LENGTH, maxLength: 1200 }),
        off: fc.array(fc.double({ noNaN: true, min: -1, max: 1 }), { maxLength: 40 }),
        gaps: fc.array(fc.constantFrom(NaN, Infinity, -Infinity), { maxLength: 5 }),
      })
      .map(({ q, digits, codes, off, gaps }) => Float64Array.from([...codes.map((c) => Number((c * q).toPrecision(digits))), ...off, ...gaps]));
    let grids = 0;
    fc.assert(
      fc.property(fc.oneof(gridded, finiteSeries), fc.integer({ min: 1, max: 5 }), (x, stride) => {
        const { quantum } = differenceStats(x, 1);
        if (!(quantum > 0 && Number.isFinite(quantum))) return;
        const step = gridStepPlain(x, quantum, stride);
        expect(Object.is(gridStepKernel(x, quantum, stride), step)).toBe(true);
        if (step > 0) grids++;
      }),
      { seed: SEED, numRuns: 400 },
    );
    expect(grids).toBeGreaterThan(40);
    // Some of those cases must find a grid, or the comparison above proves little.
    const q = 0.0025;
    const onGrid = Float64Array.from({ length: 600 }, (_, k) => Number((((k % 40) - 20) * q).toPrecision(6)));
    const quantum = differenceStats(onGrid, 1).quantum;
    expect(gridStepKernel(onGrid, quantum, 1)).toBeCloseTo(q, 12);
    expect(gridStepPlain(onGrid, quantum, 1)).toBeCloseTo(q, 12);
  });
  it('the median: the same value and arrangement through the kernel as by the JavaScript selection', () => {
    fc.assert(
      fc.property(finiteSeries, (x) => {
        const viaKernel = Float64Array.from(x);
        const plain = Float64Array.from(x);
        const h = plain.length >> 1;
        const hi = selectKthPlain(plain, h);
        let lo = -Infinity;
        for (let k = 0; k < h; k++) if (plain[k]! > lo) lo = plain[k]!;
        const expected = plain.length % 2 === 1 ? hi : 0.5 * (lo + hi);
        expect(Object.is(medianInPlace(viaKernel), expected)).toBe(true);
        expect(sameBits(viaKernel, plain)).toBe(true);
      }),
      { seed: SEED, numRuns: 200 },
    );
  });
  it("the time grid's line: the same slope, intercept, sum of squares and largest deviation", () => {
    // Jittered, rounded, drifting and gappy clocks.
    const clock = fc
      .record({
        n: fc.integer({ min: KERNEL_MIN_LENGTH, max: 3000 }),
        h: fc.constantFrom(1e-4, 1e-3, 0.01, 1 / 3),
        t0: fc.double({ noNaN: true, min: -10, max: 10 }),
        jitter: fc.double({ noNaN: true, min: 0, max: 0.3 }),
        digits: fc.integer({ min: 4, max: 17 }),
        hole: fc.option(fc.nat(), { nil: undefined }),
      })
      .map(({ n, h, t0, jitter, digits, hole }) => {
        const t = Float64Array.from({ length: n }, (_, k) => Number((t0 + k * h + jitter * h * Math.sin(7.3 * k)).toPrecision(digits)));
        if (hole !== undefined) t[hole % n] = NaN;
        return t;
      });
    fc.assert(
      fc.property(clock, (t) => {
        const plain = timeLine(t);
        const kernel = timeLineKernel(t)!;
        for (const key of ['h', 'a', 'ss', 'worst'] as const) expect(Object.is(kernel[key], plain[key]), key).toBe(true);
      }),
      { seed: SEED, numRuns: 200 },
    );
  });
  it('the within-segment differences: the same values, counted over the segments in order with a stride and a cap', () => {
    const cases = fc
      .record({
        v: finiteSeries,
        cuts: fc.array(fc.nat(), { maxLength: 12 }),
        stride: fc.integer({ min: 1, max: 5 }),
        capShare: fc.double({ noNaN: true, min: 0.2, max: 1.2 }),
      })
      .map(({ v, cuts, stride, capShare }) => {
        const bounds = [...new Set([0, ...cuts.map((c) => c % v.length), v.length])].sort((a, b) => a - b);
        const segs = bounds.slice(1).map((end, i) => ({ start: bounds[i]!, end, level: 0 }));
        let total = 0;
        for (const sg of segs) total += Math.max(sg.end - sg.start - 2, 0);
        return { v, segs, stride, cap: Math.max(1, Math.floor((capShare * total) / stride)) };
      });
    fc.assert(
      fc.property(cases, ({ v, segs, stride, cap }) => {
        expect(sameBits(segmentDifferencesKernel(v, segs, stride, cap)!, segmentDifferences(v, segs, stride, cap))).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
  it("the voltage segments' first pass and best split: the same prefix sums, starts and split points", () => {
    // Piecewise-constant voltages with noise, straddled switches and gaps.
    const command = fc
      .record({
        levels: fc.array(fc.double({ noNaN: true, min: -24, max: 24 }), { minLength: 1, maxLength: 12 }),
        run: fc.integer({ min: 20, max: 300 }),
        noise: fc.constantFrom(0, 1e-3, 0.05),
        gap: fc.option(fc.nat(), { nil: undefined }),
      })
      .map(({ levels, run, noise, gap }) => {
        const v = Float64Array.from({ length: Math.max(KERNEL_MIN_LENGTH, levels.length * run) }, (_, k) => levels[Math.floor(k / run) % levels.length]! + noise * Math.sin(12.9898 * k));
        if (gap !== undefined) v[gap % v.length] = NaN;
        return v;
      });
    fc.assert(
      fc.property(command, fc.constantFrom(1e-3, 0.05, 0.3), fc.nat(), fc.nat(), (v, jump, x, y) => {
        const plain = jumps(v, jump);
        const kernel = jumpsKernel(v, jump)!;
        expect(kernel.starts).toEqual(plain.starts);
        expect(sameBits(kernel.prefix, plain.prefix)).toBe(true);
        const a = x % v.length;
        const b = a + (y % (v.length - a + 1));
        for (const limit of [0, 1e-6, 36 * jump * jump]) expect(kernel.bestSplit(a, b, limit)).toBe(bestSplit(plain.prefix, a, b, limit));
      }),
      { seed: SEED, numRuns: 300 },
    );
    // And whole segmentations are those of the plain passes (checked on a clean three-level command).
    const v = Float64Array.from({ length: 600 }, (_, k) => (k < 200 ? 0 : k < 410 ? 6 : 2) + 0.01 * Math.sin(7 * k));
    expect(detectVoltageSegments(v, 0.01).map((s) => [s.start, s.end])).toEqual([[0, 200], [200, 410], [410, 600]]);
  });
  it("the encoder test's steps, their median and the largest magnitude: the same values and flags", () => {
    const clock = fc.array(fc.double({ noNaN: true, min: 1e-5, max: 2e-3 }), { minLength: KERNEL_MIN_LENGTH, maxLength: 1200 }).map((steps) => {
      const t = new Float64Array(steps.length);
      for (let k = 1; k < t.length; k++) t[k] = t[k - 1]! + steps[k]!;
      return t;
    });
    fc.assert(
      fc.property(clock, gappySeries, (t, w0) => {
        const w = Float64Array.from({ length: t.length }, (_, k) => w0[k % w0.length]!);
        const plain = countSteps(t, w);
        const mid = plain.d.length >> 1;
        // (The plain median first: its selection runs in the same kernel memory, which the kernel's d is a view of.)
        const plainMedian = !plain.nan && plain.d.length > 0 ? plain.select(mid) : NaN;
        const kernel = countStepsKernel(t, w)!;
        expect(kernel.nan).toBe(plain.nan);
        expect(Object.is(kernel.smallest, plain.smallest)).toBe(true);
        expect(sameBits(kernel.d, plain.d)).toBe(true);
        // The median step, selected inside the kernel's memory: the value of a selection on a copy,
        // and the steps still there after it (the encoder test reads them next).
        if (!plain.nan && plain.d.length > 0) {
          expect(Object.is(kernel.select(mid), plainMedian)).toBe(true);
          expect(sameBits(kernel.d, plain.d)).toBe(true);
        }
        let m = 0;
        for (let k = 0; k < w.length; k++) m = Math.max(m, Math.abs(w[k]!));
        expect(Object.is(largestMagnitude(w), m)).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
  it('the zero-phase low-pass: the same output for every order, cutoff and padding', () => {
    fc.assert(
      fc.property(gappySeries, fc.constantFrom(2, 4, 6, 8), fc.double({ noNaN: true, min: 0.001, max: 0.45 }), fc.nat(), (x, order, share, padAt) => {
        // Coefficients as zeroPhaseLowPass makes them (random but stable sections).
        const sections = order / 2;
        const wa = 2 * Math.tan(Math.PI * share);
        const coef = new Float64Array(5 * sections);
        for (let m = 0; m < sections; m++) {
          const q2 = 2 * Math.sin((Math.PI * (2 * m + 1)) / (2 * order));
          const a0 = 4 + 2 * q2 * wa + wa * wa;
          coef.set([(wa * wa) / a0, (2 * wa * wa) / a0, (wa * wa) / a0, (2 * wa * wa - 8) / a0, (4 - 2 * q2 * wa + wa * wa) / a0], 5 * m);
        }
        const pad = padAt % x.length;
        expect(sameBits(lowPassKernel(x, coef, pad)!, lowPassPlain(x, coef, pad))).toBe(true);
      }),
      { seed: SEED, numRuns: 200 },
    );
    // The public function takes the kernel for long series: a constant stays constant.
    expect(zeroPhaseLowPass(new Float64Array(5000).fill(3), 1e-4, 50)[2500]).toBeCloseTo(3, 9);
  });
  it("the recording check's passes: the same largest magnitude, sum and interval range, and null where a sample is bad", () => {
    fc.assert(
      fc.property(fc.oneof(finiteSeries, gappySeries), (x) => {
        let maxAbs = 0, sum = 0, finite = true;
        for (let k = 0; k < x.length && finite; k++) {
          const v = x[k]!;
          if (!Number.isFinite(v)) finite = false;
          const a = v < 0 ? -v : v;
          if (a > maxAbs) maxAbs = a;
          sum += v;
        }
        const got = channelStatsKernel(x);
        if (!finite) expect(got).toBeNull();
        else expect(Object.is(got!.maxAbs, maxAbs) && Object.is(got!.sum, sum)).toBe(true);
        // The instants: a running sum of |x| + 1e-9 is increasing unless x has a gap or a zero step.
        const t = new Float64Array(x.length);
        for (let k = 1; k < t.length; k++) t[k] = t[k - 1]! + Math.abs(x[k]!) * 1e-3;
        let hmin = Infinity, hmax = 0, ok = true;
        for (let k = 1; k < t.length && ok; k++) {
          const d = t[k]! - t[k - 1]!;
          if (!Number.isFinite(t[k]!) || !(d > 0)) ok = false;
          else { if (d < hmin) hmin = d; if (d > hmax) hmax = d; }
        }
        const spacing = timeStatsKernel(t);
        if (!ok) expect(spacing).toBeNull();
        else expect(Object.is(spacing!.hmin, hmin) && Object.is(spacing!.hmax, hmax)).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
  it('a long recording with a bad sample still gets the message that names it (the kernel passes defer to the loops)', () => {
    const n = 2000;
    const time = Float64Array.from({ length: n }, (_, k) => k * 1e-3);
    const current = Float64Array.from({ length: n }, (_, k) => Math.sin(k / 50));
    const voltage = Float64Array.from({ length: n }, (_, k) => (k < 100 ? 0 : 6));
    current[1234] = NaN;
    expect(() => fitMotor([{ recording: { time, channels: { voltage, current } } }])).toThrow('fitMotor: recordings[0].recording.channels.current[1234] must be finite (got NaN)');
    current[1234] = 0;
    time[700] = time[699]!;
    expect(() => fitMotor([{ recording: { time, channels: { voltage, current } } }])).toThrow(`fitMotor: recordings[0].recording.time must be strictly increasing (time[700] = ${time[700]} after ${time[699]})`);
  });
  it("the guesses' normal equations: the same sums from typed and plain arrays", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4 }), fc.oneof(finiteSeries, gappySeries), fc.boolean(), (p, y, plainArrays) => {
        const n = y.length;
        const cols: ArrayLike<number>[] = Array.from({ length: p }, (_, j) => {
          const c = Float64Array.from({ length: n + j }, (_, k) => y[(k * (j + 3)) % n]! * (j + 0.5) + Math.cos(k));
          return plainArrays && j % 2 === 1 ? Array.from(c) : c;
        });
        const plain = crossSums(cols, y);
        const kernel = crossSumsKernel(cols, y)!;
        expect(sameBits(kernel.A, plain.A) && sameBits(kernel.b, plain.b)).toBe(true);
        for (const h of [1e-4, 0.3]) expect(sameBits(derivativeKernel(y, h)!, derivativePlain(y, h))).toBe(true);
      }),
      { seed: SEED, numRuns: 200 },
    );
  });
  it("the classification's sums: the same misfit over the voltage segments and the same head and end sums", () => {
    const segmentsOf = fc.array(fc.nat({ max: 400 }), { minLength: 0, maxLength: 12 });
    fc.assert(
      fc.property(fc.oneof(finiteSeries, gappySeries), gappySeries, segmentsOf, fc.double({ noNaN: true, min: -50, max: 50 }), (v, w0, cuts, level) => {
        const n = v.length;
        // Segments in order over [0, n), the last cut at n, with levels that are and are not the data's.
        const ends = [...new Set(cuts.map((c) => Math.min(n, c * 3)))].sort((a, b) => a - b).filter((e) => e > 0);
        if (ends[ends.length - 1] !== n) ends.push(n);
        const segs = ends.map((end, j) => ({ start: j === 0 ? 0 : ends[j - 1]!, end, level: j % 2 ? level : v[ends[j - 1] ?? 0]! }));
        expect(Object.is(segmentMisfit(v, segs), segmentMisfit(v, segs, false))).toBe(true);
        const w = Float64Array.from({ length: n }, (_, k) => w0[k % w0.length]!);
        const tail = Math.max(KERNEL_MIN_LENGTH, Math.floor(n / 2));
        const a = headAndEndSums(v, w, n, tail);
        const b = headAndEndSums(v, w, n, tail, false);
        for (const key of ['head', 'end', 'endSq', 'endSpeed'] as const) expect(Object.is(a[key], b[key]), key).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
    // The comparison sees a change: one sample off by an ulp changes the misfit of its segment.
    const v = Float64Array.from({ length: 1000 }, (_, k) => (k < 500 ? 1 : 3) + 1e-3 * Math.sin(k));
    const segs = [{ start: 0, end: 500, level: 1 }, { start: 500, end: 1000, level: 3 }];
    const before = segmentMisfit(v, segs);
    v[700] = v[700]! * (1 + 2 ** -52);
    expect(Object.is(segmentMisfit(v, segs), before)).toBe(false);
    expect(Object.is(segmentMisfit(v, segs), segmentMisfit(v, segs, false))).toBe(true);
  });
  it('dot (the trimmed RMS sum) and the memo\'s bit-for-bit comparison', () => {
    fc.assert(
      fc.property(fc.oneof(finiteSeries, gappySeries), fc.nat(), (x, at) => {
        const n = x.length;
        const room = sampleKernels.room(16 * n)!;
        room.f64.set(x, 0);
        let q = 0;
        for (let k = 0; k < n; k++) q += x[k]! * x[k]!;
        expect(Object.is(room.exports.dot(0, 0, n), q)).toBe(true);
        const shifted = Float64Array.from(x, (v, k) => v * 0.75 + Math.sin(k));
        expect(Object.is(rmsDiff(x, shifted), rmsDiffPlain(x, shifted))).toBe(true);
        const y = Float64Array.from(x);
        expect(sameSamples(x, y)).toBe(true);
        // One word changed: a sign, a NaN payload, or one bit of the mantissa.
        const k = at % n;
        const bits = new BigUint64Array(y.buffer);
        bits[k] = bits[k]! ^ (1n << BigInt(at % 64));
        expect(sameSamples(x, y)).toBe(false);
        expect(sameSamples(x, y.subarray(1))).toBe(false);
      }),
      { seed: SEED, numRuns: 200 },
    );
  });
});
