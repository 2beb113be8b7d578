/**
 * Bench for packages/lot and `motorprint lot`: (a) wall time of the invented demo lot
 * (fixtures/lot/tern24, 12 motors, a locked-rotor and a step run each) with --jobs 1 and --jobs 2,
 * as a user sees it (worker start-up, reading, fitting, judging; no store, no report), runs taking
 * turns; (b) how often the motor whose true R lies exactly on the upper limit comes out undecided,
 * over noise seeds (invented recordings of T24-2509's true constants from fixtures/lot/tern24-truth.csv).
 * Goal: --jobs 2 faster than --jobs 1 on a 2-core machine.
 */
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { runCli } from '../packages/cli/src/index.js';
import { fitLot, judgeLot, parseLotSpec, planMotorFolder } from '../packages/lot/src/index.js';
import { writeInventedLot } from '../packages/lot/src/__tests__/inventedLot.js';
import { formatRecordingCsv, generateRecording } from '../packages/model/src/index.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const pad = (s: string | number, w: number): string => String(s).padStart(w);

async function lotWallTime(dir: string, spec: string, jobs: number): Promise<{ seconds: number; cpu: number; code: number }> {
  const sink = () => {};
  const t0 = performance.now();
  const c0 = process.cpuUsage();
  const code = await runCli(['lot', dir, '--spec', spec, '--jobs', String(jobs), '--json'], { stdout: sink, stderr: sink, cwd: root, env: {}, isTty: false });
  const c = process.cpuUsage(c0);
  return { seconds: (performance.now() - t0) / 1000, cpu: (c.user + c.system) / 1e6, code };
}

const median = (t: number[]) => { const s = [...t].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2; };

/**
 * Runs the lot with --jobs 1 and 2, taking turns, and prints wall time and the CPU time of the
 * process (all threads). CPU/wall is the parallelism the run got: about 1 for --jobs 1 and up to 2
 * for --jobs 2 when the cores are free; well below that, other work on the machine held the cores.
 */
async function compareJobs(dir: string, spec: string, reps: number): Promise<void> {
  const runs: Record<number, { seconds: number; cpu: number }[]> = { 1: [], 2: [] };
  for (let rep = 0; rep < reps; rep++) {
    for (const jobs of [1, 2]) {
      const r = await lotWallTime(dir, spec, jobs);
      if (r.code === 2) throw new Error(`bench lot: the lot command refused ${dir}`);
      runs[jobs]!.push(r);
    }
  }
  console.log(`${pad('--jobs', 7)} ${pad('runs', 5)} ${pad('wall min', 9)} ${pad('median', 7)} ${pad('max', 7)} ${pad('CPU median', 11)} ${pad('CPU/wall', 9)}`);
  for (const jobs of [1, 2]) {
    const w = runs[jobs]!.map((r) => r.seconds), c = runs[jobs]!.map((r) => r.cpu);
    console.log(`${pad(jobs, 7)} ${pad(w.length, 5)} ${pad(Math.min(...w).toFixed(2), 9)} ${pad(median(w).toFixed(2), 7)} ${pad(Math.max(...w).toFixed(2), 7)} ` +
      `${pad(median(c).toFixed(2), 11)} ${pad((median(c) / median(w)).toFixed(2), 9)}`);
  }
  console.log(`median speed-up with --jobs 2: ${(median(runs[1]!.map((r) => r.seconds)) / median(runs[2]!.map((r) => r.seconds))).toFixed(2)}×`);
}

/** Wall time [s] of `threads` worker threads each doing the same fixed arithmetic. */
async function spin(threads: number): Promise<number> {
  const code = "const { parentPort } = require('node:worker_threads'); let s = 0; for (let i = 0; i < 2e8; i++) s += Math.sqrt(i); parentPort.postMessage(s);";
  const t0 = performance.now();
  await Promise.all(Array.from({ length: threads }, () => new Promise<void>((done, fail) => {
    const w = new Worker(code, { eval: true });
    w.once('message', () => { void w.terminate(); done(); });
    w.once('error', fail);
  })));
  return (performance.now() - t0) / 1000;
}

/** Writes a larger INVENTED lot: 16 Tern 24-like motors (constants spread by a few %, Coulomb friction). */
function writeLargerLot(dir: string): void {
  const noise = { voltage: 0.05, current: 0.02, speed: 0.3 };
  for (let i = 0; i < 16; i++) {
    const f = (k: number) => 1 + 0.02 * Math.sin(1.7 * i + k); // invented spread, ±2 %
    const p = { R: 1.9 * f(0), L: 6.2e-4 * f(1), Kt: 0.052 * f(2), Ke: 0.052 * f(2), J: 1.1e-5 * f(3), b: 4e-6 * f(4), Tc: 2e-3 * f(5) };
    const folder = join(dir, `T24-B${String(i + 1).padStart(3, '0')}`);
    mkdirSync(folder, { recursive: true });
    const runs = [
      ['locked-rotor.csv', generateRecording(p, 'locked-rotor', { volts: 6, sampleRate: 50000, noise, seed: 3000 + 3 * i })],
      ['step.csv', generateRecording(p, 'step', { volts: 24, sampleRate: 20000, duration: 1, noise, seed: 3001 + 3 * i })],
      ['prbs.csv', generateRecording(p, 'prbs', { volts: 24, sampleRate: 10000, noise, seed: 3002 + 3 * i })],
    ] as const;
    for (const [name, g] of runs) writeFileSync(join(folder, name), `# INVENTED recording (bench); not a measurement.\n${formatRecordingCsv(g.columns)}`);
  }
}

export default async function run(): Promise<void> {
  console.log(`cores seen by node: ${availableParallelism()}; load average at start ${loadavg().map((x) => x.toFixed(2)).join(', ')} (other work holding the cores shows as CPU/wall well below the job count)`);
  const one = [await spin(1), await spin(1)], two = [await spin(2), await spin(2)];
  console.log(`control: the same arithmetic on 1 thread ${Math.min(...one).toFixed(2)} s, on 2 threads at once ${Math.min(...two).toFixed(2)} s ` +
    `→ parallel throughput available now ≈ ${(2 * Math.min(...one) / Math.min(...two)).toFixed(2)} cores`);
  console.log('\n(a) motorprint lot on the invented demo lot (12 motors, 2 short runs each), wall time [s]; runs take turns');
  await compareJobs('fixtures/lot/tern24', 'fixtures/lot/tern24-spec.json', 3);

  console.log('\n(b) a larger invented lot (16 motors; locked-rotor, 1 s step at 20 kHz, PRBS), wall time [s]; runs take turns');
  const big = mkdtempSync(join(tmpdir(), 'motorprint-bench-biglot-'));
  try {
    writeLargerLot(big);
    await compareJobs(big, 'fixtures/lot/tern24-spec.json', 2);
  } finally {
    rmSync(big, { recursive: true, force: true });
  }

  console.log('\n(c) a motor with its true R exactly on the upper limit (1.995 Ω), over noise seeds: how often is R undecided?');
  const truth = readFileSync(join(root, 'fixtures/lot/tern24-truth.csv'), 'utf8').split('\n').find((l) => l.startsWith('T24-2509,'))!.split(',');
  const [R, L, K, J, b] = truth.slice(1, 6).map(Number) as [number, number, number, number, number];
  const seeds = 40;
  const dir = mkdtempSync(join(tmpdir(), 'motorprint-bench-lot-'));
  try {
    writeInventedLot(dir, Array.from({ length: seeds }, (_, i) => ({ serial: `S${String(i + 1).padStart(3, '0')}`, R, L, K, J, b })), 9000);
    const spec = parseLotSpec(readFileSync(join(root, 'fixtures/lot/tern24-spec.json'), 'utf8'), 'tern24-spec.json');
    const plans = readdirSync(dir).sort().map((s) => planMotorFolder(s, join(dir, s), readdirSync(join(dir, s)).map((name) => ({ name, isFile: true })), null));
    const outcomes = await fitLot(plans, { jobs: 2, ratedVoltage: spec.ratedVoltage, tool: { name: 'bench', version: '0' }, date: new Date().toISOString() });
    const j = judgeLot(spec, outcomes);
    const count = { pass: 0, undecided: 0, fail: 0, none: 0 };
    let covered = 0;
    for (const m of j.motors) {
      const k = m.keys.find((x) => x.key === 'R');
      if (k === undefined) { count.none++; continue; }
      count[k.verdict]++;
      if (k.ci95 !== null && k.ci95[0] <= R && R <= k.ci95[1]) covered++;
    }
    console.log(`${pad('seeds', 6)} ${pad('undecided', 10)} ${pad('pass', 5)} ${pad('fail', 5)} ${pad('not fitted', 11)} ${pad('R interval covers 1.995', 24)}`);
    console.log(`${pad(seeds, 6)} ${pad(count.undecided, 10)} ${pad(count.pass, 5)} ${pad(count.fail, 5)} ${pad(count.none, 11)} ${pad(covered, 24)}`);
    console.log('(with the true value on the limit, the interval straddles it exactly when it covers the true value: ≈ 95 % of seeds if the interval is right)');
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
