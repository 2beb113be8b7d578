/**
 * Bench for packages/lot and `motorprint lot`: (a) wall time of the invented demo lot
 * (fixtures/lot/tern24, 12 motors, a locked-rotor and a step run each) with --jobs 1 and --jobs 2,
 * as a user sees it (worker start-up, reading, fitting, judging; no store, no report), runs taking
 * turns; (b) how often the motor whose true R lies exactly on the upper limit comes out undecided,
 * over noise seeds (invented recordings of T24-2509's true constants from fixtures/lot/tern24-truth.csv).
 * Goal: --jobs 2 faster than --jobs 1 on a 2-core machine.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runCli } from '../packages/cli/src/index.js';
import { fitLot, judgeLot, parseLotSpec, planMotorFolder } from '../packages/lot/src/index.js';
import { writeInventedLot } from '../packages/lot/src/__tests__/inventedLot.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const pad = (s: string | number, w: number): string => String(s).padStart(w);

async function lotWallTime(jobs: number): Promise<{ seconds: number; code: number }> {
  const sink = () => {};
  const t0 = performance.now();
  const code = await runCli(['lot', 'fixtures/lot/tern24', '--spec', 'fixtures/lot/tern24-spec.json', '--jobs', String(jobs), '--json'],
    { stdout: sink, stderr: sink, cwd: root, env: {}, isTty: false });
  return { seconds: (performance.now() - t0) / 1000, code };
}

export default async function run(): Promise<void> {
  console.log('(a) motorprint lot on the invented demo lot (12 motors), wall time [s]; runs take turns');
  const times: Record<number, number[]> = { 1: [], 2: [] };
  for (let rep = 0; rep < 3; rep++) {
    for (const jobs of [1, 2]) {
      const r = await lotWallTime(jobs);
      if (r.code !== 1) throw new Error(`bench lot: expected exit 1 (the demo lot has failing motors), got ${r.code}`);
      times[jobs]!.push(r.seconds);
    }
  }
  console.log(`${pad('--jobs', 7)} ${pad('runs', 5)} ${pad('min', 7)} ${pad('median', 7)} ${pad('max', 7)}`);
  for (const jobs of [1, 2]) {
    const t = [...times[jobs]!].sort((a, b) => a - b);
    console.log(`${pad(jobs, 7)} ${pad(t.length, 5)} ${pad(t[0]!.toFixed(2), 7)} ${pad(t[1]!.toFixed(2), 7)} ${pad(t[2]!.toFixed(2), 7)}`);
  }
  const speedup = [...times[1]!].sort((a, b) => a - b)[1]! / [...times[2]!].sort((a, b) => a - b)[1]!;
  console.log(`median speed-up with --jobs 2: ${speedup.toFixed(2)}× (cores seen by node: ${(await import('node:os')).availableParallelism()})`);

  console.log('\n(b) a motor with its true R exactly on the upper limit (1.995 Ω), over noise seeds: how often is R undecided?');
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
