/**
 * `@motorprint/lot` — incoming inspection of a lot of motors: an acceptance spec (our own JSON
 * format, `docs/lot-spec.schema.json`), the plan of a lot folder (one folder per motor, named by
 * its serial), the fit of every motor on worker threads, verdicts under a stated decision rule
 * (guarded acceptance with the fit's 95 % intervals, JCGM 106:2012), lot statistics (mean, SD,
 * Cp, Cpk, robust-z outliers), a SQLite store that only ever adds lot runs, and a self-contained
 * HTML lot report. No printing and no global state; the only files read are the recordings (through
 * `@motorprint/ingest`), and the store works on bytes the caller reads and writes.
 * @packageDocumentation
 */
export type {
  DecisionRule, KeyJudgement, KeyOutlier, KeyStatistics, LotJudgement, LotRunRecord, LotSpec, MotorInput, MotorJudgement,
  MotorOutcome, MotorPlan, MotorRecording, MotorValue, MotorVerdict, PlannedRun, RunKind, SpecLimit, Verdict, VerdictCounts,
} from './types.js';
export { LotError } from './LotError.js';
export type { LotErrorCode } from './LotError.js';
export { checkableKeys } from './checkableKeys.js';
export type { CheckableKey } from './checkableKeys.js';
export { parseJsonWithPositions } from './parseJsonWithPositions.js';
export type { JsonWithPositions } from './parseJsonWithPositions.js';
export { parseLotSpec } from './parseLotSpec.js';
export { planMotorFolder, RUNS_TABLE } from './planMotorFolder.js';
export type { FolderEntry } from './planMotorFolder.js';
export { fitMotorFolder } from './fitMotorFolder.js';
export { readMotorRecordings } from './readMotorRecordings.js';
export type { FitMotorFolderOptions } from './fitMotorFolder.js';
export { fitLot } from './fitLot.js';
export type { FitLotOptions } from './fitLot.js';
export { decisionRule } from './decisionRule.js';
export { judgeKey } from './judgeKey.js';
export { judgeMotor } from './judgeMotor.js';
export { judgeLot } from './judgeLot.js';
export { keyStatistics, OUTLIER_THRESHOLD } from './keyStatistics.js';
export { robustZScores, median } from './robustZScores.js';
export { appendLotRun } from './appendLotRun.js';
export { LOT_STORE_SCHEMA_ID, LOT_STORE_TABLES } from './storeSchema.js';
export { renderLotReport } from './renderLotReport.js';
export type { LotReportInput } from './renderLotReport.js';
export { svgLotDistribution } from './svgLotDistribution.js';
export { checkLotStore } from './checkLotStore.js';
