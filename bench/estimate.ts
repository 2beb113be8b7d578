/**
 * Motor estimator bench: an invented PRBS-driven recording with current and speed (the FACTS.md §5
 * example motor, invented), 5 constants fitted from starts 50 % off, at 1e4, 1e5 and 1e6 samples.
 *
 * Per size it prints the first call (the JIT has only seen the smaller sizes), the best and the
 * median of 5 repeated calls on the same recording, the CPU time (user + system of this process;
 * above the wall time when the garbage collector works on the second core) and the number of
 * garbage collections (scavenges / other kinds) of the best call, the preparation part alone (checks, noise levels,
 * command rebuild, guesses), solver iterations and Jacobian evaluations, the time of one plain
 * simulation pass, and the errors of R and J. Goals on the 2-core reference machine: ≤ 0.1 s at
 * 1e5 and ≤ 1 s at 1e6 (the best-of-5 column; the first call includes compilation).
 */
import { PerformanceObserver, constants } from 'node:perf_hooks';
import { generateRecording, simulate } from '@motorprint/model';
import { fitMotor } from '@motorprint/estimate';
import type { MotorFit } from '@motorprint/estimate';
import { prepareRecording } from '../packages/estimate/src/motor/prepareRecording.js';
import { guessConstants } from '../packages/estimate/src/motor/guessConstants.js';

const REPEATS = 5;

export default async function run(): Promise<void> {
  const m = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };
  let scavenges = 0, majors = 0;
  const obs = new PerformanceObserver((list) => {
    for (const e of list.getEntries()) {
      const kind = (e as unknown as { detail?: { kind?: number } }).detail?.kind;
      if (kind === constants.NODE_PERFORMANCE_GC_MINOR) scavenges++;
      else majors++;
    }
  });
  obs.observe({ entryTypes: ['gc'] });
  const settle = (): Promise<void> => new Promise((res) => setImmediate(res));
  const rows: string[][] = [[
    'samples', 'first [s]', `best of ${REPEATS} [s]`, 'median [s]', 'CPU [s]', 'GCs minor/other', 'prep [s]',
    'iterations', 'Jacobian evals', 'converged', 'start used', 'one sim pass [s]', 'R rel err', 'J rel err',
  ]];
  for (const n of [1e4, 1e5, 1e6]) {
    const fs = 10000;
    const g = generateRecording(m, 'prbs', { seed: 1, sampleRate: fs, duration: (n - 1) / fs, noise: { voltage: 0.05, current: 0.012, speed: 0.48 } });
    const channels: Record<string, Float64Array> = {};
    for (const c of g.columns.slice(1)) channels[c.name] = c.values;
    const recording = { time: g.columns[0]!.values, channels };
    const initial = { R: m.R * 1.5, L: m.L * 0.5, Kt: m.Kt * 1.5, Ke: m.Ke * 1.5, J: m.J * 0.5, b: m.b * 1.5 };
    const once = async (): Promise<{ wall: number; cpu: number; gc: string; fit: MotorFit }> => {
      await settle();
      const g0 = scavenges, m0 = majors;
      const c0 = process.cpuUsage();
      const t0 = performance.now();
      const fit = fitMotor([{ recording, kind: 'prbs' }], { initial, keepResiduals: false });
      const wall = (performance.now() - t0) / 1000;
      const c = process.cpuUsage(c0);
      await settle();
      return { wall, cpu: (c.user + c.system) / 1e6, gc: `${scavenges - g0}/${majors - m0}`, fit };
    };
    const first = await once();
    const reps: Awaited<ReturnType<typeof once>>[] = [];
    for (let k = 0; k < REPEATS; k++) reps.push(await once());
    const best = reps.reduce((a, b) => (b.wall < a.wall ? b : a));
    const median = reps.map((x) => x.wall).sort((a, b) => a - b)[REPEATS >> 1]!;
    const fit = best.fit;
    const t1 = performance.now();
    simulate(m, channels.voltage!, 1 / fs);
    const t2 = performance.now();
    guessConstants([prepareRecording({ recording, kind: 'prbs' }, 0, 'auto')]);
    const t3 = performance.now();
    rows.push([
      String(n), first.wall.toFixed(3), best.wall.toFixed(3), median.toFixed(3), best.cpu.toFixed(3), best.gc,
      ((t3 - t2) / 1000).toFixed(3), String(fit.iterations), String(fit.jacobianEvaluations), String(fit.converged),
      fit.starts.find((s) => s.chosen)!.start,
      ((t2 - t1) / 1000).toFixed(4),
      (fit.parameters.R!.value / m.R - 1).toExponential(1), (fit.parameters.J!.value / m.J - 1).toExponential(1),
    ]);
  }
  obs.disconnect();
  const w = rows[0]!.map((_, j) => Math.max(...rows.map((r) => r[j]!.length)));
  for (const r of rows) console.log(r.map((c, j) => c.padStart(w[j]!)).join('  '));
}
