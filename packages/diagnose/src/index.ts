/**
 * `@motorprint/diagnose` — how far to trust a motor fit: Student-t confidence intervals,
 * correlations and conditioning, identifiability with reasons, residual statistics (RMS, NRMSE,
 * autocorrelation, Ljung–Box, runs test), nested-model comparison (F, likelihood ratio, AIC, BIC),
 * and findings about what the lumped linear model leaves out (friction, stiction, saturation,
 * heating, sampling, offsets, delays).
 * @packageDocumentation
 */
export type {
  ChannelName, RecordingLike, ParameterConfidence, ConfidenceReport, RecordingKind, RecordingDescription,
  IdentifiabilityVerdict, LjungBoxResult, RunsTestResult, ResidualStats, FindingSeverity, Finding, ModelSummary,
  ModelComparison, LinearFit, CovarianceSummary, ParameterDiagnosis, ChannelResidualDiagnosis, FindingOrigin,
  DiagnosisFinding, DiagnosisComparison, DiagnoseFitOptions, FitDiagnosis,
  ModelCandidate, UnsupportedConstant, HeldOutCheck, Identification,
} from './types.js';
export { identifyMotor } from './identifyMotor.js';
export type { IdentifyOptions } from './identifyMotor.js';
export { checkHeldOut } from './checkHeldOut.js';
export { diagnoseFit } from './diagnoseFit.js';
export { detectResidualTrend } from './detectResidualTrend.js';
export { detectResidualCoulomb } from './detectResidualCoulomb.js';
export { detectResidualDelay } from './detectResidualDelay.js';
export { confidenceIntervals } from './confidenceIntervals.js';
export { correlationFromCovariance } from './correlationFromCovariance.js';
export { assessIdentifiability } from './assessIdentifiability.js';
export { autocorrelationInto } from './autocorrelationInto.js';
export { ljungBoxTest } from './ljungBoxTest.js';
export { runsTest } from './runsTest.js';
export { residualStats } from './residualStats.js';
export { nestedFTest } from './nestedFTest.js';
export { likelihoodRatioTest } from './likelihoodRatioTest.js';
export { informationCriteria } from './informationCriteria.js';
export { compareNestedModels } from './compareNestedModels.js';
export { fitLinearModel } from './fitLinearModel.js';
export { mechanicalRegression } from './mechanicalRegression.js';
export type { MechanicalRegressionInput, MechanicalRegression } from './mechanicalRegression.js';
export { detectFriction } from './detectFriction.js';
export { detectStiction } from './detectStiction.js';
export { detectSaturation } from './detectSaturation.js';
export { detectWindingHeating } from './detectWindingHeating.js';
export { detectSlowSampling } from './detectSlowSampling.js';
export { detectSensorOffset } from './detectSensorOffset.js';
export { detectInputDelay } from './detectInputDelay.js';
export { detectWeakExcitation } from './detectWeakExcitation.js';
export { scanRecording } from './scanRecording.js';
export type { ScanOptions } from './scanRecording.js';
