import { expectClose } from '@motorprint/testkit';
import { describe, expect, it } from 'vitest';
import { checkTimeBase, createIngestor, deriveSpeed, ingestText } from '../index.js';
import type { DerivedSpeed } from '../index.js';

// All recordings in this file are invented for the tests.

describe('checkTimeBase describes the sampling', () => {
  it('gives the median interval, jitter and span', () => {
    // dt = [1, 1, 1, 2]: median 1, mean 1.25, sample std √((3·0.0625 + 0.5625)/3) = 0.5 (derived here).
    const { timeBase, issues } = checkTimeBase(Float64Array.of(0, 1, 2, 3, 5));
    expect(timeBase).toEqual({ start: 0, end: 5, duration: 5, sampleInterval: 1, sampleRate: 1, jitterStd: 0.5, jitterMax: 1, gaps: 0, maxInterval: 2 });
    expect(issues.map((i) => i.code)).toEqual(['irregular-sampling']);
  });

  it('takes the mean of the two middle intervals for an even count', () => {
    expect(checkTimeBase(Float64Array.of(0, 1, 3, 6, 10)).timeBase.sampleInterval).toBe(2.5);
  });

  it('reports gaps longer than 3 × the median', () => {
    const { timeBase, issues } = checkTimeBase(Float64Array.of(0, 1, 2, 3, 10, 11));
    expect(timeBase.gaps).toBe(1);
    expect(issues.find((i) => i.code === 'time-gap')!.message).toContain('the largest is 7 s after t = 3 s');
  });

  it('says nothing about a regular grid', () => {
    const t = Float64Array.from({ length: 1000 }, (_, k) => k / 1024);
    expect(checkTimeBase(t).issues).toEqual([]);
    expect(checkTimeBase(t).timeBase.sampleRate).toBe(1024);
  });
});

describe('speed is derived from position when only position is logged', () => {
  it('by central differences, exact for a parabola on any grid', () => {
    const t = Float64Array.of(0, 0.1, 0.25, 0.3, 0.5);
    const theta = t.map((x) => 3 * x * x);
    const { speed, derived } = deriveSpeed(t, theta, 0.1);
    // Central difference over non-uniform steps of θ = 3t² gives 3(t₊ + t₋); one-sided at the ends (derived here).
    expectClose(speed[1]!, 3 * (0.25 + 0), { rel: 1e-12 }, 'ω[1]');
    expectClose(speed[2]!, 3 * (0.3 + 0.1), { rel: 1e-12 }, 'ω[2]');
    expectClose(speed[0]!, 3 * 0.1, { rel: 1e-12 }, 'ω[0] one-sided');
    expectClose(speed[4]!, 3 * (0.5 + 0.3), { rel: 1e-12 }, 'ω[4] one-sided');
    expect(derived.method).toBe('central-difference');
  });

  it('states the quantisation noise Δθ/(2√6·dt), which a simulated encoder confirms', () => {
    // Invented encoder: 1000 counts/rev read at 1 kHz while the shaft accelerates steadily,
    // θ = 50t + 50t² (ω = 50 + 100t rad/s, 8…24 counts per sample). The central difference of a
    // parabola is exact, so the error is quantisation alone; the sweep of speeds averages the
    // error variance over the fractional count, as the formula assumes.
    const cpr = 1000;
    const q = (2 * Math.PI) / cpr;
    const dt = 1e-3;
    const n = 20000;
    const t = Float64Array.from({ length: n }, (_, k) => k * dt);
    const theta = t.map((x) => Math.floor((50 * x + 50 * x * x + 0.123) / q) * q);
    const { speed, derived } = deriveSpeed(t, theta, dt, q);
    let ss = 0;
    for (let k = 1; k < n - 1; k++) ss += (speed[k]! - (50 + 100 * t[k]!)) ** 2;
    const sigma = Math.sqrt(ss / (n - 2));
    expectClose(derived.speedNoiseSigma, q / (2 * Math.sqrt(6) * dt), { rel: 1e-12 }, 'formula');
    expectClose(sigma, derived.speedNoiseSigma, { rel: 0.03 }, 'simulated σ_ω vs formula');
  });

  it('at one steady speed the quantisation error depends on the fractional count, as documented', () => {
    // 100.3 rad/s at 1 kHz and 1000 counts/rev moves 31.927 counts per 2 dt; c = 0.927, so the
    // error variance is c(1 − c)·Δθ²/(4dt²) (derived in deriveSpeed's notes), not Δθ²/(24dt²).
    const q = (2 * Math.PI) / 1000;
    const dt = 1e-3;
    const n = 20000;
    const t = Float64Array.from({ length: n }, (_, k) => k * dt);
    const theta = t.map((x) => Math.floor((100.3 * x + 0.123) / q) * q);
    const { speed } = deriveSpeed(t, theta, dt, q);
    let ss = 0;
    for (let k = 1; k < n - 1; k++) ss += (speed[k]! - 100.3) ** 2;
    const moved = (2 * dt * 100.3) / q;
    const c = moved - Math.floor(moved);
    expectClose(Math.sqrt(ss / (n - 2)), Math.sqrt(c * (1 - c)) * q / (2 * dt), { rel: 0.02 }, 'steady-speed σ_ω');
  });

  it('fills speed and meta.derived from an encoder column', () => {
    const rows = ['time [ms],enc'];
    for (let k = 0; k < 50; k++) rows.push(`${k},${k * 8}`);
    const r = ingestText(rows.join('\n'), { countsPerRevolution: 2000 });
    // 8 counts per ms at 2000 counts/rev = 4 rev/s = 8π rad/s.
    expectClose(r.recording.channels.speed![25]!, 8 * Math.PI, { rel: 1e-12 }, 'speed');
    expect(r.recording.meta.derived).toHaveLength(1);
    expect(r.recording.meta.derived[0]).toMatchObject({ role: 'speed', from: 'position', quantisationStepSource: 'counts-per-revolution' });
    expectClose((r.recording.meta.derived[0] as DerivedSpeed).quantisationStep, (2 * Math.PI) / 2000, { rel: 1e-15 }, 'Δθ');
    expectClose((r.recording.meta.derived[0] as DerivedSpeed).speedNoiseSigma, (2 * Math.PI) / 2000 / (2 * Math.sqrt(6) * 1e-3), { rel: 1e-9 }, 'σ_ω');
    expect(r.issues.some((i) => i.code === 'derived-speed')).toBe(true);
    expect(ingestText(rows.join('\n'), { countsPerRevolution: 2000, deriveSpeed: false }).recording.channels.speed).toBeUndefined();
  });

  it('estimates the quantum from the data when the position is not in counts', () => {
    const r = ingestText('time [s],angle [deg]\n0,0\n1,0.5\n2,1.5\n3,3\n');
    expect(r.recording.meta.derived[0]).toMatchObject({ quantisationStepSource: 'smallest-step-in-data' });
    expectClose((r.recording.meta.derived[0] as DerivedSpeed).quantisationStep, (0.5 * Math.PI) / 180, { rel: 1e-15 }, 'Δθ');
  });
});

describe('large recordings stream in bounded memory', () => {
  it('reads 1,000,000 rows × 5 columns pushed in 1 MiB chunks without holding the text or row objects', () => {
    const rows = 1_000_000;
    const ing = createIngestor({ fileName: 'big.csv', sizeHint: 40 * rows });
    const encoder = new TextEncoder();
    ing.push(encoder.encode('time [s],voltage [V],current [A],speed [rad/s],temp [°C]\n'));
    const base = process.memoryUsage();
    let peak = 0;
    let block: string[] = [];
    for (let k = 0; k < rows; k++) {
      block.push(`${(k * 1e-4).toFixed(4)},12.${k % 1000},1.${k % 97},${(k % 5000) / 10},25.5`);
      if (block.length === 25000 || k === rows - 1) {
        ing.push(encoder.encode(block.join('\n') + '\n'));
        block = [];
        const m = process.memoryUsage();
        peak = Math.max(peak, m.heapUsed + m.arrayBuffers - base.heapUsed - base.arrayBuffers);
      }
    }
    const r = ing.finish();
    expect(r.recording.meta.rowsKept).toBe(rows);
    expect(r.recording.time.length).toBe(rows);
    expect(r.recording.time.buffer.byteLength).toBe(8 * rows);
    expect(r.recording.time[rows - 1]).toBe(Number(((rows - 1) * 1e-4).toFixed(4)));
    expect(r.recording.channels.voltage![999]).toBe(12.999);
    // 5 columns × 8 bytes × 1e6 rows = 40 MB of Float64Array (pre-sized, so no doubling copy);
    // a row-object array would take several hundred MB. Allow generous slack for GC timing.
    expect(peak).toBeLessThan(160 * 2 ** 20);
  });
});
