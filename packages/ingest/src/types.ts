/**
 * Plain data shapes produced by `@motorprint/ingest`. Everything here is JSON-able except the
 * `Float64Array` series.
 */

/** What a column measures. `time` is the time base; the others are channels. */
export type ChannelRole = 'time' | 'voltage' | 'current' | 'speed' | 'position' | 'torque' | 'temperature';

/** A channel role other than `time`. */
export type SignalRole = Exclude<ChannelRole, 'time'>;

/** Every role, in the order columns are reported. */
export const CHANNEL_ROLES: readonly ChannelRole[] = [
  'time',
  'voltage',
  'current',
  'speed',
  'position',
  'torque',
  'temperature',
];

/** The SI unit each role is converted to (temperature is kept in °C, the bench unit). */
export const SI_UNITS: Readonly<Record<ChannelRole, string>> = {
  time: 's',
  voltage: 'V',
  current: 'A',
  speed: 'rad/s',
  position: 'rad',
  torque: 'N·m',
  temperature: '°C',
};

/** A bench recording with a checked time base and channels in SI units. */
export interface Recording {
  /** Sample times [s], strictly increasing. */
  time: Float64Array;
  /** Recognised channels in SI: voltage [V], current [A], speed [rad/s], position [rad], torque [N·m], temperature [°C]. */
  channels: Partial<Record<SignalRole, Float64Array>>;
  /** Unrecognised numeric columns, kept as read (no unit conversion; blank or bad cells are NaN). */
  extra: { name: string; values: Float64Array }[];
  /** Provenance: file, hash, dialect, columns, dropped rows, time base, derived channels, issues. */
  meta: RecordingMeta;
}

/** A non-fatal finding about the input. Never logged by the library; returned to the caller. */
export interface IngestIssue {
  /** Stable machine code, e.g. `assumed-unit`, `unrecognised-column` (see the README table). */
  code: string;
  severity: 'warning' | 'info';
  /** 1-based line in the file, where one line is concerned. */
  line?: number;
  /** Header text of the column concerned. */
  column?: string;
  /** A sentence a person can act on. */
  message: string;
}

/** Why a data row was left out of the recording. */
export type DropReason =
  | 'blank-cell'
  | 'non-numeric'
  | 'non-finite'
  | 'out-of-range'
  | 'column-count'
  | 'duplicate-time';

/** A data row that was read but not kept. */
export interface DroppedRow {
  /** 1-based line number in the file. */
  line: number;
  reason: DropReason;
  /** Header text of the first offending column (absent for `column-count`). */
  column?: string;
  /** Plain-words detail, e.g. the offending cell text (cut to 40 characters). */
  detail: string;
}

/** How the file was written. */
export interface Dialect {
  delimiter: ',' | ';' | '\t';
  decimalSeparator: '.' | ',';
  /** Line ending seen first in the file; `none` for a file of one line. */
  lineEnding: 'LF' | 'CRLF' | 'CR' | 'none';
  /** The file started with a UTF-8 byte-order mark. */
  bom: boolean;
  /** How bytes were decoded: `utf-8`, `windows-1252` (fallback for non-UTF-8 text), or `string` (text was passed in). */
  encoding: 'utf-8' | 'windows-1252' | 'string';
  /** Comment lines (`#` or `//`) skipped before the header. */
  commentLines: number;
  /** Text of the first 20 comment lines before the header (each cut to 200 characters). */
  comments: string[];
  /** An Excel `sep=…` line was present before the header. */
  sepLine: boolean;
  /** 1-based line number of the header row. */
  headerLine: number;
  /** Quote characters were seen in the header or body. */
  quoted: boolean;
  /** Which parser read the body: the numeric fast scanner, papaparse, or both (chunks with quotes go to papaparse). */
  bodyParser: 'fast' | 'papaparse' | 'mixed' | 'none';
}

/** Where a column's unit came from. */
export type UnitSource = 'header' | 'option' | 'name' | 'default' | 'none';

/** One column of the file and what was made of it. */
export interface ColumnMeta {
  /** 0-based position in the row. */
  index: number;
  /** Header text as written (trimmed). */
  header: string;
  /** The name part of the header, without the unit. */
  name: string;
  /** The role given to the column, or `extra` when it is kept unconverted in `recording.extra`. */
  role: ChannelRole | 'extra';
  /** How the role was settled. */
  roleSource: 'header' | 'map' | 'none';
  /** Unit as written in the header or option (`null` when none was given). */
  unit: string | null;
  /** SI unit of the converted values (`null` for extra columns). */
  siUnit: string | null;
  /** SI value = factor · value + offset. */
  factor: number;
  offset: number;
  /** Canonical unit the alias resolved to, e.g. `rpm` for `r/min`. */
  canonicalUnit: string | null;
  unitSource: UnitSource;
  /** True when no unit was written and a default was assumed. */
  unitAssumed: boolean;
  /** Why the unit was assumed (present when `unitAssumed`). */
  unitAssumedReason?: string;
  /** Why an extra column is not in `recording.extra` (empty or wholly non-numeric). */
  ignored?: string;
}

/** Sampling of the kept rows. */
export interface TimeBase {
  /** First and last kept time [s]. */
  start: number;
  end: number;
  /** end − start [s]. */
  duration: number;
  /** Median sample interval [s]. */
  sampleInterval: number;
  /** 1 / median sample interval [Hz]. */
  sampleRate: number;
  /** Standard deviation of dt divided by the median dt [1]. */
  jitterStd: number;
  /** max |dt − median dt| divided by the median dt [1]. */
  jitterMax: number;
  /** Number of intervals longer than 3 × the median dt. */
  gaps: number;
  /** Largest interval [s]. */
  maxInterval: number;
}

/** A channel computed from another because it was not logged. */
export interface DerivedChannel {
  role: 'speed';
  from: 'position';
  /** `central-difference`: ω_k = (θ_{k+1} − θ_{k−1}) / (t_{k+1} − t_{k−1}); one-sided at the ends. */
  method: 'central-difference';
  description: string;
  /** Position quantum Δθ [rad]: 2π / counts-per-revolution, or the smallest non-zero step seen in the data. */
  quantisationStep: number;
  quantisationStepSource: 'counts-per-revolution' | 'smallest-step-in-data' | 'none';
  /** Speed noise implied by the quantum at the median dt [rad/s]: Δθ / (2·√6·dt) for the central difference. */
  speedNoiseSigma: number;
  /** The formula for `speedNoiseSigma`, in words. */
  noiseModel: string;
}

/** Provenance of a recording. */
export interface RecordingMeta {
  source: {
    /** File name or path as given (or `options.fileName`; `<text>` when none). */
    file: string;
    /** Bytes hashed (the file bytes; the UTF-8 encoding when text was passed in). */
    bytes: number;
    /** SHA-256 of those bytes, lowercase hex. */
    sha256: string;
  };
  dialect: Dialect;
  columns: ColumnMeta[];
  /** Data rows read after the header (blank and comment lines not counted). */
  rowsRead: number;
  rowsKept: number;
  /** Dropped rows with line and reason (the first `maxDroppedListed`, see `rowsDroppedCount`). */
  rowsDropped: DroppedRow[];
  /** Total number of dropped rows, listed or not. */
  rowsDroppedCount: number;
  /** Dropped rows counted by reason. */
  droppedByReason: Partial<Record<DropReason, number>>;
  timeBase: TimeBase;
  derived: DerivedChannel[];
  issues: IngestIssue[];
}

/** What every ingest entry point returns. */
export interface IngestResult {
  recording: Recording;
  /** The same array as `recording.meta.issues`. */
  issues: IngestIssue[];
}

/** Options for `createIngestor`, `ingestText` and `readRecording`. */
export interface IngestOptions {
  /** Name used in meta and error messages. @default the path for `readRecording`, else `<text>` */
  fileName?: string;
  /**
   * Explicit column for a role, by header text (trimmed, with or without the unit part) or 0-based
   * index. Overrides detection, e.g. `{ current: 'Ia (A)' }`.
   */
  map?: Partial<Record<ChannelRole, string | number>>;
  /**
   * Unit per column, keyed by header text (trimmed) or by role name, for headers without a unit,
   * e.g. `{ Ia: 'mA' }`. Overrides a unit written in the header (with an `unit-overridden` issue).
   */
  units?: Record<string, string>;
  /** Encoder counts per mechanical revolution (after quadrature). Required for positions in counts. */
  countsPerRevolution?: number;
  /** Field delimiter. @default detected from the header and first rows */
  delimiter?: ',' | ';' | '\t';
  /** Decimal separator. @default `,` only for `;`/tab files whose numbers use a comma, else `.` */
  decimalSeparator?: '.' | ',';
  /** `papaparse` reads every body row with papaparse (the reference path). @default 'auto' */
  engine?: 'auto' | 'papaparse';
  /** Derive speed from position when no speed column exists. @default true */
  deriveSpeed?: boolean;
  /** How many dropped rows to list in meta (all are counted). @default 10000 */
  maxDroppedListed?: number;
  /** Fewer kept rows than this is an error. @default 3 */
  minRows?: number;
  /** Expected size in bytes, used to pre-size the column buffers. */
  sizeHint?: number;
  /** Longest line (or quoted record) accepted, in characters, before `line-too-long`. @default 1048576 */
  maxLineLength?: number;
}
