/**
 * Worker-thread entry of {@link fitLot}: fits one motor per task with `fitMotorFolder` and tags the
 * outcome with the worker's thread id. Holds no state between tasks.
 */
import { threadId } from 'node:worker_threads';
import { fitMotorFolder, type FitMotorFolderOptions } from './fitMotorFolder.js';
import type { MotorOutcome, MotorPlan } from './types.js';

/** One task: a motor's plan and the shared options. */
export interface FitTask {
  /** The motor. */
  plan: MotorPlan;
  /** Rated voltage, tool, date. */
  options: FitMotorFolderOptions;
}

/** Fits the motor of `task` on this worker thread. */
export default async function fitTask(task: FitTask): Promise<MotorOutcome> {
  const outcome = await fitMotorFolder(task.plan, task.options);
  return { ...outcome, threadId };
}
