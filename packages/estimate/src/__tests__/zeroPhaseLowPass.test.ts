import { createRandom } from '@motorprint/model';
import { describe, expect, it } from 'vitest';
import { zeroPhaseLowPass } from '../motor/zeroPhaseLowPass.js';

/** The filter as the cascade of its sections, each run over the whole padded array in turn (reference). */
function bySections(values: Float64Array, h: number, fc: number, order: number): Float64Array {
  const sections = order / 2;
  const wa = 2 * Math.tan(Math.PI * fc * h);
  const coef: number[][] = [];
  for (let m = 0; m < sections; m++) {
    const q2 = 2 * Math.sin((Math.PI * (2 * m + 1)) / (2 * order));
    const a0 = 4 + q2 * wa * 2 + wa * wa;
    coef.push([(wa * wa) / a0, (2 * wa * wa) / a0, (wa * wa) / a0, (2 * wa * wa - 8) / a0, (4 - q2 * wa * 2 + wa * wa) / a0]);
  }
  const n = values.length;
  const pad = Math.min(n - 1, 3 * order * Math.ceil(0.5 / (fc * h)));
  const x = new Float64Array(n + 2 * pad);
  for (let k = 0; k < pad; k++) x[k] = 2 * values[0]! - values[pad - k]!;
  x.set(values, pad);
  for (let k = 0; k < pad; k++) x[pad + n + k] = 2 * values[n - 1]! - values[n - 2 - k]!;
  for (const backward of [false, true]) {
    for (const [b0, b1, b2, a1, a2] of coef as [number, number, number, number, number][]) {
      const x0 = x[backward ? x.length - 1 : 0]!;
      let z1 = x0 - b0 * x0, z2 = b2 * x0 - a2 * x0;
      for (let j = 0; j < x.length; j++) {
        const k = backward ? x.length - 1 - j : j;
        const u = x[k]!;
        const y = b0 * u + z1;
        z1 = b1 * u - a1 * y + z2;
        z2 = b2 * u - a2 * y;
        x[k] = y;
      }
    }
  }
  return x.slice(pad, pad + n);
}

describe('zeroPhaseLowPass runs its sections in one sweep each way with the numbers of one sweep per section', () => {
  it('order 4 (two sections in one sweep) and orders 2, 6, 8 equal the section-by-section cascade bit for bit', () => {
    const rng = createRandom(21);
    // Invented: a quantised noisy step on an offset, 5000 samples at 10 kHz.
    const x = Float64Array.from({ length: 5000 }, (_, k) => Math.round(((k > 1200 ? 3 : 0.5) + 0.2 * rng.normal()) * 128) / 128 + 7);
    for (const order of [2, 4, 6, 8]) {
      for (const fc of [250, 40]) {
        const y = zeroPhaseLowPass(x, 1e-4, fc, order);
        expect(Array.from(y), `order ${order}, ${fc} Hz`).toEqual(Array.from(bySections(x, 1e-4, fc, order)));
      }
    }
    // A check that the filter did smooth: the step is still there, the noise much smaller.
    const y = zeroPhaseLowPass(x, 1e-4, 250);
    expect(Math.abs(y[3000]! - 10)).toBeLessThan(0.05);
    expect(Math.abs(y[600]! - 7.5)).toBeLessThan(0.05);
  });

  it('short inputs (1, 2 and 3 samples) agree with the cascade too', () => {
    for (const v of [[4], [4, 5], [4, 5, 3]]) {
      const x = Float64Array.from(v);
      expect(Array.from(zeroPhaseLowPass(x, 1e-3, 10))).toEqual(Array.from(bySections(x, 1e-3, 10, 4)));
    }
  });
});
