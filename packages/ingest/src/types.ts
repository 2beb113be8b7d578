/**
 * Plain data shapes produced by `@motorprint/ingest`. Everything here is JSON-able except the
 * `Float64Array` series.
 */

/**
 * What a column measures. `time` is the time base; the others are channels. The four voltage-like
 * roles are kept apart: `voltage` is the motor's **terminal** voltage only; `supplyVoltage` is a
 * bus, battery or supply voltage measured before the drive or a source resistance;
 * `commandVoltage` is the voltage the drive is told to put on the motor (a command, reference,
 * set-point or DAC output, times the drive gain); `duty` is a PWM duty cycle as a fraction 0…1.
 */
export type ChannelRole =
  | 'time'
  | 'voltage'
  | 'supplyVoltage'
  | 'commandVoltage'
  | 'duty'
  | 'current'
  | 'speed'
  | 'position'
  | 'torque'
  | 'temperature';

/** A channel role other than `time`. */
export type SignalRole = Exclude<ChannelRole, 'time'>;

/** Every role, in the order columns are reported. */
export const CHANNEL_ROLES: readonly ChannelRole[] = [
  'time',
  'voltage',
  'supplyVoltage',
  'commandVoltage',
  'duty',
  'current',
  'speed',
  'position',
  'torque',
  'temperature',
];

/** The SI unit each role is converted to (temperature is kept in °C, the bench unit; duty is a fraction, `1`). */
export const SI_UNITS: Readonly<Record<ChannelRole, string>> = {
  time: 's',
  voltage: 'V',
  supplyVoltage: 'V',
  commandVoltage: 'V',
  duty: '1',
  current: 'A',
  speed: 'rad/s',
  position: 'rad',
  torque: 'N·m',
  temperature: '°C',
};

/**
 * How the rows of a recording relate: `series` rows are samples in time; `table` rows are
 * operating points (a steady-state table: one row per point, no time column).
 */
export type RecordingLayout = 'series' | 'table';

/** A column kept in `recording.extra`: not converted, with the reason it is not a channel. */
export interface ExtraColumn {
  /** Header text (or `column N` for a blank header). */
  name: string;
  /** Values as read (no unit conversion; blank or bad cells are NaN). */
  values: Float64Array;
  /** Why the column is not a measured channel, e.g. a speed set-point or an unrecognised name. */
  reason: string;
}

/** A bench recording with a checked time base (or a table of operating points) and channels in SI units. */
export interface Recording {
  /**
   * `series`: sample times [s], strictly increasing. `table`: the row ordinal 0, 1, 2, … — **not a
   * time**, only the order of the operating points as written (rows are never reordered).
   */
  time: Float64Array;
  /** `series` (samples in time, the default) or `table` (one row per operating point, no time column). */
  layout: RecordingLayout;
  /**
   * Recognised channels in SI: voltage (terminal) [V], supplyVoltage [V], commandVoltage [V],
   * duty [1], current [A], speed [rad/s], position [rad], torque [N·m], temperature [°C].
   */
  channels: Partial<Record<SignalRole, Float64Array>>;
  /**
   * Spread (standard deviation) columns logged beside a channel, e.g. `speed_sd` in a steady-state
   * table, in the channel's SI unit; blank or bad cells are NaN. Empty when none was logged.
   */
  spread: Partial<Record<SignalRole, Float64Array>>;
  /** Columns that are not measured channels (set-points, unrecognised names), kept unconverted. */
  extra: ExtraColumn[];
  /** Provenance: file, hash, dialect, columns, dropped rows, time base, derived channels, issues. */
  meta: RecordingMeta;
}

/** A non-fatal finding about the input. Never logged by the library; returned to the caller. */
export interface IngestIssue {
  /** Stable machine code, e.g. `assumed-unit`, `unrecognised-column` (see the README table). */
  code: string;
  /** The options that settle it, with concrete values where known (a command line names its own flags). */
  fix?: IngestFix[];
  severity: 'warning' | 'info';
  /** 1-based line in the file, where one line is concerned. */
  line?: number;
  /** Header text of the column concerned. */
  column?: string;
  /** A sentence a person can act on. */
  message: string;
}

/** Names of the {@link IngestOptions} a message may point to. */
export type IngestOptionName = 'map' | 'units' | 'countsPerRevolution' | 'pwmMax' | 'supplyVoltage' | 'driveGain' | 'decimalSeparator' | 'maxDroppedListed';

/**
 * An option that settles a problem. Library messages describe the fix in plain words without
 * naming options; a caller (e.g. the command line) shows its own spelling of `option`.
 */
export interface IngestFix {
  option: IngestOptionName;
  /** Concrete entries, e.g. `[['speed', '1st motor velocity']]` for `map`; absent when any value may do. */
  entries?: [string, string][];
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
  /** 1-based line number of the header (names) row. */
  headerLine: number;
  /** 1-based line number of a units row directly under the names row (DAQ exports), or null. */
  unitsLine: number | null;
  /** 1-based line number of a short-name row under the units row, or null. */
  shortNamesLine: number | null;
  /** Quote characters were seen in the header or body. */
  quoted: boolean;
  /** Which parser read the body: the numeric fast scanner, papaparse, or both (chunks with quotes go to papaparse). */
  bodyParser: 'fast' | 'papaparse' | 'mixed' | 'none';
}

/**
 * Where a column's unit came from: written in the header as `name [unit]` (`header-brackets`),
 * `name (unit)` (`header-parens`), `name / unit` (`header-slash`) or `name_unit` / `name unit`
 * (`header-suffix`); on a units row under the names row (`units-row`); given by the caller
 * (`option`); implied by the name itself, e.g. `rpm` (`name`); assumed by default (`default`, the
 * last resort); or none at all (`none`, extra columns only).
 */
export type UnitSource =
  | 'header-brackets'
  | 'header-parens'
  | 'header-slash'
  | 'header-suffix'
  | 'units-row'
  | 'option'
  | 'name'
  | 'default'
  | 'none';

/** One column of the file and what was made of it. */
export interface ColumnMeta {
  /** 0-based position in the row. */
  index: number;
  /** Header text as written (trimmed). */
  header: string;
  /** The name part of the header, without the unit. */
  name: string;
  /**
   * The role given to the column; `spread` for a standard-deviation column of a channel (see
   * `spreadOf`, values in `recording.spread`); `extra` when it is kept unconverted in `recording.extra`.
   */
  role: ChannelRole | 'spread' | 'extra';
  /** For a `spread` column: the channel whose spread it holds. */
  spreadOf?: SignalRole;
  /** How the role was settled: from the header name, from the short-name row, from the caller's map, or not at all. */
  roleSource: 'header' | 'short-name' | 'map' | 'none';
  /** The short name from a short-name row under the units row (DAQ exports), when there is one. */
  shortName?: string;
  /** Why the column is extra (absent for channels). */
  reason?: string;
  /** Unit as written in the header or option (`null` when none was given). */
  unit: string | null;
  /** SI unit of the converted values (`null` for extra columns). */
  siUnit: string | null;
  /** SI value = factor · value + offset (for a command column the factor includes the drive gain). */
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

/** A channel computed from others because it was not logged. */
export type DerivedChannel = DerivedSpeed | DerivedCommandVoltage;

/** Command voltage computed from a PWM duty and the supply voltage. */
export interface DerivedCommandVoltage {
  role: 'commandVoltage';
  from: 'duty';
  /** `duty-times-supply`: commandVoltage_k = duty_k · supply (the mean voltage a PWM bridge applies). */
  method: 'duty-times-supply';
  /** Where the supply came from: the caller's constant, or the logged `supplyVoltage` channel sample by sample. */
  supplySource: 'option' | 'channel';
  /** The constant supply [V] (`option`), or null (`channel`). */
  supplyVoltage: number | null;
  description: string;
}

/** Speed computed from position by central differences. */
export interface DerivedSpeed {
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
  /** Drive gain applied to the command column (commandVoltage = gain · command) [V/V]. @default 1 */
  driveGain: number;
  /** Dropped rows with line and reason (the first `maxDroppedListed`, see `rowsDroppedCount`). */
  rowsDropped: DroppedRow[];
  /** Total number of dropped rows, listed or not. */
  rowsDroppedCount: number;
  /** Dropped rows counted by reason. */
  droppedByReason: Partial<Record<DropReason, number>>;
  /** Sampling of the kept rows; `null` for a `table` layout, which has no time. */
  timeBase: TimeBase | null;
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
   * Gain of the drive: the command column is multiplied by it, so that `commandVoltage` is the
   * voltage the drive is told to put on the motor (e.g. 2.4 for a ±10 V command to a ±24 V
   * amplifier). Recorded in `meta.driveGain`. @default 1
   */
  driveGain?: number;
  /**
   * Supply voltage of a PWM bridge [V], for turning a logged duty into a command voltage
   * (commandVoltage = duty · supply). A logged `supplyVoltage` channel is used instead when present.
   */
  supplyVoltage?: number;
  /** Full-scale PWM count (duty = count / pwmMax) for a duty logged in timer counts. */
  pwmMax?: number;
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
  /** Fewer kept rows than this is an error. @default 3 (2 for a table of operating points) */
  minRows?: number;
  /** Expected size in bytes, used to pre-size the column buffers. */
  sizeHint?: number;
  /** Longest line (or quoted record) accepted, in characters, before `line-too-long`. @default 1048576 */
  maxLineLength?: number;
}
