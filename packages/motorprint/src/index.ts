/**
 * `motorprint` — the one import for lab scripts: read bench recordings, fit the DC-motor constants
 * with intervals, and diagnose what the lumped linear model leaves out.
 *
 * ```ts
 * import { readRecording, fitMotor, diagnoseFit } from 'motorprint';
 * const { recording } = await readRecording('step.csv');
 * const fit = fitMotor([{ recording }]);
 * fit.parameters.R; // => { value: 1.9, unit: 'Ω', standardError: …, interval95: […] }
 * ```
 *
 * Everything here is re-exported from the `@motorprint/*` packages; import from those directly for
 * the less common functions.
 * @packageDocumentation
 */
export {
  readRecording, ingestText, createIngestor, describeRecording, IngestError,
} from '@motorprint/ingest';
export type {
  Recording, RecordingMeta, IngestIssue, IngestOptions, IngestResult, RecordingDescription,
} from '@motorprint/ingest';
export {
  simulate, simulateDetailed, stepResponse, motorFigures, copperResistance, generateRecording, formatRecordingCsv,
  lockedRotorHoldTime, linearModelForms,
} from '@motorprint/model';
export type {
  MotorParams, DetailedParams, RecordingOptions, GeneratedRecording, LockedRotorHold, LockedRotorHoldOptions, LinearModelForms, TransferFunction,
} from '@motorprint/model';
export { releaseKernelMemory } from '@motorprint/model/kernels';
export { fitMotor, solveLeastSquares, fitCurve, planExperiments, simulatePlannedRun, checkLockedRotorHold } from '@motorprint/estimate';
export type {
  MotorFit, FitMotorOptions, MotorRecordingInput, ParameterEstimate, ExperimentPlan, PlannedRun, PlanOptions, PlannedConstant,
  PlanSuggestion, LockedRotorBudget, LockedRotorHoldCheck,
} from '@motorprint/estimate';
export { diagnoseFit, residualStats } from '@motorprint/diagnose';
export type { FitDiagnosis, DiagnosisFinding, ParameterDiagnosis } from '@motorprint/diagnose';
export {
  buildParameterSet, readParameterSet, derivedFigures, normaliseResistance, loopTuning,
  formatParameterSetJson, formatParameterSetCsv, formatParameterSetMarkdown, renderHtmlReport,
} from '@motorprint/report';
export type { ParameterSet, DerivedFigure, BuildParameterSetOptions, LoopTuningOptions, TuningSection } from '@motorprint/report';
