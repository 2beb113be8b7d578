/**
 * The one place where the lot calls the per-motor fit pipeline (read → fit → diagnose → optional
 * Coulomb model → parameter set), through today's public API. Kept in this file alone so the
 * pipeline can be swapped for a one-call API later without touching the rest of the lot package.
 */
import { diagnoseFit } from '@motorprint/diagnose';
import { fitMotor, type MotorRecordingInput } from '@motorprint/estimate';
import { readRecording, type IngestOptions, type IngestResult } from '@motorprint/ingest';
import { buildParameterSet, type ParameterSet } from '@motorprint/report';
import type { MotorInput, MotorOutcome, MotorPlan, MotorValue } from './types.js';

/** What {@link fitMotorFolder} needs besides the plan. */
export interface FitMotorFolderOptions {
  /** Voltage for the derived figures [V] (the spec's), or null for the largest step voltage seen. */
  ratedVoltage: number | null;
  /** Tool name and version for the parameter set's provenance. */
  tool: { name: string; version: string };
  /** Date of the lot run (ISO 8601) for the provenance; the library reads no clock. */
  date: string;
  /** Identification fields written into the parameter set besides the serial (e.g. `lot`). */
  identification?: Record<string, string>;
  /** Reader options for every recording (column roles, units, encoder counts per revolution). @default {} */
  ingest?: IngestOptions;
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

function failure(plan: MotorPlan, reason: string, inputs: MotorInput[]): MotorOutcome {
  return {
    serial: plan.serial, status: 'error', reason, values: {}, inputs, model: '', findings: [],
    ignoredFiles: plan.ignored.map((i) => ({ ...i })), parameterSet: null, threadId: 0,
  };
}

/**
 * Fits one motor of a lot from its folder plan: reads each recording, fits the lumped model to all
 * of them jointly, diagnoses the fit, reports the Coulomb-friction model when the diagnosis's
 * model comparison supports it (as `motorprint fit --coulomb auto` does), and builds the parameter
 * set with the derived figures at the spec's rated voltage. Never throws for bad data: a file that
 * cannot be read, a fit that fails or does not converge gives `status: 'error'` with the reason.
 *
 * @param plan - from `planMotorFolder`
 * @param options - rated voltage, tool, date
 * @returns the outcome (plain data)
 * @example
 * const outcome = await fitMotorFolder(plan, { ratedVoltage: 24, tool: { name: 'motorprint', version: '0.1.0' }, date: '2025-03-01T10:00:00Z' });
 * outcome.values.R; // => { value: 1.9004, ci95: [1.8994, 1.9014], unit: 'Ω', note: '' }
 */
export async function fitMotorFolder(plan: MotorPlan, options: FitMotorFolderOptions): Promise<MotorOutcome> {
  if (plan.problem !== null) return failure(plan, plan.problem, []);
  const read: { run: MotorPlan['runs'][number]; result: IngestResult }[] = [];
  const inputs: MotorInput[] = [];
  for (const run of plan.runs) {
    try {
      const result = await readRecording(run.path, { ...(options.ingest ?? {}), fileName: run.file });
      read.push({ run, result });
      const meta = result.recording.meta;
      inputs.push({ file: run.file, kind: run.kind ?? 'guessed at fit', kindSource: run.kind === null ? 'guessed' : 'declared', sha256: meta.source.sha256, rows: result.recording.time.length, rowsDropped: meta.rowsDroppedCount });
    } catch (error) {
      return failure(plan, (error as Error).message, inputs);
    }
  }
  const fitInputs: MotorRecordingInput[] = read.map(({ run, result }) =>
    run.kind === null ? { recording: result.recording, name: run.file } : { recording: result.recording, name: run.file, kind: run.kind });
  try {
    let fit = fitMotor(fitInputs);
    fit.recordings.forEach((r, i) => { const input = inputs[i]; if (input !== undefined) input.kind = r.kind; });
    if (!fit.converged) {
      return failure(plan, `the fit did not converge (${fit.stopReason}) after ${fit.iterations} steps; check the recordings and declare their kinds in runs.csv`, inputs);
    }
    let diagnosis = diagnoseFit(fit, fitInputs, { fitOptions: {}, refitCoulomb: true });
    let model = fit.variant.description;
    const refit = diagnosis.coulombRefit;
    if (refit !== null && refit.converged && refit.supported === 'viscous + Coulomb') {
      fit = refit.fit;
      diagnosis = { ...diagnoseFit(fit, fitInputs, { fitOptions: { coulomb: true }, refitCoulomb: false }), coulombRefit: refit };
      model = `${fit.variant.description} (chosen over viscous friction only: the model comparison supports it)`;
    }
    const set = buildParameterSet(fit, {
      recordings: read.map((x) => x.result.recording),
      diagnosis,
      identification: { ...(options.identification ?? {}), serial: plan.serial },
      ...(options.ratedVoltage !== null ? { ratedVoltage: options.ratedVoltage } : {}),
      provenance: {
        tool: options.tool, date: options.date,
        inputs: inputs.map((x) => ({ file: x.file, sha256: x.sha256 })),
        options: { lot: true, ratedVoltage: options.ratedVoltage, kinds: plan.runs.map((r) => r.kind ?? 'guessed') },
      },
    });
    return {
      serial: plan.serial, status: 'fitted', reason: '', values: valuesOf(set), inputs, model,
      findings: diagnosis.findings.map((f) => `${f.code} (${f.severity})`),
      ignoredFiles: plan.ignored.map((i) => ({ ...i })), parameterSet: set, threadId: 0,
    };
  } catch (error) {
    return failure(plan, `the fit failed: ${(error as Error).message}`, inputs);
  }
}
