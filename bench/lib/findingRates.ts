/**
 * False-alarm and detection rates of the findings and the model choice, on invented recordings
 * from motorprint's generator given what a real logger adds: a bipolar 12-bit ADC on voltage and
 * current (full scale 1.15 × the channel's peak, rounded up in a 1-1.2-1.5-2-2.5-3-4-5-6-8
 * series — common practice, no source), an encoder of 1000 counts per revolution with speed from
 * count differences, or sample-time jitter. Used by `pnpm bench findings` (many seeds) and by a
 * seeded test (a few).
 */
import { generateRecording } from '@motorprint/model';
import type { DetailedParams, ExperimentKind } from '@motorprint/model';
import { identifyMotor } from '@motorprint/diagnose';
import type { Recording } from '@motorprint/ingest';

/** Findings that advise on the experiment itself, not on an effect in the motor. */
export const ADVISORY_FINDINGS = new Set(['weak-excitation', 'slow-sampling', 'source-resistance']);

/** The artefacts a logger adds. */
export type Artefacts = 'adc12' | 'adc12+encoder' | 'adc12+jitter';

/** Invented 24 V motor for these rates (not a real motor). */
export const RATE_MOTOR: DetailedParams = { R: 1.9, L: 6.2e-4, Kt: 0.052, Ke: 0.052, J: 1.1e-5, b: 4e-6 };

const SERIES = [1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8];

/** Full scale of a channel: 1.15 × its peak, rounded up in the series above. */
function fullScale(x: Float64Array): number {
  let peak = 0;
  for (let k = 0; k < x.length; k++) peak = Math.max(peak, Math.abs(x[k]!));
  const want = 1.15 * Math.max(peak, 1e-12);
  const decade = 10 ** Math.floor(Math.log10(want));
  for (const s of SERIES) if (s * decade >= want) return s * decade;
  return 10 * decade;
}

/** Rounds to a bipolar 12-bit ADC's codes (±full scale over 4096 codes). */
function adc12(x: Float64Array): Float64Array {
  const lsb = (2 * fullScale(x)) / 4096;
  return Float64Array.from(x, (v) => Math.round(v / lsb) * lsb);
}

/**
 * One invented clean (lumped) recording with logger artefacts, or with one effect switched on.
 *
 * @param kind - experiment
 * @param seed - noise seed
 * @param artefacts - what the logger adds
 * @param effect - extra constants of the detailed model (e.g. `{ Tc: 2e-3 }`), default none
 * @returns a recording for `identifyMotor`
 */
export function loggedRecording(kind: ExperimentKind, seed: number, artefacts: Artefacts, effect: Partial<DetailedParams> = {}): Recording {
  const encoder = artefacts === 'adc12+encoder' && kind !== 'locked-rotor';
  const g = generateRecording({ ...RATE_MOTOR, ...effect }, kind, {
    seed,
    noise: { voltage: 0.02, current: 0.01, speed: encoder ? 0 : 0.3 },
    ...(kind === 'coast-down' ? { duration: 2 } : {}),
    ...(encoder ? { encoderCounts: 1000, logSpeed: false } : {}),
    ...(artefacts === 'adc12+jitter' ? { timeJitter: 0.02 / 10_000 } : {}),
  });
  const col = (name: string): Float64Array | undefined => g.columns.find((c) => c.name === name)?.values;
  const time = col('time')!;
  const channels: Recording['channels'] = { voltage: adc12(col('voltage')!), current: adc12(col('current')!) };
  const speed = col('speed');
  if (speed !== undefined) channels.speed = speed;
  const counts = col('position');
  if (encoder && counts !== undefined) {
    const q = (2 * Math.PI) / 1000;
    channels.speed = Float64Array.from(counts, (c, k) => (k === 0 ? 0 : ((c - counts[k - 1]!) * q) / (time[k]! - time[k - 1]!)));
  }
  return { time, channels } as Recording;
}

/** What one recording made the library say: effect findings (codes) and the chosen extensions. */
export function effectCalls(recording: Recording, name: string): { findings: string[]; extensions: string[] } {
  const id = identifyMotor([{ recording, name }]);
  const findings = [...new Set(id.diagnosis.findings.filter((f) => !ADVISORY_FINDINGS.has(f.code) && f.severity !== 'info').map((f) => f.code))];
  return { findings, extensions: id.model.extensions };
}

/** Per kind and artefact: recordings with any effect call (finding or extension) over those tried. */
export interface RateRow {
  kind: ExperimentKind;
  artefacts: Artefacts;
  tried: number;
  alarms: number;
  codes: Record<string, number>;
}

/**
 * False alarms on clean recordings.
 *
 * @param kinds - experiments
 * @param seeds - seeds per kind and artefact
 * @param artefacts - artefact sets
 * @returns one row per kind and artefact set
 */
export function falseAlarmRates(kinds: ExperimentKind[], seeds: number[], artefacts: Artefacts[]): RateRow[] {
  const rows: RateRow[] = [];
  for (const kind of kinds) {
    for (const a of artefacts) {
      if (a === 'adc12+encoder' && kind === 'locked-rotor') continue;
      const row: RateRow = { kind, artefacts: a, tried: 0, alarms: 0, codes: {} };
      for (const seed of seeds) {
        const r = loggedRecording(kind, seed, a);
        const { findings, extensions } = effectCalls(r, `${kind}-${a}-${seed}.csv`);
        const calls = [...findings, ...extensions.map((e) => `model:${e}`)];
        row.tried++;
        if (calls.length > 0) row.alarms++;
        for (const c of calls) row.codes[c] = (row.codes[c] ?? 0) + 1;
      }
      rows.push(row);
    }
  }
  return rows;
}
