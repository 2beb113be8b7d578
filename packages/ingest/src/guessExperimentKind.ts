import type { Recording } from './types.js';

/** Experiment kinds in trade terms. */
export type ExperimentKind = 'locked-rotor' | 'step' | 'coast-down' | 'steady-state' | 'rich' | 'unknown';

/** A guess at what a recording shows, with the evidence in one plain sentence. */
export interface ExperimentGuess {
  kind: ExperimentKind;
  /** A torque channel is present and carries more than 1 mN·m (98th percentile of |τ|). */
  loaded: boolean;
  /** Plain sentence with the numbers behind the guess. */
  reason: string;
}

/** Speed below this [rad/s] (≈ 9.5 r/min) counts as standing still. */
const STILL = 1;
/** A torque channel whose 98th percentile |τ| reaches this [N·m] makes the run "loaded". */
const LOADED_TORQUE = 1e-3;
/** More level changes than this, without settled plateaus, is rich excitation. */
const RICH_SWITCHES = 6;

function fmt(x: number, unit: string): string {
  return `${Number(x.toPrecision(3))} ${unit}`;
}

/** Percentile of |x| or x on a strided subsample of at most 65 536 points (enough for a guess). */
function percentile(x: Float64Array, p: number, abs = false): number {
  const stride = Math.max(1, Math.floor(x.length / 65536));
  const m = Math.ceil(x.length / stride);
  const s = new Float64Array(m);
  for (let k = 0, j = 0; k < x.length; k += stride, j++) s[j] = abs ? Math.abs(x[k]!) : x[k]!;
  s.sort();
  return s[Math.min(m - 1, Math.max(0, Math.round((p / 100) * (m - 1))))]!;
}

/** Noise level of a series from its first differences: median |Δx| / (0.6745·√2). */
function noiseOf(x: Float64Array): number {
  const n = Math.min(x.length - 1, 65536);
  const stride = Math.max(1, Math.floor((x.length - 1) / n));
  const d = new Float64Array(n);
  for (let j = 0, k = 0; j < n; j++, k += stride) d[j] = Math.abs(x[k + 1]! - x[k]!);
  d.sort();
  return d[Math.floor(n / 2)]! / (0.6745 * Math.SQRT2);
}

function mean(x: Float64Array, from: number, to: number): number {
  let s = 0;
  for (let k = from; k < to; k++) s += x[k]!;
  return to > from ? s / (to - from) : Number.NaN;
}

interface Segment {
  start: number;
  end: number;
  level: number;
}

/**
 * Splits a series into runs of nearly constant level: a run ends when three samples in a row lie
 * more than `tol` from the run's mean.
 */
function segments(x: Float64Array, tol: number): Segment[] {
  const out: Segment[] = [];
  let start = 0;
  let sum = x[0]!;
  let count = 1;
  let away = 0;
  for (let k = 1; k < x.length; k++) {
    const level = sum / count;
    if (Math.abs(x[k]! - level) > tol) {
      away++;
      if (away >= 3) {
        const cut = k - away + 1;
        out.push({ start, end: cut, level });
        start = cut;
        sum = 0;
        count = 0;
        for (let j = cut; j <= k; j++) {
          sum += x[j]!;
          count++;
        }
        away = 0;
      }
    } else {
      away = 0;
      sum += x[k]!;
      count++;
    }
  }
  out.push({ start, end: x.length, level: sum / count });
  return out;
}

/**
 * Guesses the experiment kind from simple evidence in the channels (SI units).
 *
 * ## Method
 * The voltage (or, without one, the current) is split into runs within max(5 % of its range,
 * 4σ noise); a run is a plateau when it is long (≥ 2 % of the record) and flat (its first and
 * last fifths differ by less than a third of that tolerance). Then, in order:
 * - speed within ±1 rad/s while current flows → `locked-rotor`; without a speed channel, a current
 *   that rises to its peak and stays there (last fifth ≥ 80 % of the peak) → `locked-rotor`;
 * - at least three plateaux covering 80 % of the record, the speed settled at the end of most →
 *   `steady-state`;
 * - over the last 40 % of the record the current is ≈ 0 (90th percentile |i| ≤ 5σ noise), the
 *   voltage is ≈ 0 or follows the speed (back EMF, open terminals), and the speed falls steadily by
 *   10 % or more → `coast-down`;
 * - more than six level changes → `rich` (PRBS, multisine);
 * - one level change (or a record that starts at the step) with the speed moving by more than half
 *   its final value and then settling → `step`; a single plateau with settled speed →
 *   `steady-state`.
 * `loaded` is set when a torque channel's 98th percentile |τ| reaches 1 mN·m.
 *
 * @param recording - a recording from `ingestText` / `readRecording`
 * @returns the kind, whether a load torque was measured, and the reason in one sentence
 * @example
 * guessExperimentKind(recording)
 * // => { kind: 'step', loaded: false, reason: 'voltage steps once from 0 V to 24 V; speed goes from 0.2 rad/s to 460 rad/s and settles.' }
 */
export function guessExperimentKind(recording: Recording): ExperimentGuess {
  const { voltage, current, speed, torque } = recording.channels;
  const n = recording.time.length;
  let loaded = false;
  let loadNote = '';
  if (torque && n > 0) {
    const t98 = percentile(torque, 98, true);
    loaded = t98 >= LOADED_TORQUE;
    loadNote = loaded ? `; a load torque of up to ${fmt(t98, 'N·m')} was measured` : '';
  }
  const answer = (kind: ExperimentKind, reason: string): ExperimentGuess => ({ kind, loaded, reason: reason + loadNote + '.' });
  if (n < 10) return answer('unknown', `only ${n} samples`);

  const iNoise = current ? noiseOf(current) : 0;
  const iPeak = current ? percentile(current, 99, true) : 0;
  const iFlows = current ? iPeak > Math.max(1e-3, 5 * iNoise) : false;
  const wPeak = speed ? percentile(speed, 99, true) : 0;
  const vPeak = voltage ? percentile(voltage, 99, true) : 0;

  if (speed && wPeak < STILL && (iFlows || vPeak > 0.1)) {
    return answer(
      'locked-rotor',
      `speed stays below ${fmt(wPeak, 'rad/s')} (99th percentile of |ω|) while ${iFlows ? `current reaches ${fmt(iPeak, 'A')}` : `voltage reaches ${fmt(vPeak, 'V')}`}`,
    );
  }

  const drive = voltage ?? current;
  const driveName = voltage ? 'voltage' : 'current';
  const driveUnit = voltage ? 'V' : 'A';
  if (!drive) {
    return answer('unknown', speed ? 'there is no voltage or current channel to tell the excitation' : 'there is no voltage, current or speed channel');
  }
  const lo = percentile(drive, 1);
  const hi = percentile(drive, 99);
  const range = hi - lo;
  const dPeak = Math.max(Math.abs(lo), Math.abs(hi));
  const nearZero = Math.max(0.05 * dPeak, voltage ? 0.1 : 1e-3);
  const tol = Math.max(0.05 * range, 4 * noiseOf(drive), 1e-9);
  const segs = segments(drive, tol);
  const minPlateau = Math.max(20, Math.floor(0.02 * n));
  const flat = (s: Segment): boolean => {
    const fifth = Math.max(1, Math.floor((s.end - s.start) / 5));
    return Math.abs(mean(drive, s.start, s.start + fifth) - mean(drive, s.end - fifth, s.end)) < tol / 3;
  };
  const plateaux = segs.filter((s) => s.end - s.start >= minPlateau && flat(s));
  const inPlateaux = plateaux.reduce((a, s) => a + s.end - s.start, 0) / n;
  const switches = segs.length - 1;

  if (!speed) {
    const last = plateaux[plateaux.length - 1];
    if (current && voltage && last && Math.abs(last.level) > nearZero && iFlows) {
      const len = last.end - last.start;
      const iPeakHere = percentile(current.subarray(last.start, last.end), 99, true);
      const iEnd = Math.abs(mean(current, last.end - Math.floor(len / 5), last.end));
      if (iEnd >= 0.8 * iPeakHere) {
        return answer(
          'locked-rotor',
          `there is no speed channel, and after the step to ${fmt(last.level, 'V')} the current rises to ${fmt(iPeakHere, 'A')} and stays there (${Math.round((100 * iEnd) / iPeakHere)} % of it at the end), as with the rotor held`,
        );
      }
    }
    if (switches > RICH_SWITCHES) {
      return answer('rich', `${driveName} changes level ${switches} times (PRBS- or multisine-like); there is no speed channel`);
    }
    return answer('unknown', `there is no speed or position channel, so a locked rotor cannot be told from a free run (${driveName} has ${plateaux.length} plateaux); declare the kind`);
  }

  const settledAt = (s: Segment): boolean => {
    const len = s.end - s.start;
    const a = mean(speed, s.end - Math.floor(0.4 * len), s.end - Math.floor(0.2 * len));
    const b = mean(speed, s.end - Math.floor(0.2 * len), s.end);
    return Math.abs(b - a) <= 0.05 * Math.max(Math.abs(b), 0.1 * wPeak);
  };

  const settledCount = plateaux.filter(settledAt).length;
  if (plateaux.length >= 3 && inPlateaux >= 0.8 && settledCount >= 0.7 * plateaux.length) {
    return answer(
      'steady-state',
      `${driveName} holds ${plateaux.length} plateaux from ${fmt(Math.min(...plateaux.map((p) => p.level)), driveUnit)} to ${fmt(Math.max(...plateaux.map((p) => p.level)), driveUnit)} and the speed settles on ${settledCount} of them`,
    );
  }

  // Coast-down: the last 40 % without drive, speed falling steadily.
  const tail = Math.floor(0.6 * n);
  const part = Math.floor((n - tail) / 5);
  const parts = [0, 1, 2, 3, 4].map((j) => Math.abs(mean(speed, tail + j * part, tail + (j + 1) * part)));
  const falling = parts.every((w, j) => j === 0 || w < parts[j - 1]!);
  const w0 = parts[0]!;
  const w1 = parts[4]!;
  if (falling && w0 > STILL && w0 >= 0.3 * wPeak && w1 <= 0.9 * w0) {
    const iTail = current ? percentile(current.subarray(tail), 90, true) : 0;
    const noCurrent = !current || iTail <= Math.max(5 * iNoise, 1e-3);
    let voltageNote = 'there is no voltage channel';
    let voltageOk = !voltage;
    if (voltage) {
      const v0 = mean(voltage, tail, tail + part);
      const v1 = mean(voltage, n - part, n);
      if (Math.abs(v0) <= nearZero && Math.abs(v1) <= nearZero) {
        voltageOk = true;
        voltageNote = `the voltage is ≈ 0 (${fmt(v1, 'V')})`;
      } else {
        const r0 = v0 / w0;
        const r1 = v1 / w1;
        if (Math.abs(r1 - r0) <= 0.2 * Math.abs(r0)) {
          voltageOk = true;
          voltageNote = `the voltage follows the speed (${fmt(r1, 'V·s/rad')}, back EMF at open terminals)`;
        }
      }
    }
    if (noCurrent && voltageOk) {
      return answer(
        'coast-down',
        `over the last 40 % of the record the speed falls from ${fmt(w0, 'rad/s')} to ${fmt(w1, 'rad/s')}, ` +
          `${current ? `the current is ≈ 0 (90th percentile ${fmt(iTail, 'A')})` : 'there is no current channel'} and ${voltageNote}`,
      );
    }
  }

  if (switches > RICH_SWITCHES) {
    return answer(
      'rich',
      `${driveName} changes level ${switches} times and the speed settles on ${settledCount} of ${plateaux.length} plateaux (PRBS- or multisine-like excitation)`,
    );
  }
  const last = segs[segs.length - 1]!;
  const main = plateaux.length ? plateaux.reduce((a, b) => (b.end - b.start > a.end - a.start ? b : a)) : last;
  if (plateaux.length <= 2 && Math.abs(main.level) > nearZero && settledAt(main)) {
    const ws = mean(speed, main.start, main.start + Math.min(5, main.end - main.start));
    const we = mean(speed, main.end - Math.max(1, Math.floor(0.05 * (main.end - main.start))), main.end);
    const before = main === segs[0] ? Number.NaN : segs[0]!.level;
    if (Math.abs(we - ws) > 0.5 * Math.abs(we)) {
      const from = Number.isNaN(before) ? 'the record starts at the step to' : `${driveName} steps once from ${fmt(before, driveUnit)} to`;
      return answer('step', `${from} ${fmt(main.level, driveUnit)}; speed goes from ${fmt(ws, 'rad/s')} to ${fmt(we, 'rad/s')} and settles`);
    }
    if (plateaux.length === 1) {
      return answer('steady-state', `${driveName} is steady at ${fmt(main.level, driveUnit)} and the speed is settled at ${fmt(we, 'rad/s')} (one operating point)`);
    }
  }
  return answer(
    'unknown',
    `${driveName} has ${plateaux.length} plateaux and ${switches} level changes, speed peaks at ${fmt(wPeak, 'rad/s')}; no rule fits`,
  );
}
