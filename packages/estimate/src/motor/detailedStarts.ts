import type { DetailedConstant } from '../detailed/createDetailedProblem.js';
import type { ModelExtensions } from '../detailed/types.js';
import type { PreparedRecording } from './prepareRecording.js';

/**
 * Whether the fit needs the detailed model's simulator rather than the streamed linear kernel:
 * any extension (Coulomb friction included), or a recording the linear kernel does not model (a
 * coast-down, an encoder angle, a jittered clock, a table of steady points, no voltage at all).
 */
export function needsDetailedModel(recs: PreparedRecording[], ext: ModelExtensions): boolean {
  // Friction of either sign (reversals, sticking at rest) needs the event-locating simulator.
  if (ext.coulomb || ext.stiction || ext.drag || ext.voltageLimit || ext.currentLimit || ext.heating) return true;
  return recs.some((r) => r.kind === 'coast-down' || r.encoder !== null || r.grid !== null || r.table || r.source === 'none');
}

/** Kt·|i| over the last tenth of the driven recordings that log current (or of a coast-down's plateau); the smallest. */
export function runningTorque(recs: PreparedRecording[], Kt: number): number {
  let best = Infinity;
  for (const r of recs) {
    if (r.current === null || r.kind === 'locked-rotor') continue;
    const n = r.current.length;
    const [a, b] = r.kind === 'coast-down' ? [0, Math.max(1, r.first - 1)] : [Math.floor(0.9 * n), n];
    let s = 0;
    for (let k = a; k < b; k++) s += r.current[k]!;
    const i = Math.abs(s / Math.max(b - a, 1));
    if (i > 0) best = Math.min(best, Kt * i);
  }
  return Number.isFinite(best) ? best : 1e-3 * Kt;
}

/** The heating model's starting thermal time constant [s]: a third of the longest record (common practice, no source: a start). */
export function thermalTimeConstantStart(recs: PreparedRecording[]): number {
  let longest = 0;
  for (const r of recs) longest = Math.max(longest, r.time[r.time.length - 1]! - r.time[0]!);
  return Math.max(longest, 1e-3) / 3;
}

/**
 * Starting values of the effect constants the caller did not give (common practice, no source:
 * starts, not guesses — each puts the effect at a modest share of what the data show, where the
 * fit has a gradient to follow): drag c at 10 % of the viscous torque at the top speed; the
 * voltage limit at 95 % of the largest commanded level; the current limit at 95 % of the largest
 * current; stiction 30 % above Coulomb friction; a thermal time constant of a third of the longest
 * record, with Rth for a 10 K rise at its mean copper loss.
 */
export function effectStarts(recs: PreparedRecording[], ext: ModelExtensions, start: Partial<Record<DetailedConstant, number>>, src: Partial<Record<DetailedConstant, string>>): void {
  const set = (k: DetailedConstant, v: number, why: string): void => {
    if (start[k] === undefined && Number.isFinite(v) && v > 0) { start[k] = v; src[k] = why; }
  };
  let wmax = 0, imax = 0, vmax = 0, power = 0, count = 0;
  for (const r of recs) {
    if (r.speed !== null) for (let k = 0; k < r.speed.length; k++) wmax = Math.max(wmax, Math.abs(r.speed[k]!));
    if (r.current !== null) for (let k = 0; k < r.current.length; k++) { const i = r.current[k]!; imax = Math.max(imax, Math.abs(i)); power += i * i; count++; }
    if (r.source === 'command') for (let k = 0; k < r.input.length; k++) vmax = Math.max(vmax, Math.abs(r.input[k]!));
  }
  if (ext.drag) set('c', (0.1 * (start.b ?? 1e-6)) / Math.max(wmax, 1e-6), 'start: drag at 10 % of the viscous torque at the top speed');
  if (ext.voltageLimit) set('Vmax', 0.95 * vmax, 'start: 95 % of the largest commanded level');
  if (ext.currentLimit) set('Imax', 0.95 * imax, 'start: 95 % of the largest current');
  if (ext.stiction && start.Tc !== undefined) set('Ts', 1.3 * start.Tc, 'start: 30 % above Coulomb friction');
  if (ext.heating) {
    const p = (start.R ?? 1) * (count > 0 ? power / count : 1);
    const Rth = 10 / Math.max(p, 1e-9);
    set('Rth', Rth, 'start: a 10 K rise at the mean copper loss');
    set('Cth', thermalTimeConstantStart(recs) / Rth, 'start: a thermal time constant of a third of the longest record');
  }
}
