import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import Tinypool from 'tinypool';
import type { FitMotorFolderOptions } from './fitMotorFolder.js';
import type { FitTask } from './fitWorker.js';
import type { MotorOutcome, MotorPlan } from './types.js';

/** Options of {@link fitLot}. */
export interface FitLotOptions extends FitMotorFolderOptions {
  /** Worker threads. @default the number of cores (`os.availableParallelism()`), at most one per motor */
  jobs?: number;
  /** Called on the calling thread after each motor, in the order they finish. @default none */
  onProgress?: (done: number, total: number, outcome: MotorOutcome) => void;
}

/**
 * How to start the worker: its file, and the loader flags when this module runs from the
 * TypeScript sources (tests, `pnpm motorprint`), where the worker must load `.ts` files and resolve
 * the workspace packages to their sources too. From compiled `dist/` the worker is plain `.js`.
 */
function workerEntry(): { filename: string; execArgv: string[] } {
  const fromSources = fileURLToPath(import.meta.url).endsWith('.ts');
  const file = fromSources ? './sourceWorker.mjs' : './fitWorker.js';
  return { filename: fileURLToPath(new URL(file, import.meta.url)), execArgv: fromSources ? ['--conditions=@motorprint/source'] : [] };
}

/**
 * Fits every motor of a lot on a pool of worker threads (tinypool), one motor per task, and
 * returns the outcomes in plan order. A motor whose plan already has a problem is not sent to a
 * worker; a worker that fails turns into that motor's `error`, and the lot goes on.
 *
 * @param plans - one plan per motor (from `planMotorFolder`)
 * @param options - jobs, progress callback, and the per-motor options of `fitMotorFolder`
 * @returns one outcome per plan, in plan order
 * @throws RangeError when `jobs` is not a whole number ≥ 1
 * @example
 * const outcomes = await fitLot(plans, { jobs: 2, ratedVoltage: 24, tool, date });
 * outcomes.map((o) => o.status); // => ['fitted', 'fitted', 'error', …]
 */
export async function fitLot(plans: readonly MotorPlan[], options: FitLotOptions): Promise<MotorOutcome[]> {
  const jobs = options.jobs ?? availableParallelism();
  if (!Number.isInteger(jobs) || jobs < 1) throw new RangeError(`fitLot: options.jobs must be a whole number ≥ 1 (got ${jobs})`);
  const { jobs: _jobs, onProgress, ...motorOptions } = options;
  const total = plans.length;
  const out: MotorOutcome[] = new Array(total);
  let done = 0;
  const finish = (i: number, outcome: MotorOutcome) => {
    out[i] = outcome;
    done++;
    onProgress?.(done, total, outcome);
  };
  const toFit: number[] = [];
  plans.forEach((plan, i) => {
    if (plan.problem !== null) {
      finish(i, { serial: plan.serial, status: 'error', reason: plan.problem, values: {}, inputs: [], model: '', findings: [],
        ignoredFiles: plan.ignored.map((x) => ({ ...x })), parameterSet: null, threadId: 0 });
    } else toFit.push(i);
  });
  if (toFit.length === 0) return out;
  const threads = Math.min(jobs, toFit.length);
  const { filename, execArgv } = workerEntry();
  const pool = new Tinypool({ filename, minThreads: threads, maxThreads: threads, execArgv, idleTimeout: 0 });
  // A worker that dies between tasks is replaced by the pool; its error must not end the process.
  // (An error during a task reaches that task's promise and becomes the motor's error.)
  pool.on('error', () => {});
  try {
    await Promise.all(toFit.map(async (i) => {
      const plan = plans[i]!;
      const task: FitTask = { plan, options: motorOptions };
      let outcome: MotorOutcome;
      try {
        outcome = (await pool.run(task)) as MotorOutcome;
      } catch (error) {
        outcome = { serial: plan.serial, status: 'error', reason: `the worker fitting this motor failed: ${(error as Error).message}`, values: {},
          inputs: [], model: '', findings: [], ignoredFiles: plan.ignored.map((x) => ({ ...x })), parameterSet: null, threadId: 0 };
      }
      finish(i, outcome);
    }));
  } finally {
    await pool.destroy();
  }
  return out;
}
