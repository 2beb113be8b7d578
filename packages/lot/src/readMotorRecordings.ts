import { readRecording, type IngestOptions } from '@motorprint/ingest';
import type { MotorInput, MotorPlan, MotorRecording } from './types.js';

/**
 * Reads the recordings of one motor's plan with `@motorprint/ingest`'s `readRecording` (SI
 * channels, SHA-256 of each file). Runs on the calling thread, so that the worker threads that fit
 * need not load the reader. Never throws for bad data: the first file that cannot be read gives the
 * motor's problem (its message names the file and line), with the files read before it.
 *
 * @param plan - from `planMotorFolder` (a plan that already has a problem is returned as such)
 * @param ingest - reader options for every recording (column roles, units, counts per revolution) @default {}
 * @returns the recordings and their input records, or the problem
 * @example
 * const read = await readMotorRecordings(plan);
 * read.problem ?? read.recordings.map((r) => r.file); // => ['T24-2501/locked-rotor.csv', 'T24-2501/step.csv']
 */
export async function readMotorRecordings(plan: MotorPlan, ingest: IngestOptions = {}): Promise<{ recordings: MotorRecording[]; inputs: MotorInput[]; problem: string | null }> {
  const recordings: MotorRecording[] = [];
  const inputs: MotorInput[] = [];
  if (plan.problem !== null) return { recordings, inputs, problem: plan.problem };
  for (const run of plan.runs) {
    try {
      const { recording } = await readRecording(run.path, { ...ingest, fileName: run.file });
      recordings.push({ file: run.file, kind: run.kind, recording: { time: recording.time, channels: recording.channels } });
      inputs.push({
        file: run.file, kind: run.kind ?? 'guessed at fit', kindSource: run.kind === null ? 'guessed' : 'declared',
        sha256: recording.meta.source.sha256, rows: recording.time.length, rowsDropped: recording.meta.rowsDroppedCount,
      });
    } catch (error) {
      return { recordings, inputs, problem: (error as Error).message };
    }
  }
  return { recordings, inputs, problem: null };
}
