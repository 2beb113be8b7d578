/**
 * `@motorprint/model` — the lumped DC-motor equations: closed-form step, locked-rotor and
 * coast-down responses, derived figures, the exact zero-order-hold simulation with analytic
 * parameter sensitivities (chunked for long records), the detailed nonlinear model with an
 * event-locating adaptive integrator and energy bookkeeping, and a generator of invented bench
 * recordings. All quantities SI; temperatures in °C.
 * @packageDocumentation
 */
export type {
  MotorParams, DetailedParams, CopperConstant, TimeBase, LinearOptions, LinearTrace, ZohMatrices,
  SensitivityName, SensitivityState, SensitivityChunk, PoleKind, StepPoint, MotorFigures,
  DetailedOptions, EnergyTotals, DetailedTrace, ExperimentKind, ChannelNoise, RecordingOptions,
  RecordingColumn, CommandedInput, RecordingTruth, GeneratedRecording, HybridPlan, HybridTrace,
  LockedRotorHoldOptions, LockedRotorHold, LinearModelForms, TransferFunction,
} from './types.js';
export { checkMotorParams } from './checkMotorParams.js';
export { zohInto } from './zohInto.js';
export { zohSensitivitiesInto } from './zohSensitivitiesInto.js';
export { simulateInto } from './simulateInto.js';
export { simulate } from './simulate.js';
export { createSensitivityState } from './createSensitivityState.js';
export { simulateChunkInto } from './simulateChunkInto.js';
export { simulateWithSensitivities } from './simulateWithSensitivities.js';
export { stepResponse } from './stepResponse.js';
export { motorFigures } from './motorFigures.js';
export { motorRelations } from './motorRelations.js';
export type { SteadyConstants } from './motorRelations.js';
export { lockedRotorResponse } from './lockedRotorResponse.js';
export { coastDownResponse } from './coastDownResponse.js';
export { copperResistance } from './copperResistance.js';
export { lockedRotorHoldTime, DEFAULT_WINDING_CAPACITANCE } from './lockedRotorHoldTime.js';
export { linearModelForms } from './linearModelForms.js';
export { simulateDetailed } from './simulateDetailed.js';
export { simulateHybrid } from './simulateHybrid.js';
export { simulateHybridInto } from './simulateHybridInto.js';
export { steadyStateInto } from './steadyStateInto.js';
export { createRandom } from './createRandom.js';
export { prbsBits } from './prbsBits.js';
export { multisineShape } from './multisineShape.js';
export { generateRecording } from './generateRecording.js';
export { formatRecordingCsv } from './formatRecordingCsv.js';
