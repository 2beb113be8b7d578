import { lockedRotorHoldTime } from '@motorprint/model';
import type { RecordingData } from '../motor/types.js';
import type { LockedRotorHoldCheck, LockedRotorHoldCheckOptions } from './types.js';

/**
 * Compares how long a locked-rotor recording held the winding driven with the locked-rotor time
 * budget (`lockedRotorHoldTime` of the model package: copper law, first-order thermal model,
 * conservative defaults where thermal data are missing), and returns a finding when it held longer.
 *
 * The hold is the span from the first to the last sample at which the drive (the voltage, else the
 * current) is above half its largest magnitude; the current is the mean magnitude over the second
 * half of that span (the stall current), or the mean voltage there over R without a current channel.
 *
 * @param recording - the locked-rotor recording (time [s], voltage [V] and/or current [A])
 * @param options - R and the thermal data
 * @returns the hold, the budget and, when over, a `locked-rotor-hold-over-budget` finding
 * @throws TypeError / RangeError for a recording without time or drive channel, or bad options
 * @example
 * checkLockedRotorHold(rec, { R: 1.9 }).budgetSeconds; // ≈ 1 s at 3.2 A (conservative default)
 */
export function checkLockedRotorHold(recording: RecordingData, options: LockedRotorHoldCheckOptions): LockedRotorHoldCheck {
  const fn = 'checkLockedRotorHold';
  if (recording === null || typeof recording !== 'object' || !(recording.time instanceof Float64Array)) {
    throw new TypeError(`${fn}: recording must be an object with a Float64Array time`);
  }
  if (options === null || typeof options !== 'object') throw new TypeError(`${fn}: options must be an object { R, … }`);
  const t = recording.time;
  const v = recording.channels?.voltage ?? recording.channels?.supplyVoltage ?? recording.channels?.commandVoltage ?? null;
  const i = recording.channels?.current ?? null;
  const drive = v ?? i;
  if (drive === null || drive.length !== t.length || t.length < 2) throw new RangeError(`${fn}: recording needs a voltage or current channel as long as its time (at least 2 samples)`);
  let top = 0;
  for (let k = 0; k < drive.length; k++) top = Math.max(top, Math.abs(drive[k]!));
  let a = -1, b = -1;
  for (let k = 0; k < drive.length; k++) if (Math.abs(drive[k]!) > 0.5 * top) { if (a < 0) a = k; b = k; }
  const holdSeconds = a < 0 ? 0 : t[Math.min(b + 1, t.length - 1)]! - t[a]!;
  let current = 0;
  if (a >= 0) {
    const from = a + Math.floor((b - a) / 2);
    let s = 0, c = 0;
    for (let k = from; k <= b; k++) { s += Math.abs(i !== null ? i[k]! : v![k]! / options.R); c++; }
    current = c > 0 ? s / c : 0;
  }
  const h = lockedRotorHoldTime({
    R: options.R, current, riseK: options.riseK ?? 20,
    ...(options.Rth !== undefined ? { Rth: options.Rth } : {}), ...(options.Cth !== undefined ? { Cth: options.Cth } : {}),
    ...(options.resistanceTemperature !== undefined ? { resistanceTemperature: options.resistanceTemperature } : {}),
  });
  const out: LockedRotorHoldCheck = { holdSeconds, current, budgetSeconds: h.holdSeconds, note: h.note };
  if (holdSeconds > h.holdSeconds) {
    const name = options.name ?? 'the locked-rotor recording';
    out.finding = {
      code: 'locked-rotor-hold-over-budget',
      severity: 'warning',
      title: `${name} held the stalled winding ${fmt(holdSeconds)} s, longer than the ${fmt(h.holdSeconds)} s budget for a ${h.riseK} K rise`,
      evidence: { holdSeconds, budgetSeconds: h.holdSeconds, current, riseK: h.riseK, thermalData: h.note },
      advice: 'A locked-rotor hold of a few electrical time constants (L/R) is enough for R and L; a longer one heats the winding, ' +
        'raising R during the run and risking the insulation. The budget is arithmetic on assumed thermal data, not a rating: ' +
        'follow the motor maker\'s stall rating, local codes and licensed practice for energised, stalled machines.',
    };
  }
  return out;
}

function fmt(x: number): string { return Number.isFinite(x) ? String(+x.toPrecision(3)) : '∞'; }
