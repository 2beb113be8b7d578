import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import type { IngestOptions } from '@motorprint/ingest';
import Tinypool from 'tinypool';
import type { FitMotorFolderOptions } from './fitMotorFolder.js';
import type { FitTask } from './fitWorker.js';
import { readMotorRecordings } from './readMotorRecordings.js';
import type { MotorOutcome, MotorPlan } from './types.js';

/** Options of {@link fitLot}. */
export interface FitLotOptions extends FitMotorFolderOptions {
  /** Worker threads. @default the number of cores (`os.availableParallelism()`), at most one per motor */
  jobs?: number;
  /** Reader options for every recording (column roles, units, counts per revolution). @default {} */
  ingest?: IngestOptions;
  /** Called on the calling thread after each motor, in the order they finish. @default none */
  onProgress?: (done: number, total: number, outcome: MotorOutcome) => void;
}

/**
 * How to start the worker. From compiled `dist/` it is plain `fitWorker.js`. From the TypeScript
 * sources (tests, `pnpm motorprint`) the worker must load `.ts` files and resolve the workspace
 * packages to their sources: Node 20 does not pass `--import` loader flags on to worker threads, so
 * `sourceWorker.mjs` loads the worker through tsx's import API, and the export condition is given
 * to the worker explicitly.
 */
function workerEntry(): { filename: string; execArgv: string[] } {
  const fromSources = fileURLToPath(import.meta.url).endsWith('.ts');
  const file = fromSources ? './sourceWorker.mjs' : './fitWorker.js';
  return { filename: fileURLToPath(new URL(file, import.meta.url)), execArgv: fromSources ? ['--conditions=@motorprint/source'] : [] };
}

function errorOutcome(plan: MotorPlan, reason: string, inputs: MotorOutcome['inputs'] = []): MotorOutcome {
  return {
    serial: plan.serial, status: 'error', reason, values: {}, inputs, model: '', findings: [],
    ignoredFiles: plan.ignored.map((x) => ({ ...x })), parameterSet: null, threadId: 0,
  };
}

/**
 * Fits every motor of a lot and returns the outcomes in plan order. The recordings are read on the
 * calling thread (`readMotorRecordings`), one motor after another, while a pool of worker threads
 * (tinypool) fits the motors already read, one motor per task (`fitMotorFolder`). A motor whose
 * plan has a problem, or whose files cannot be read, becomes an `error` without reaching a worker;
 * a worker that fails turns into that motor's `error`; the lot goes on.
 *
 * @param plans - one plan per motor (from `planMotorFolder`)
 * @param options - jobs, reader options, progress callback, and the per-motor options of `fitMotorFolder`
 * @returns one outcome per plan, in plan order
 * @throws RangeError when `jobs` is not a whole number ≥ 1
 * @example
 * const outcomes = await fitLot(plans, { jobs: 2, ratedVoltage: 24, tool, date });
 * outcomes.map((o) => o.status); // => ['fitted', 'fitted', 'error', …]
 */
export async function fitLot(plans: readonly MotorPlan[], options: FitLotOptions): Promise<MotorOutcome[]> {
  const jobs = options.jobs ?? availableParallelism();
  if (!Number.isInteger(jobs) || jobs < 1) throw new RangeError(`fitLot: options.jobs must be a whole number ≥ 1 (got ${jobs})`);
  const { jobs: _jobs, onProgress, ingest, ...motorOptions } = options;
  const total = plans.length;
  const out: MotorOutcome[] = new Array(total);
  let done = 0;
  const finish = (i: number, outcome: MotorOutcome) => {
    out[i] = outcome;
    done++;
    onProgress?.(done, total, outcome);
  };
  const toFit = plans.filter((p) => p.problem === null).length;
  let pool: Tinypool | null = null;
  if (toFit > 0) {
    const threads = Math.min(jobs, toFit);
    const { filename, execArgv } = workerEntry();
    // Started before the first file is read, so the workers boot while the reading goes on.
    pool = new Tinypool({ filename, minThreads: threads, maxThreads: threads, execArgv, idleTimeout: 0 });
    // A worker that dies between tasks is replaced by the pool; its error must not end the process.
    // (An error during a task reaches that task's promise and becomes the motor's error.)
    pool.on('error', () => {});
  }
  const running: Promise<void>[] = [];
  try {
    for (const [i, plan] of plans.entries()) {
      if (plan.problem !== null || pool === null) { finish(i, errorOutcome(plan, plan.problem ?? 'not planned')); continue; }
      const read = await readMotorRecordings(plan, ingest ?? {});
      if (read.problem !== null) { finish(i, errorOutcome(plan, read.problem, read.inputs)); continue; }
      const task: FitTask = { serial: plan.serial, recordings: read.recordings, inputs: read.inputs, options: motorOptions };
      const ignoredFiles = plan.ignored.map((x) => ({ ...x }));
      running.push((pool.run(task) as Promise<MotorOutcome>).then(
        (outcome) => finish(i, { ...outcome, ignoredFiles }),
        (error: unknown) => finish(i, errorOutcome(plan, `the worker fitting this motor failed: ${(error as Error).message}`, read.inputs)),
      ));
    }
    await Promise.all(running);
  } finally {
    await pool?.destroy();
  }
  return out;
}
