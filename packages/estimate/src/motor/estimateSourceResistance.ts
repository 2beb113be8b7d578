import { tQuantile } from '../distributions.js';
import type { ParameterEstimate, RecordingData } from './types.js';

/**
 * The supply's source resistance Rs from recordings that log both the supply (bus, battery)
 * voltage and the motor's terminal voltage: v_supply − v_terminal = Rs·i + offset, by ordinary
 * least squares over every sample of every such recording (one offset per recording for the two
 * sensors' calibration). Null when no recording logs both voltages and the current, or the current
 * does not vary.
 *
 * ## Method
 * OLS of d = v_s − v_t on [i, 1·per recording]; SE from s²(XᵀX)⁻¹, 95 % interval Student-t with
 * n − p degrees of freedom (ln scale, Rs > 0; linear when the estimate is not positive).
 *
 * @param recordings - recordings in SI
 * @param names - their names, for `informedBy`
 * @returns the estimate of Rs [Ω], or null
 * @example
 * estimateSourceResistance([{ time, channels: { supplyVoltage, voltage, current } }], ['bus.csv'])?.value; // ≈ 0.15
 */
export function estimateSourceResistance(recordings: RecordingData[], names: string[]): ParameterEstimate | null {
  // Normal equations with one slope and per-recording offsets, via within-recording centring.
  let sxx = 0, sxy = 0, n = 0, groups = 0;
  const used: string[] = [];
  const parts: { d: Float64Array; i: Float64Array; md: number; mi: number }[] = [];
  recordings.forEach((r, idx) => {
    const vs = r.channels.supplyVoltage, vt = r.channels.voltage, i = r.channels.current;
    if (!vs || !vt || !i || r.layout === 'table') return;
    const m = i.length;
    const d = new Float64Array(m);
    let md = 0, mi = 0;
    for (let k = 0; k < m; k++) { d[k] = vs[k]! - vt[k]!; md += d[k]!; mi += i[k]!; }
    md /= m; mi /= m;
    for (let k = 0; k < m; k++) { const x = i[k]! - mi; sxx += x * x; sxy += x * (d[k]! - md); }
    n += m; groups++;
    used.push(names[idx] ?? `recording ${idx}`);
    parts.push({ d, i, md, mi });
  });
  if (groups === 0 || !(sxx > 0)) return null;
  const Rs = sxy / sxx;
  let ss = 0;
  for (const { d, i, md, mi } of parts) for (let k = 0; k < d.length; k++) { const e = d[k]! - md - Rs * (i[k]! - mi); ss += e * e; }
  const dof = n - 1 - groups;
  if (dof < 1) return null;
  const se = Math.sqrt(ss / dof / sxx);
  const t = tQuantile(0.975, dof);
  const est: ParameterEstimate = { value: Rs, unit: 'Ω', standardError: se, informedBy: used };
  est.interval95 = Rs > 0 ? [Rs * Math.exp((-t * se) / Rs), Rs * Math.exp((t * se) / Rs)] : [Rs - t * se, Rs + t * se];
  if (!(se < 0.5 * Math.abs(Rs))) est.identified = false;
  return est;
}
