import type { ConstantCovariance, LoopTuningOptions, TuningGain, TuningSection } from './types.js';

/**
 * Largest loop bandwidth as a fraction of the controller sample rate before a warning: 1/10
 * (common practice, no source). Speed bandwidth over current bandwidth above 1/5 also warns: the
 * inner loop is then not "ideal" for the outer (common practice, no source).
 */
const MAX_FRACTION = 0.1;
const MAX_CASCADE = 0.2;
const I = { R: 0, L: 1, Kt: 2, Ke: 3, J: 4, b: 5 } as const;

/**
 * Speed-loop PI for the plant Kt/(J·s + b) (ideal current loop) with crossover ωs and phase
 * margin φm: the zero z = Ki/Kp from the phase condition, Kp from |L(jωs)| = 1. Null when the
 * phase margin cannot be reached with a PI (the plant alone already has more phase).
 */
function speedPi(J: number, b: number, Kt: number, ws: number, pm: number): { Kp: number; Ki: number } | null {
  // ∠L(jωs) = atan(ωs/z) − 90° − atan(J·ωs/b) = −180° + φm ⇒ atan(ωs/z) = φm + atan(J·ωs/b) − 90°.
  const beta = b > 0 ? Math.atan((J * ws) / b) : Math.PI / 2;
  const lead = pm + beta - Math.PI / 2;
  if (!(lead > 0 && lead < Math.PI / 2)) return null;
  const z = ws / Math.tan(lead);
  const Kp = (ws * Math.hypot(J * ws, b)) / (Kt * Math.hypot(ws, z));
  return { Kp, Ki: Kp * z };
}

/**
 * Loop-tuning figures from the fitted constants, with intervals: a current-loop PI by pole–zero
 * cancellation and a speed-loop PI for a bandwidth and phase margin, each gain with a 95 %
 * interval propagated from the covariance of the constants' logarithms.
 *
 * ## Method
 * Current loop: plant 1/(L·s + R) (back-EMF taken as a slow disturbance); PI zero on the plant
 * pole, Kp = L·ωc, Ki = R·ωc, so the open loop is ωc/s and the closed loop a first-order lag of
 * bandwidth ωc = 2π·f_c. Speed loop: the current loop taken as ideal (i = i*) and no delay, plant
 * Kt/(J·s + b); PI zero z = Ki/Kp placed so that the phase at the crossover ωs = 2π·f_s is
 * −180° + φm, Kp so that |L(jωs)| = 1. With b = 0: Kp = J·ωs·sin φm/Kt, Ki = J·ωs²·cos φm/Kt.
 * Intervals: delta method on ln of each gain, the gradient w.r.t. ln R, ln L, ln Kt, ln J, ln b
 * by central differences (relative step 1e-5), then ln g ± t·s with the fit's Student-t quantile.
 *
 * ## References
 * Cascade PI design of the current and speed loops of a DC drive (pole–zero cancellation in the
 * current loop; speed loop for a bandwidth and phase margin with the inner loop taken as ideal):
 * N. Mohan, "Electric Drives: An Integrative Approach", MNPERE, 2003, ch. 8 (from memory,
 * unverified). Delta method: G. Casella, R. L. Berger (2002), Statistical Inference, 2nd ed., §5.5.4.
 *
 * @param cov - the constants' covariance (`constantCovariance` of a fit), or plain values with a zero covariance
 * @param options - bandwidths [Hz], phase margin [°], controller rate [Hz]
 * @returns the tuning section
 * @throws RangeError for a bandwidth or rate that is not a finite number > 0, or a phase margin outside (0, 90)
 * @example
 * loopTuning(constantCovariance(fit), { currentBandwidthHz: 1000 }).currentLoop.Kp.value; // = L·2π·1000
 */
export function loopTuning(cov: ConstantCovariance, options: LoopTuningOptions = {}): TuningSection {
  const fn = 'loopTuning';
  const pos = (key: keyof LoopTuningOptions, v: number | undefined, def: number | null, test: (x: number) => boolean = (x) => x > 0, rule = 'a finite number > 0'): number | null => {
    if (v === undefined) return def;
    if (typeof v !== 'number' || !Number.isFinite(v) || !test(v)) throw new RangeError(`${fn}: options.${key} must be ${rule} (got ${String(v)})`);
    return v;
  };
  const fc = pos('currentBandwidthHz', options.currentBandwidthHz, 1000)!;
  const fsb = pos('speedBandwidthHz', options.speedBandwidthHz, 100)!;
  const pmDeg = pos('phaseMarginDeg', options.phaseMarginDeg, 60, (x) => x > 0 && x < 90, 'between 0 and 90 (exclusive)')!;
  const rate = pos('controllerRateHz', options.controllerRateHz, null);
  const wc = 2 * Math.PI * fc, ws = 2 * Math.PI * fsb, pm = (pmDeg * Math.PI) / 180;
  const v = cov.values;
  const t = Number.isFinite(cov.tQuantile) ? cov.tQuantile : 1.96;

  const gain = (unit: string, formula: string, uses: (keyof typeof I)[], f: (c: Float64Array) => number): TuningGain => {
    const out: TuningGain = { value: null, unit, ci95: null, formula };
    if (uses.some((c) => !Number.isFinite(v[I[c]]!) || !(v[I[c]]! > 0 || (c === 'b' && v[I[c]] === 0)))) return out;
    const g0 = f(v);
    if (!(g0 > 0) || !Number.isFinite(g0)) return out;
    out.value = g0;
    if (uses.some((c) => !cov.identifiable[I[c]])) return out;
    const idx = uses.map((c) => I[c] as number).filter((i) => v[i]! > 0);
    const grad = idx.map((i) => {
      const w = Float64Array.from(v);
      w[i] = v[i]! * Math.exp(1e-5); const fp = f(w);
      w[i] = v[i]! * Math.exp(-1e-5); const fm = f(w);
      return (Math.log(fp) - Math.log(fm)) / 2e-5;
    });
    let s2 = 0;
    const m = cov.names.length;
    idx.forEach((a, p) => idx.forEach((bIdx, q) => { s2 += grad[p]! * grad[q]! * cov.covariance[a * m + bIdx]!; }));
    if (!Number.isFinite(s2) || grad.some((g) => !Number.isFinite(g))) return out;
    const half = t * Math.sqrt(Math.max(s2, 0));
    out.ci95 = [g0 * Math.exp(-half), g0 * Math.exp(half)];
    return out;
  };
  const sp = (c: Float64Array): { Kp: number; Ki: number } | null => speedPi(c[I.J]!, c[I.b]!, c[I.Kt]!, ws, pm);
  const section: TuningSection = {
    settings: {
      currentBandwidthHz: { value: fc, source: options.currentBandwidthHz === undefined ? 'default' : 'given' },
      speedBandwidthHz: { value: fsb, source: options.speedBandwidthHz === undefined ? 'default' : 'given' },
      phaseMarginDeg: { value: pmDeg, source: options.phaseMarginDeg === undefined ? 'default' : 'given' },
      controllerRateHz: { value: rate, source: rate === null ? 'none' : 'given' },
      maxBandwidthFraction: MAX_FRACTION,
    },
    currentLoop: {
      Kp: gain('V/A', 'L·ωc', ['L'], (c) => c[I.L]! * wc),
      Ki: gain('V/(A·s)', 'R·ωc', ['R'], (c) => c[I.R]! * wc),
    },
    speedLoop: {
      Kp: gain('A·s/rad', 'from |L(jωs)| = 1 (b = 0: J·ωs·sin φm/Kt)', ['J', 'b', 'Kt'], (c) => sp(c)?.Kp ?? NaN),
      Ki: gain('A/rad', 'Kp·z, z from the phase margin (b = 0: J·ωs²·cos φm/Kt)', ['J', 'b', 'Kt'], (c) => sp(c)?.Ki ?? NaN),
    },
    assumptions: [
      'current loop: plant 1/(L·s + R), the back-EMF Ke·ω treated as a slow disturbance; PI zero cancels the plant pole',
      'speed loop: the current loop taken as ideal (i = i*) and no delay (computation, PWM, sensor filters ignored); plant Kt/(J·s + b)',
      'the drive voltage does not saturate; friction other than b and the load inertia are not included',
    ],
    method: 'current loop by pole–zero cancellation (Kp = L·ωc, Ki = R·ωc); speed loop PI for crossover ωs and phase margin φm; ' +
      'cascade design as in N. Mohan, "Electric Drives: An Integrative Approach" (2003), ch. 8 (from memory, unverified); ' +
      'intervals by the delta method on ln of each gain',
    warnings: [],
  };
  if (rate !== null) {
    for (const [what, f] of [['current', fc], ['speed', fsb]] as const) {
      if (f > MAX_FRACTION * rate) section.warnings.push(`the ${what}-loop bandwidth ${f} Hz exceeds 1/10 of the controller rate ${rate} Hz: sampling delay will cost phase the design ignores`);
    }
  }
  if (fsb > MAX_CASCADE * fc) section.warnings.push(`the speed-loop bandwidth ${fsb} Hz exceeds 1/5 of the current-loop bandwidth ${fc} Hz: the current loop is then not ideal for the speed loop`);
  if (section.speedLoop.Kp.value === null && Number.isFinite(v[I.J]!) && Number.isFinite(v[I.Kt]!)) {
    section.warnings.push(`a PI cannot give a ${pmDeg}° phase margin at ${fsb} Hz for this plant (b large against J·ωs): no speed-loop gains`);
  }
  return section;
}
