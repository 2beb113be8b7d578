/**
 * Worker-thread entry of {@link fitLot}: fits one motor per task with `fitMotorFolder` and tags the
 * outcome with the worker's thread id. Holds no state between tasks; loads no CSV reader (the
 * recordings arrive already read).
 */
import { threadId } from 'node:worker_threads';
import { fitMotorFolder, type FitMotorFolderOptions } from './fitMotorFolder.js';
import type { MotorInput, MotorOutcome, MotorRecording } from './types.js';

/** One task: a motor's recordings and the shared options. */
export interface FitTask {
  /** Serial. */
  serial: string;
  /** Recordings in SI. */
  recordings: MotorRecording[];
  /** Their input records. */
  inputs: MotorInput[];
  /** Rated voltage, tool, date. */
  options: FitMotorFolderOptions;
}

/** Fits the motor of `task` on this worker thread. */
export default function fitTask(task: FitTask): MotorOutcome {
  return { ...fitMotorFolder(task.serial, task.recordings, task.inputs, task.options), threadId };
}
