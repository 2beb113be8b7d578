import { checkRecording, noiseOf, sig } from './internal.js';
import { restRows } from './passes.js';
import type { Finding, RecordingLike } from './types.js';

/**
 * Looks for a sensor offset (`sensor-offset`): current or speed reads non-zero while the motor
 * is de-energised and at rest.
 *
 * ## Method
 * Rest samples: |v| < 4·σ_v and, for the current test, |ω| < 4·σ_ω when speed is logged; for the
 * speed test, |i| < 4·σ_i when current is logged. Over at least 20 such samples the mean reading
 * is tested against 0 with z = mean/(σ/√m); fire at |z| > 6 (kept strict because σ comes from the
 * data and a step edge can leak in), unless the first and second half of the rest samples differ
 * by more than 4 SE (a slowly coasting rotor, not an offset). At least 40 rest samples.
 *
 * @param recording - `{ time [s], channels }` with voltage and current and/or speed
 * @returns the findings that fired (one per channel)
 * @throws TypeError / RangeError for a malformed recording
 * @example
 * detectSensorOffset(stepWithCurrentOffset)[0].evidence['offset']; // ≈ 0.05
 */
export function detectSensorOffset(recording: RecordingLike): Finding[] {
  const { n } = checkRecording('detectSensorOffset', recording);
  const { voltage, current, speed } = recording.channels;
  if (!voltage) return [];
  const sv = noiseOf(voltage), si = noiseOf(current), sw = noiseOf(speed);
  const out: Finding[] = [];
  const test = (name: 'current' | 'speed', x: Float64Array, sx: number, other: Float64Array | undefined, so: number, unit: string): void => {
    const idx = restRows(voltage, 4 * Math.max(sv, 1e-12), other, 4 * Math.max(so, 1e-12), n);
    const m = idx.length;
    if (m < 40 || !(sx > 0)) return;
    const half = m >> 1;
    let s1 = 0, s2 = 0;
    for (let j = 0; j < m; j++) if (j < half) s1 += x[idx[j]!]!; else s2 += x[idx[j]!]!;
    const m1 = s1 / half, m2 = s2 / (m - half);
    const mean = (s1 + s2) / m;
    const z = mean / (sx / Math.sqrt(m));
    // A reading that drifts between the two halves of the rest samples is motion (a rotor coasting to a stop), not an offset.
    const zDiff = (m1 - m2) / (sx * Math.sqrt(1 / half + 1 / (m - half)));
    if (Math.abs(z) > 6 && Math.abs(zDiff) < 4) {
      out.push({
        code: 'sensor-offset', severity: 'warning', title: `The ${name} reads non-zero with the motor de-energised and at rest`,
        evidence: { channel: name, [`offset [${unit}]`]: sig(mean), 'rest samples': m, z: sig(z) },
        advice: `Zero the ${name} sensor before recording, or subtract the offset measured at rest; an offset biases ${name === 'current' ? 'R and the friction estimates' : 'Ke and b'}.`,
      });
    }
  };
  if (current) test('current', current, si, speed, sw, 'A');
  if (speed) test('speed', speed, sw, current, si, 'rad/s');
  return out;
}
