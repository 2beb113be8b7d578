/**
 * `@motorprint/ingest`: trustworthy CSV ingest of DC-motor bench recordings. Reads comma,
 * semicolon and tab files (decimal commas, comments, BOM, CRLF, quotes), recognises the columns
 * and their units, converts them to SI through mathjs, checks the time base, and records where
 * every number came from.
 *
 * @packageDocumentation
 */
export type {
  ChannelRole,
  SignalRole,
  Recording,
  RecordingLayout,
  ExtraColumn,
  RecordingMeta,
  IngestFix,
  IngestOptionName,
  IngestIssue,
  IngestOptions,
  IngestResult,
  Dialect,
  ColumnMeta,
  UnitSource,
  DroppedRow,
  DropReason,
  TimeBase,
  DerivedChannel,
  DerivedSpeed,
  DerivedCommandVoltage,
} from './types.js';
export { CHANNEL_ROLES, SI_UNITS } from './types.js';
export { IngestError } from './IngestError.js';
export type { IngestErrorCode } from './IngestError.js';
export { createIngestor } from './createIngestor.js';
export type { Ingestor } from './createIngestor.js';
export { ingestText } from './ingestText.js';
export { readRecording } from './readRecording.js';
export { describeRecording, UNIT_SOURCE_WORDS } from './describeRecording.js';
export type { RecordingDescription, ChannelSummary } from './describeRecording.js';
export { UNIT_TABLE, EXACT_FACTORS, resolveUnit, lookupUnit, normaliseUnitText, mathjsConversion, isUnitToken, quantityOf } from './units.js';
export type { UnitDefinition, ResolvedUnit, UnitProblem, UnitQuantity } from './units.js';
export { splitHeader, detectRole, ROLE_LIMITS } from './columns.js';
export type { HeaderParts, RoleGuess } from './columns.js';
export { checkTimeBase } from './checkTimeBase.js';
export { deriveSpeed } from './deriveSpeed.js';
export { parseCellReference, classifyBadCell } from './parseCell.js';
