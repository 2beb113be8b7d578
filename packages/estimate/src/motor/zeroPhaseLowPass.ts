import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';

/**
 * Zero-phase low-pass filter: a Butterworth filter of even order run forward, then backward, so
 * the output has no delay. Edges are padded by odd reflection (2·x₀ − x_{k}) to damp the start-up
 * transient.
 *
 * ## Method
 * The analogue Butterworth prototype of order N is mapped by the bilinear transform with
 * pre-warped cutoff into N/2 second-order sections (pole pairs at angles π(2m + N − 1)/(2N)).
 * Running the cascade forward and backward squares the magnitude response (−6 dB at the cutoff)
 * and cancels the phase.
 *
 * ## References
 * S. Butterworth (1930), "On the theory of filter amplifiers", Wireless Engineer 7, 536–541.
 * F. Gustafsson (1996), "Determining the initial states in forward-backward filtering", IEEE
 * Trans. Signal Process. 44(4), 988–992, doi:10.1109/78.492552 (forward-backward filtering).
 *
 * @param values - samples (uniformly spaced)
 * @param sampleInterval - sample interval h [s], > 0
 * @param cutoff - cutoff frequency [Hz], 0 < cutoff < 1/(2h)
 * @param order - even Butterworth order, 2…8. @default 4
 * @returns a new filtered array of the same length
 * @throws TypeError when `values` is not a Float64Array
 * @throws RangeError when the interval, the cutoff or the order is out of range
 * @example
 * zeroPhaseLowPass(new Float64Array(100).fill(3), 1e-3, 50)[50]; // ≈ 3
 */
export function zeroPhaseLowPass(values: Float64Array, sampleInterval: number, cutoff: number, order = 4): Float64Array {
  const fn = 'zeroPhaseLowPass';
  if (!(values instanceof Float64Array)) throw new TypeError(`${fn}: values must be a Float64Array`);
  if (!(sampleInterval > 0) || !Number.isFinite(sampleInterval)) {
    throw new RangeError(`${fn}: sampleInterval must be > 0 (got ${sampleInterval})`);
  }
  const nyquist = 0.5 / sampleInterval;
  if (!(cutoff > 0 && cutoff < nyquist)) {
    throw new RangeError(`${fn}: cutoff must be in (0, ${nyquist}) Hz (got ${cutoff})`);
  }
  if (!Number.isInteger(order) || order < 2 || order > 8 || order % 2 !== 0) {
    throw new RangeError(`${fn}: order must be 2, 4, 6 or 8 (got ${order})`);
  }
  const n = values.length;
  if (n === 0) return new Float64Array(0);
  const sections = order / 2;
  // Pre-warped analogue cutoff for the bilinear transform with T = 1 sample (k = 2/T).
  const wa = 2 * Math.tan(Math.PI * cutoff * sampleInterval);
  const coef = new Float64Array(5 * sections);
  for (let m = 0; m < sections; m++) {
    const angle = (Math.PI * (2 * m + 1)) / (2 * order);
    const q2 = 2 * Math.sin(angle); // section s² + q2·wa·s + wa²  (q2 = 1/Q)
    const k = 2;
    const a0 = k * k + q2 * wa * k + wa * wa;
    coef[5 * m] = (wa * wa) / a0; // b0
    coef[5 * m + 1] = (2 * wa * wa) / a0; // b1
    coef[5 * m + 2] = (wa * wa) / a0; // b2
    coef[5 * m + 3] = (2 * wa * wa - 2 * k * k) / a0; // a1
    coef[5 * m + 4] = (k * k - q2 * wa * k + wa * wa) / a0; // a2
  }
  const pad = Math.min(n - 1, 3 * order * Math.ceil(0.5 / (cutoff * sampleInterval)));
  return (n + 2 * pad >= KERNEL_MIN_LENGTH ? lowPassKernel(values, coef, pad) : null) ?? lowPassPlain(values, coef, pad);
}

/**
 * The padding and the sweeps of {@link zeroPhaseLowPass} (section coefficients b0 b1 b2 a1 a2 in
 * `coef`, `pad` samples reflected at each end) in plain JavaScript: the reference of
 * {@link lowPassKernel} and its fallback (exported for the tests).
 */
export function lowPassPlain(values: Float64Array, coef: Float64Array, pad: number): Float64Array {
  const n = values.length;
  const sections = coef.length / 5;
  const len = n + 2 * pad;
  const x = new Float64Array(len);
  const first = values[0]!;
  const last = values[n - 1]!;
  for (let k = 0; k < pad; k++) x[k] = 2 * first - values[pad - k]!;
  x.set(values, pad);
  for (let k = 0; k < pad; k++) x[pad + n + k] = 2 * last - values[n - 2 - k]!;
  if (sections === 2) {
    // Order 4 (the default): both sections in one sweep each way, the same numbers.
    runTwoSections(x, coef, false);
    runTwoSections(x, coef, true);
  } else {
    for (let m = 0; m < sections; m++) runSection(x, coef, 5 * m, false);
    for (let m = 0; m < sections; m++) runSection(x, coef, 5 * m, true);
  }
  return x.slice(pad, pad + n);
}

/**
 * {@link lowPassPlain} through the WebAssembly kernel (sampleKernels.wat: the sections one after the
 * other, which `runTwoSections` matches bit for bit); null where it cannot run.
 */
export function lowPassKernel(values: Float64Array, coef: Float64Array, pad: number): Float64Array | null {
  const n = values.length;
  const len = n + 2 * pad;
  const room = sampleKernels.room(8 * (len + coef.length));
  if (room === null || n === 0) return null;
  const { f64, exports: k } = room;
  f64.set(values, pad);
  f64.set(coef, len);
  k.lowPass(0, n, pad, 8 * len, coef.length / 5);
  return f64.slice(pad, pad + n);
}

/** One biquad in transposed direct form II, started in its steady state for the first input. */
function runSection(x: Float64Array, c: Float64Array, o: number, backward: boolean): void {
  const b0 = c[o]!, b1 = c[o + 1]!, b2 = c[o + 2]!, a1 = c[o + 3]!, a2 = c[o + 4]!;
  const n = x.length;
  const x0 = x[backward ? n - 1 : 0]!;
  // Steady state for a constant input x0 (DC gain 1): output x0.
  let z1 = x0 - b0 * x0;
  let z2 = b2 * x0 - a2 * x0;
  if (!backward) {
    for (let k = 0; k < n; k++) {
      const u = x[k]!;
      const y = b0 * u + z1;
      z1 = b1 * u - a1 * y + z2;
      z2 = b2 * u - a2 * y;
      x[k] = y;
    }
  } else {
    for (let k = n - 1; k >= 0; k--) {
      const u = x[k]!;
      const y = b0 * u + z1;
      z1 = b1 * u - a1 * y + z2;
      z2 = b2 * u - a2 * y;
      x[k] = y;
    }
  }
}

/**
 * `runSection` for sections 0 and 1 in one sweep: at each sample the first section's output goes
 * straight into the second, which starts from the steady state of the first section's first
 * output (the value it would read there when run after it). Every operation is the one the two
 * sweeps make, in the same order, so the result is bit-identical to them.
 */
function runTwoSections(x: Float64Array, c: Float64Array, backward: boolean): void {
  const b0 = c[0]!, b1 = c[1]!, b2 = c[2]!, a1 = c[3]!, a2 = c[4]!;
  const d0 = c[5]!, d1 = c[6]!, d2 = c[7]!, e1 = c[8]!, e2 = c[9]!;
  const n = x.length;
  const first = backward ? n - 1 : 0;
  const x0 = x[first]!;
  let z1 = x0 - b0 * x0;
  let z2 = b2 * x0 - a2 * x0;
  // The first sample through section 0 gives section 1 its starting level.
  const u0 = x0;
  const y0 = b0 * u0 + z1;
  z1 = b1 * u0 - a1 * y0 + z2;
  z2 = b2 * u0 - a2 * y0;
  let w1 = y0 - d0 * y0;
  let w2 = d2 * y0 - e2 * y0;
  const v0 = d0 * y0 + w1;
  w1 = d1 * y0 - e1 * v0 + w2;
  w2 = d2 * y0 - e2 * v0;
  x[first] = v0;
  if (!backward) {
    for (let k = 1; k < n; k++) {
      const u = x[k]!;
      const y = b0 * u + z1;
      z1 = b1 * u - a1 * y + z2;
      z2 = b2 * u - a2 * y;
      const v = d0 * y + w1;
      w1 = d1 * y - e1 * v + w2;
      w2 = d2 * y - e2 * v;
      x[k] = v;
    }
  } else {
    for (let k = n - 2; k >= 0; k--) {
      const u = x[k]!;
      const y = b0 * u + z1;
      z1 = b1 * u - a1 * y + z2;
      z2 = b2 * u - a2 * y;
      const v = d0 * y + w1;
      w1 = d1 * y - e1 * v + w2;
      w2 = d2 * y - e2 * v;
      x[k] = v;
    }
  }
}
