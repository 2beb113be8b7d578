import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { downsampleMinMax } from '../downsampleMinMax.js';
import { formatNumber } from '../formatNumber.js';
import { niceTicks } from '../niceTicks.js';
import { operatingCurve } from '../operatingCurve.js';
import { svgLinePlot } from '../svgLinePlot.js';

describe('niceTicks', () => {
  it('steps by 1, 2 or 5 × 10ⁿ and covers the range (Heckbert 1990 labelling)', () => {
    // Worked by hand (derived here): range 0.974 → nice 1, step 1/4 → 0.2.
    expect(niceTicks(0.013, 0.987).ticks).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    // Range 1.11e-4 → nice 2e-4, step 5e-5 (derived here).
    expect(niceTicks(-3.2e-5, 7.9e-5).ticks).toEqual([-5e-5, 0, 5e-5, 1e-4]);
    // Range 0.3 → nice 0.5, step 0.125 rounds to 0.1; 0.1·3 prints as 0.3, not 0.30000000000000004 (derived here).
    expect(niceTicks(0, 0.3).ticks).toEqual([0, 0.1, 0.2, 0.3]);
    // −1e-17 (a rounding zero) does not open a whole extra interval.
    expect(niceTicks(-1e-17, 300).ticks[0]).toBe(0);
  });

  it('widens a zero-width range and returns nothing for non-finite input', () => {
    // [5, 5] widens to [2.5, 7.5]: range 5, step 1.25 → 1, ends floor 2 and ceil 8 (derived here).
    expect(niceTicks(5, 5).ticks).toEqual([2, 3, 4, 5, 6, 7, 8]);
    expect(niceTicks(NaN, 1).ticks).toEqual([]);
  });
});

describe('downsampleMinMax', () => {
  it('keeps the minimum and maximum of each column in order, so spikes survive', () => {
    const n = 10_000;
    const x = new Float64Array(n), y = new Float64Array(n);
    for (let k = 0; k < n; k++) { x[k] = k; y[k] = Math.sin(k / 300); }
    y[4321] = 50; // a one-sample spike
    y[7000] = -50;
    const d = downsampleMinMax(x, y, 100);
    expect(d.x.length).toBeLessThanOrEqual(200);
    expect(Math.max(...d.y)).toBe(50);
    expect(Math.min(...d.y)).toBe(-50);
    for (let k = 1; k < d.x.length; k++) expect(d.x[k]!).toBeGreaterThan(d.x[k - 1]!);
  });

  it('keeps a NaN gap as one NaN and leaves short series alone', () => {
    const x = Float64Array.from({ length: 1000 }, (_, k) => k);
    const y = Float64Array.from({ length: 1000 }, (_, k) => (k >= 400 && k < 500 ? NaN : k));
    const d = downsampleMinMax(x, y, 50);
    expect(Array.from(d.y).filter((v) => Number.isNaN(v)).length).toBe(1);
    expect(downsampleMinMax([0, 1, 2], [3, 4, 5], 10).y).toEqual(Float64Array.of(3, 4, 5));
    expect(() => downsampleMinMax([0, 1], [0], 10)).toThrow('downsampleMinMax: x and y must have the same length (got 2 and 1)');
  });
});

describe('svgLinePlot', () => {
  it('draws each series as a non-empty path with axes, labels with units and a legend', () => {
    const { svg, downsampled } = svgLinePlot({
      title: 'speed & "current"', xLabel: 'time [s]', yLabel: 'speed [rad/s]',
      series: [{ name: 'measured', x: [0, 1, 2, 3], y: [0, 5, 7, 8], style: 'dashed' }, { name: 'fitted', x: [0, 1, 2, 3], y: [0, 5.1, 6.9, 8], style: 'accent' }],
    });
    expect(downsampled).toBe(false);
    const paths = svg.match(/<path class="series" d="([^"]+)"/g) ?? [];
    expect(paths.length).toBe(2);
    expect(svg).toContain('stroke-dasharray="6 3"');
    expect(svg).toContain('time [s]');
    expect(svg).toContain('speed &amp; &quot;current&quot;'); // escaped
    expect(svg).toContain('>measured</text>');
  });

  it('says when it downsampled, breaks lines at NaN, and draws stems from zero', () => {
    const x = Float64Array.from({ length: 5000 }, (_, k) => k * 1e-4);
    const y = x.map((t, k) => (k === 100 ? NaN : Math.exp(-t)));
    const r = svgLinePlot({ series: [{ name: 'y', x, y }], xLabel: 't [s]', yLabel: 'y [1]' });
    expect(r.downsampled).toBe(true);
    const d = /<path class="series" d="([^"]+)"/.exec(r.svg)![1]!;
    expect(d.split('M').length - 1).toBe(2); // two runs: before and after the gap
    const stems = svgLinePlot({ series: [{ name: 'r_k', x: [1, 2, 3], y: [0.5, -0.2, 0.1], kind: 'stem' }], xLabel: 'lag [samples]', yLabel: 'r [1]' });
    expect((/<path class="series" d="([^"]+)"/.exec(stems.svg)![1]!.match(/V/g) ?? []).length).toBe(3);
  });

  it('rejects empty or unequal input with a clear error', () => {
    expect(() => svgLinePlot({ series: [], xLabel: 'x', yLabel: 'y' })).toThrow('svgLinePlot: options.series must be a non-empty array');
    expect(() => svgLinePlot({ series: [{ name: 'a', x: [1, 2], y: [1] }], xLabel: 'x', yLabel: 'y' })).toThrow('options.series[0] x and y differ in length (2 vs 1)');
    expect(() => svgLinePlot({ series: [{ name: 'a', x: [NaN], y: [1] }], xLabel: 'x', yLabel: 'y' })).toThrow('no series has a finite point');
  });
});

describe('operatingCurve', () => {
  it('runs from stall to the no-load speed of FACTS.md §5 and peaks in power at half the stall torque when friction is viscous only', () => {
    const c = operatingCurve({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 0 }, 12, 1001);
    // Stall: T = Kt·V/R = 0.3 N·m, i = 6 A (FACTS.md §5); no load: ω_ss = 238.09523809523807 rad/s (FACTS.md §5).
    expectClose(c.torque[0]!, 0.3, { rel: 1e-14, abs: 0 }, 'stall torque');
    expectClose(c.current[0]!, 6, { rel: 1e-14, abs: 0 }, 'stall current');
    expectClose(c.speed[1000]!, 238.09523809523807, { rel: 1e-14, abs: 0 }, 'no-load speed');
    expectClose(c.torque[1000]!, 0, { rel: 0, abs: 1e-15 }, 'no-load shaft torque');
    // P = T·ω is a parabola in ω with its top at ω0/2 (derived here): grid point 500.
    let best = 0;
    for (let k = 1; k < 1001; k++) if (c.outputPower[k]! > c.outputPower[best]!) best = k;
    expect(best).toBe(500);
    expect(() => operatingCurve({ R: 2, L: 1, Kt: 0.05, Ke: 0.05, J: 1, b: 0, Tc: 0 }, 0)).toThrow('operatingCurve: voltage must be a finite number > 0 (got 0)');
  });
});

describe('formatNumber', () => {
  it('writes significant digits with a real minus sign and exponents outside 1e-3…1e6', () => {
    expect(formatNumber(-2291.831180523293)).toBe('−2292');
    expect(formatNumber(0.000123456)).toBe('1.235e−4');
    expect(formatNumber(12345678)).toBe('1.235e7');
    expect(formatNumber(null)).toBe('–');
    expect(formatNumber(0.05, 5)).toBe('0.05');
  });
});
