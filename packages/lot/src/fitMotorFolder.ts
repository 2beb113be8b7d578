/**
 * The one place where the lot calls the per-motor fit: `identifyMotor` (the call `motorprint fit`
 * makes: model chosen by the data, diagnosed) and the parameter set. It runs on the worker
 * threads, so it imports only what fitting needs (not the CSV reader).
 */
import { identifyMotor } from '@motorprint/diagnose';
import type { MotorRecordingInput } from '@motorprint/estimate';
import { buildParameterSet, type ParameterSet } from '@motorprint/report';
import type { MotorInput, MotorOutcome, MotorRecording, MotorValue } from './types.js';

/** What {@link fitMotorFolder} needs besides the recordings. */
export interface FitMotorFolderOptions {
  /** Voltage for the derived figures [V] (the spec's), or null for the largest step voltage seen. */
  ratedVoltage: number | null;
  /** Tool name and version for the parameter set's provenance. */
  tool: { name: string; version: string };
  /** Date of the lot run (ISO 8601) for the provenance; the library reads no clock. */
  date: string;
  /** Identification fields written into the parameter set besides the serial (e.g. `lot`). @default {} */
  identification?: Record<string, string>;
}

function valuesOf(set: ParameterSet): Record<string, MotorValue> {
  const out: Record<string, MotorValue> = {};
  for (const [key, p] of Object.entries(set.parameters)) {
    if (p === undefined) continue;
    out[key] = { value: p.value, ci95: p.ci95, unit: p.unit, note: p.note };
  }
  if (out.Tc === undefined) {
    out.Tc = { value: null, ci95: null, unit: 'N·m', note: 'the reported model has no Coulomb friction (the recordings did not call for it)' };
  }
  for (const [key, f] of Object.entries(set.derived)) out[key] = { value: f.value, ci95: f.ci95, unit: f.unit, note: f.note };
  return out;
}

/**
 * Fits one motor of a lot from its recordings with `identifyMotor` (jointly, the extensions of the
 * lumped model chosen by the data, as `motorprint fit` does), and builds the parameter set with
 * the derived figures at the spec's rated voltage. Never throws for bad data: a fit that fails or does not
 * converge gives `status: 'error'` with the reason.
 *
 * @param serial - the motor's serial
 * @param recordings - its recordings in SI (from `readMotorRecordings`), with declared kinds or null
 * @param inputs - the input records of those files (kinds are filled in from the fit)
 * @param options - rated voltage, tool, date, identification
 * @returns the outcome (plain data; `ignoredFiles` empty and `threadId` 0 — the caller fills them in)
 * @example
 * const outcome = fitMotorFolder('T24-2501', read.recordings, read.inputs, { ratedVoltage: 24, tool: { name: 'motorprint', version: '0.1.0' }, date: '2025-03-01T10:00:00Z' });
 * outcome.values.R; // => { value: 1.9022, ci95: [1.9011, 1.9034], unit: 'Ω', note: '' }
 */
export function fitMotorFolder(serial: string, recordings: readonly MotorRecording[], inputs: readonly MotorInput[], options: FitMotorFolderOptions): MotorOutcome {
  const used = inputs.map((x) => ({ ...x }));
  const failure = (reason: string): MotorOutcome => ({
    serial, status: 'error', reason, values: {}, inputs: used, model: '', findings: [], ignoredFiles: [], parameterSet: null, threadId: 0,
  });
  const fitInputs: MotorRecordingInput[] = recordings.map((r) =>
    r.kind === null ? { recording: r.recording, name: r.file } : { recording: r.recording, name: r.file, kind: r.kind });
  try {
    // The same one call as `motorprint fit`: the model the data support, diagnosed.
    const id = identifyMotor(fitInputs);
    const { fit, diagnosis } = id;
    fit.recordings.forEach((r, i) => { const input = used[i]; if (input !== undefined) input.kind = r.kind; });
    if (!fit.converged) {
      return failure(`the fit did not converge (${fit.stopReason}) after ${fit.iterations} steps; check the recordings and declare their kinds in runs.csv`);
    }
    const model = `${fit.variant.description} — ${id.model.summary}`;
    const set = buildParameterSet(fit, {
      recordings: recordings.map((r) => r.recording),
      diagnosis,
      model: id.model,
      unsupported: id.unsupported,
      identification: { ...(options.identification ?? {}), serial },
      ...(options.ratedVoltage !== null ? { ratedVoltage: options.ratedVoltage } : {}),
      provenance: {
        tool: options.tool, date: options.date,
        inputs: used.map((x) => ({ file: x.file, sha256: x.sha256 })),
        options: { lot: true, ratedVoltage: options.ratedVoltage, kinds: recordings.map((r) => r.kind ?? 'guessed') },
      },
    });
    return {
      serial, status: 'fitted', reason: '', values: valuesOf(set), inputs: used, model,
      findings: diagnosis.findings.map((f) => `${f.code} (${f.severity})`), ignoredFiles: [], parameterSet: set, threadId: 0,
    };
  } catch (error) {
    return failure(`the fit failed: ${(error as Error).message}`);
  }
}
