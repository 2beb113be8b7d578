import { guessExperimentKind } from './guessExperimentKind.js';
import type { ExperimentGuess } from './guessExperimentKind.js';
import type { ChannelRole, DropReason, IngestIssue, IngestResult, SignalRole } from './types.js';
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

/**
 * The plain, JSON-able description printed by `motorprint inspect`. Field names and meanings are
 * stable within `schema: 'motorprint.inspect/1'`; fields may be added, never renamed.
 */
export interface RecordingDescription {
  schema: 'motorprint.inspect/1';
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
    quoted: boolean;
    bodyParser: string;
  };
  columns: {
    header: string;
    role: ChannelRole | 'extra';
    unit: string | null;
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
  sampling: { sampleRate: number; sampleInterval: number; jitterStd: number; jitterMax: number; gaps: number; maxInterval: number };
  timeSpan: { start: number; end: number; duration: number };
  channels: Partial<Record<SignalRole, ChannelSummary>>;
  extra: { name: string; min: number | null; max: number | null; mean: number | null; nonFinite: number }[];
  derived: { role: string; from: string; method: string; quantisationStep: number; speedNoiseSigma: number }[];
  kind: ExperimentGuess;
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
 * columns, rows, sampling, time span, per-channel min / max / mean in SI, the experiment-kind
 * guess with its reason, and the issues.
 *
 * @param result - from `ingestText`, `readRecording` or `createIngestor().finish()`
 * @returns a {@link RecordingDescription}
 * @example
 * describeRecording(ingestText(csv)).channels.voltage // => { unit: 'V', min: 0, max: 12, mean: 11.9, derived: false }
 */
export function describeRecording(result: IngestResult): RecordingDescription {
  const { recording } = result;
  const meta = recording.meta;
  const derivedRoles = new Set(meta.derived.map((d) => d.role));
  const channels: Partial<Record<SignalRole, ChannelSummary>> = {};
  for (const role of CHANNEL_ROLES) {
    if (role === 'time') continue;
    const x = recording.channels[role];
    if (!x) continue;
    const s = summarise(x);
    channels[role] = { unit: SI_UNITS[role], min: s.min, max: s.max, mean: s.mean, derived: derivedRoles.has(role as 'speed') };
  }
  return {
    schema: 'motorprint.inspect/1',
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
      quoted: meta.dialect.quoted,
      bodyParser: meta.dialect.bodyParser,
    },
    columns: meta.columns.map((c) => {
      const out: RecordingDescription['columns'][number] = {
        header: c.header,
        role: c.role,
        unit: c.unit ?? (c.unitAssumed ? c.canonicalUnit : null),
        siUnit: c.siUnit,
        factor: c.factor,
        offset: c.offset,
        assumed: c.unitAssumed,
      };
      if (c.unitAssumedReason) out.note = c.unitAssumedReason;
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
    sampling: {
      sampleRate: meta.timeBase.sampleRate,
      sampleInterval: meta.timeBase.sampleInterval,
      jitterStd: meta.timeBase.jitterStd,
      jitterMax: meta.timeBase.jitterMax,
      gaps: meta.timeBase.gaps,
      maxInterval: meta.timeBase.maxInterval,
    },
    timeSpan: { start: meta.timeBase.start, end: meta.timeBase.end, duration: meta.timeBase.duration },
    channels,
    extra: recording.extra.map((e) => ({ name: e.name, ...summarise(e.values) })),
    derived: meta.derived.map((d) => ({ role: d.role, from: d.from, method: d.method, quantisationStep: d.quantisationStep, speedNoiseSigma: d.speedNoiseSigma })),
    kind: guessExperimentKind(recording),
    issues: meta.issues.map((i) => ({ ...i })),
  };
}
