import { estimateSourceResistance } from './estimateSourceResistance.js';
import type { PreparedRecording } from './prepareRecording.js';
import type { MotorFit, MotorRecordingInput, ParameterEstimate } from './types.js';

/**
 * The supply side: Rs from recordings that log both the supply and the terminal voltage; and when
 * the supply alone drove a recording, R is R + Rs, said so and stated under that name too.
 */
export function addSupplyTerms(fit: MotorFit, recordings: MotorRecordingInput[], recs: PreparedRecording[]): void {
  const rs = estimateSourceResistance(recordings.map((r) => r.recording), recs.map((r) => r.name));
  if (rs !== null) fit.parameters.Rs = rs;
  const supplyOnly = recs.filter((r) => r.source === 'supply');
  const R = fit.parameters.R;
  if (supplyOnly.length === 0 || R === undefined || R.fixed === true) return;
  fit.parameters['R+Rs'] = { ...R };
  // Every driven recording ran from the supply with the terminal voltage logged beside it: the
  // winding's R is R + Rs less Rs (two independent regressions: their variances add).
  const driven = recs.filter((r) => r.source !== 'none' && !r.table);
  if (rs === null || rs.identified === false || !driven.every((r) => r.supplyDrives)) return;
  const value = R.value - rs.value;
  if (!(value > 0)) return;
  const est: ParameterEstimate = { value, unit: R.unit, informedBy: [...new Set([...(R.informedBy ?? []), ...(rs.informedBy ?? [])])] };
  if (R.standardError !== undefined && rs.standardError !== undefined) {
    const se = Math.hypot(R.standardError, rs.standardError);
    const t = fit.constantCovariance?.tQuantile ?? 1.96;
    est.standardError = se;
    est.interval95 = [value - t * se, value + t * se];
    if (!(se < 0.5 * value)) est.identified = false;
  }
  fit.parameters.R = est;
  // The constants' covariance follows: ln R = ln(R + Rs) − ln(1 − Rs/(R + Rs)), to first order
  // d ln R = g·d ln(R + Rs) − dRs/R with g = (R + Rs)/R.
  const cc = fit.constantCovariance;
  const j = cc?.names.indexOf('R') ?? -1;
  if (cc !== undefined && j >= 0) {
    const m = cc.names.length, g = R.value / value, C = cc.logCovariance;
    for (let q = 0; q < m; q++) { if (q !== j) { C[j * m + q] = C[j * m + q]! * g; C[q * m + j] = C[j * m + q]!; } }
    C[j * m + j] = C[j * m + j]! * g * g + ((rs.standardError ?? 0) / value) ** 2;
    cc.values[j] = value;
  }
}
