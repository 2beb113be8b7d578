/**
 * Estimation for motorprint. This part is the least-squares core: a streaming
 * Levenberg–Marquardt solver that never holds the Jacobian (the problem accumulates JᵀJ and Jᵀr
 * chunk by chunk), a dense curve-fit convenience with analytic or central-difference Jacobians,
 * covariance summaries that mark unidentifiable directions, and the LRE score used against the
 * NIST StRD certified values.
 *
 * @packageDocumentation
 */
export { accumulateNormalEquations } from './solver/accumulateNormalEquations.js';
export { centralDifferenceJacobian } from './solver/centralDifferenceJacobian.js';
export { checkSolverOptions } from './solver/checkSolverOptions.js';
export { covarianceFromJacobian } from './solver/covarianceFromJacobian.js';
export { covarianceFromNormalMatrix } from './solver/covarianceFromNormalMatrix.js';
export { createNormalEquations } from './solver/createNormalEquations.js';
export { fitCurve } from './solver/fitCurve.js';
export { fitCurveWithMlLm } from './solver/fitCurveWithMlLm.js';
export type { FitCurveWithMlLmInput, FitCurveWithMlLmResult } from './solver/fitCurveWithMlLm.js';
export { logRelativeError } from './solver/logRelativeError.js';
export { resetNormalEquations } from './solver/resetNormalEquations.js';
export { solveLeastSquares } from './solver/solveLeastSquares.js';
export type {
  CovarianceSummary,
  CurveInputs,
  CurveJacobian,
  CurveModel,
  FitCurveInput,
  FitCurveResult,
  LeastSquaresProblem,
  NormalEquations,
  ResolvedSolverOptions,
  SolverOptions,
  SolverResult,
  StopReason,
} from './solver/types.js';

// Motor estimator (R, L, Kt/Ke, J, b, Tc from bench recordings).
export { fitMotor, scoreMotorExtensions } from './motor/fitMotor.js';
export { sharePreparation } from './motor/prepareRecording.js';
export type { ExtensionScore } from './detailed/scoreDetailed.js';
export { measuredChannel } from './motor/measuredChannel.js';
export { checkFitMotorOptions } from './motor/checkFitMotorOptions.js';
export { classifyRecording } from './motor/classifyRecording.js';
export { detectVoltageSegments } from './motor/detectVoltageSegments.js';
export { estimateNoiseLevel, keepsUnchanged, shareUnchangedNoise } from './motor/estimateNoiseLevel.js';
export { detectEncoderSpeed } from './motor/detectEncoderSpeed.js';
export { medianInterval } from './motor/medianInterval.js';
export { selectKth } from './motor/selectKth.js';
export { rebuildCommand } from './motor/rebuildCommand.js';
export type { RebuiltCommand, SineBasis } from './motor/rebuildCommand.js';
export { zeroPhaseLowPass } from './motor/zeroPhaseLowPass.js';
export type {
  ChannelFit, ConstantCovariance, FitInformation, FitMotorOptions, InputHandling, MotorChannel, MotorConstantName, MotorExperimentKind, MotorFit,
  MotorRecordingInput, NoiseLevel, ParameterEstimate, RecordingData, RecordingReport, StartAttempt, UninformedConstant, VoltageSegment,
} from './motor/types.js';
export type { ModelExtensions } from './detailed/types.js';

// Experiment planning (predicted standard errors, suggestions, locked-rotor budget).
export { planExperiments } from './plan/planExperiments.js';
export { simulatePlannedRun } from './plan/simulatePlannedRun.js';
export { checkLockedRotorHold } from './plan/checkLockedRotorHold.js';
export type {
  ExperimentPlan, LockedRotorBudget, PlannedConstant, PlannedNoise, PlannedRecording, PlannedRun, PlanOptions, PlanSuggestion, ResolvedRun,
  LockedRotorHoldCheckOptions, LockedRotorHoldCheck, HoldFinding,
} from './plan/types.js';
