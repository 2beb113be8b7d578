import type { DerivedSpeed } from './types.js';

/**
 * Derives speed from position by central differences on the actual time stamps.
 *
 * ## Method
 * ω_k = (θ_{k+1} − θ_{k−1}) / (t_{k+1} − t_{k−1}) inside, one-sided differences at the two ends.
 * Quantisation: a position read in steps of Δθ carries an error uniform on
 * [−Δθ/2, Δθ/2] (variance Δθ²/12). Taken as independent from sample to sample, the central
 * difference has variance 2·(Δθ²/12)/(2·dt)² = Δθ²/(24·dt²), so σ_ω = Δθ/(2·√6·dt) ≈ 0.204·Δθ/dt
 * at the median dt (a forward difference would give Δθ/(√6·dt)). At one steady speed the errors
 * are not independent: the difference then takes only two values and its variance is
 * c·(1 − c)·Δθ²/(4·dt²), with c the fractional part of the counts moved in 2·dt, anywhere from 0 to
 * Δθ²/(16·dt²); averaged over c it is again Δθ²/(24·dt²). So the reported σ is the typical level
 * over a run whose speed varies; at a steady speed the true σ lies between 0 and √1.5 times it.
 *
 * @param time - sample times [s]
 * @param position - shaft angle [rad]
 * @param sampleInterval - median dt [s]
 * @param quantum - position step Δθ [rad] when known (2π / counts per revolution); otherwise the
 *   smallest non-zero step seen in the data is used
 * @returns the speed [rad/s] and its description for `meta.derived`
 * @example
 * deriveSpeed(Float64Array.of(0, 1, 2), Float64Array.of(0, 2, 4), 1).speed // => Float64Array [2, 2, 2]
 */
export function deriveSpeed(
  time: Float64Array,
  position: Float64Array,
  sampleInterval: number,
  quantum?: number,
): { speed: Float64Array; derived: DerivedSpeed } {
  const n = time.length;
  const speed = new Float64Array(n);
  if (n >= 2) {
    speed[0] = (position[1]! - position[0]!) / (time[1]! - time[0]!);
    speed[n - 1] = (position[n - 1]! - position[n - 2]!) / (time[n - 1]! - time[n - 2]!);
  }
  for (let k = 1; k < n - 1; k++) {
    speed[k] = (position[k + 1]! - position[k - 1]!) / (time[k + 1]! - time[k - 1]!);
  }
  let step = quantum ?? 0;
  let source: DerivedSpeed['quantisationStepSource'] = quantum !== undefined ? 'counts-per-revolution' : 'none';
  if (quantum === undefined) {
    let smallest = Number.POSITIVE_INFINITY;
    for (let k = 1; k < n; k++) {
      const d = Math.abs(position[k]! - position[k - 1]!);
      if (d > 0 && d < smallest) smallest = d;
    }
    if (Number.isFinite(smallest)) {
      step = smallest;
      source = 'smallest-step-in-data';
    }
  }
  const sigma = step / (2 * Math.sqrt(6) * sampleInterval);
  return {
    speed,
    derived: {
      role: 'speed',
      from: 'position',
      method: 'central-difference',
      description:
        'central differences on the time stamps, ω_k = (θ_{k+1} − θ_{k−1}) / (t_{k+1} − t_{k−1}), one-sided at the ends.',
      quantisationStep: step,
      quantisationStepSource: source,
      speedNoiseSigma: sigma,
      noiseModel: 'σ_ω = Δθ / (2·√6·dt) at the median dt: uniform quantisation error (variance Δθ²/12), independent between samples, through the central difference over 2·dt; at one steady speed it lies between 0 and √1.5 times this',
    },
  };
}
