import type { ChannelRole, DropReason, IngestIssue, IngestResult, RecordingLayout, SignalRole, UnitSource } from './types.js';
import { CHANNEL_ROLES, SI_UNITS } from './types.js';

/** min / max / mean of a channel in SI (`null` when no finite value). */
export interface ChannelSummary {
  unit: string;
  min: number | null;
  max: number | null;
  mean: number | null;
  /** True when the channel was computed (e.g. speed from position), not read. */
  derived: boolean;
}

/** Words for where a unit came from, as `inspect` prints them after the unit (`deg/s (suffix)`). */
export const UNIT_SOURCE_WORDS: Readonly<Record<UnitSource, string>> = {
  'header-brackets': 'brackets',
  'header-parens': 'parentheses',
  'header-slash': 'slash',
  'header-suffix': 'suffix',
  'units-row': 'units row',
  option: 'given',
  name: 'from the name',
  default: 'assumed',
  none: '',
};

/**
 * The plain, JSON-able description printed by `motorprint inspect`. Field names and meanings are
 * stable within `schema: 'motorprint.inspect/2'`; fields may be added, never renamed. (Version 2:
 * `layout`, unit provenance, the voltage roles and spreads; `sampling` and `timeSpan` are null for
 * a table; the experiment kind is no longer part of it — the command line adds it from the
 * estimator's classifier.)
 */
export interface RecordingDescription {
  schema: 'motorprint.inspect/2';
  file: string;
  bytes: number;
  sha256: string;
  dialect: {
    delimiter: string;
    decimalSeparator: string;
    lineEnding: string;
    bom: boolean;
    encoding: string;
    commentLines: number;
    headerLine: number;
    unitsLine: number | null;
    shortNamesLine: number | null;
    quoted: boolean;
    bodyParser: string;
  };
  /** `series` (samples in time) or `table` (one row per operating point; no sampling, no time span). */
  layout: RecordingLayout;
  /** Drive gain applied to a command column [V/V]. */
  driveGain: number;
  columns: {
    header: string;
    /** Short name from a short-name row, when the file has one. */
    shortName?: string;
    role: ChannelRole | 'spread' | 'extra';
    /** For a spread column: the channel it belongs to. */
    spreadOf?: SignalRole;
    unit: string | null;
    /** Where the unit came from (see {@link UnitSource}). */
    unitSource: UnitSource;
    siUnit: string | null;
    factor: number;
    offset: number;
    assumed: boolean;
    note?: string;
  }[];
  rows: {
    read: number;
    kept: number;
    dropped: number;
    droppedByReason: Partial<Record<DropReason, number>>;
    droppedRows: { line: number; reason: DropReason; column?: string; detail: string }[];
  };
  sampling: { sampleRate: number; sampleInterval: number; jitterStd: number; jitterMax: number; gaps: number; maxInterval: number } | null;
  timeSpan: { start: number; end: number; duration: number } | null;
  channels: Partial<Record<SignalRole, ChannelSummary>>;
  /** Summaries of the spread (SD) columns, in the channel's SI unit. */
  spread: Partial<Record<SignalRole, ChannelSummary>>;
  extra: { name: string; reason: string; min: number | null; max: number | null; mean: number | null; nonFinite: number }[];
  /** Channels computed from others: `quantisationStep` and `speedNoiseSigma` for speed from position; `supplyVoltage` (null when logged) for a command from a duty. */
  derived: { role: string; from: string; method: string; description: string; quantisationStep?: number; speedNoiseSigma?: number; supplyVoltage?: number | null }[];
  issues: IngestIssue[];
}

function summarise(x: Float64Array): { min: number | null; max: number | null; mean: number | null; nonFinite: number } {
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  // Neumaier compensated sum.
  let sum = 0;
  let comp = 0;
  let count = 0;
  for (let k = 0; k < x.length; k++) {
    const v = x[k]!;
    if (!Number.isFinite(v)) continue;
    if (v < min) min = v;
    if (v > max) max = v;
    const t = sum + v;
    comp += Math.abs(sum) >= Math.abs(v) ? sum - t + v : v - t + sum;
    sum = t;
    count++;
  }
  if (count === 0) return { min: null, max: null, mean: null, nonFinite: x.length };
  return { min, max, mean: (sum + comp) / count, nonFinite: x.length - count };
}

/**
 * Describes an ingest result as plain JSON-able data for people and the CLI: file, hash, dialect,
 * columns (with where each unit came from), rows, sampling, time span (none for a table),
 * per-channel min / max / mean in SI, and the issues. The experiment kind is not part of it: that
 * is the estimator's to say.
 *
 * @param result - from `ingestText`, `readRecording` or `createIngestor().finish()`
 * @returns a {@link RecordingDescription}
 * @example
 * describeRecording(ingestText(csv)).channels.voltage // => { unit: 'V', min: 0, max: 12, mean: 11.9, derived: false }
 */
export function describeRecording(result: IngestResult): RecordingDescription {
  const { recording } = result;
  const meta = recording.meta;
  const derivedRoles = new Set<string>(meta.derived.map((d) => d.role));
  const channels: Partial<Record<SignalRole, ChannelSummary>> = {};
  const spread: Partial<Record<SignalRole, ChannelSummary>> = {};
  for (const role of CHANNEL_ROLES) {
    if (role === 'time') continue;
    const x = recording.channels[role];
    if (x) {
      const s = summarise(x);
      channels[role] = { unit: SI_UNITS[role], min: s.min, max: s.max, mean: s.mean, derived: derivedRoles.has(role) };
    }
    const sd = recording.spread[role];
    if (sd) {
      const s = summarise(sd);
      spread[role] = { unit: SI_UNITS[role], min: s.min, max: s.max, mean: s.mean, derived: false };
    }
  }
  const tb = meta.timeBase;
  return {
    schema: 'motorprint.inspect/2',
    file: meta.source.file,
    bytes: meta.source.bytes,
    sha256: meta.source.sha256,
    dialect: {
      delimiter: meta.dialect.delimiter,
      decimalSeparator: meta.dialect.decimalSeparator,
      lineEnding: meta.dialect.lineEnding,
      bom: meta.dialect.bom,
      encoding: meta.dialect.encoding,
      commentLines: meta.dialect.commentLines,
      headerLine: meta.dialect.headerLine,
      unitsLine: meta.dialect.unitsLine,
      shortNamesLine: meta.dialect.shortNamesLine,
      quoted: meta.dialect.quoted,
      bodyParser: meta.dialect.bodyParser,
    },
    layout: recording.layout,
    driveGain: meta.driveGain,
    columns: meta.columns.map((c) => {
      const out: RecordingDescription['columns'][number] = {
        header: c.header,
        role: c.role,
        unit: c.unit ?? (c.unitAssumed ? c.canonicalUnit : null),
        unitSource: c.unitSource,
        siUnit: c.siUnit,
        factor: c.factor,
        offset: c.offset,
        assumed: c.unitAssumed,
      };
      if (c.shortName !== undefined) out.shortName = c.shortName;
      if (c.spreadOf !== undefined) out.spreadOf = c.spreadOf;
      if (c.unitAssumedReason) out.note = c.unitAssumedReason;
      if (c.role === 'extra' && c.reason) out.note = c.reason;
      if (c.role === 'commandVoltage' && meta.driveGain !== 1) out.note = `times the drive gain ${meta.driveGain}`;
      if (c.ignored) out.note = `not kept: ${c.ignored}`;
      return out;
    }),
    rows: {
      read: meta.rowsRead,
      kept: meta.rowsKept,
      dropped: meta.rowsDroppedCount,
      droppedByReason: { ...meta.droppedByReason },
      droppedRows: meta.rowsDropped.map((r) => ({ ...r })),
    },
    sampling: tb
      ? { sampleRate: tb.sampleRate, sampleInterval: tb.sampleInterval, jitterStd: tb.jitterStd, jitterMax: tb.jitterMax, gaps: tb.gaps, maxInterval: tb.maxInterval }
      : null,
    timeSpan: tb ? { start: tb.start, end: tb.end, duration: tb.duration } : null,
    channels,
    spread,
    extra: recording.extra.map((e) => ({ name: e.name, reason: e.reason, ...summarise(e.values) })),
    derived: meta.derived.map((d) =>
      d.role === 'speed'
        ? { role: d.role, from: d.from, method: d.method, description: d.description, quantisationStep: d.quantisationStep, speedNoiseSigma: d.speedNoiseSigma }
        : { role: d.role, from: d.from, method: d.method, description: d.description, supplyVoltage: d.supplyVoltage },
    ),
    issues: meta.issues.map((i) => ({ ...i, ...(i.fix ? { fix: i.fix.map((f) => ({ ...f })) } : {}) })),
  };
}
