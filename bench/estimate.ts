/**
 * Motor estimator bench: an invented PRBS-driven recording with current and speed (the FACTS.md §5
 * example motor, invented), 5 constants fitted from starts 50 % off, at 1e4, 1e5 and 1e6 samples.
 * Prints the fit wall time, the preparation part of it (checks, noise levels, command rebuild,
 * kind, guesses) measured separately, solver iterations, Jacobian evaluations, and the time of one
 * plain simulation pass. The CPU column (user + system time of this process during the fit) is
 * less disturbed than the wall time when other work shares the two cores. Goals on the 2-core reference machine: ≤ 0.1 s at 1e5 and ≤ 1 s at 1e6.
 */
import { generateRecording, simulate } from '@motorprint/model';
import { fitMotor } from '@motorprint/estimate';
import { prepareRecording } from '../packages/estimate/src/motor/prepareRecording.js';
import { guessConstants } from '../packages/estimate/src/motor/guessConstants.js';

export default async function run(): Promise<void> {
  const m = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };
  const rows: string[][] = [['samples', 'fit [s]', 'fit CPU [s]', 'prep [s]', 'iterations', 'Jacobian evals', 'converged', 'start used', 'one sim pass [s]', 'R rel err', 'J rel err']];
  for (const n of [1e4, 1e5, 1e6]) {
    const fs = 10000;
    const g = generateRecording(m, 'prbs', { seed: 1, sampleRate: fs, duration: (n - 1) / fs, noise: { voltage: 0.05, current: 0.012, speed: 0.48 } });
    const channels: Record<string, Float64Array> = {};
    for (const c of g.columns.slice(1)) channels[c.name] = c.values;
    const recording = { time: g.columns[0]!.values, channels };
    const initial = { R: m.R * 1.5, L: m.L * 0.5, Kt: m.Kt * 1.5, Ke: m.Ke * 1.5, J: m.J * 0.5, b: m.b * 1.5 };
    // Warm-up on the smallest size only (JIT), so the 1e4 row is not dominated by compilation.
    if (n === 1e4) fitMotor([{ recording, kind: 'prbs' }], { initial, keepResiduals: false });
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    const fit = fitMotor([{ recording, kind: 'prbs' }], { initial, keepResiduals: false });
    const t1 = performance.now();
    const cpu = process.cpuUsage(c0);
    simulate(m, channels.voltage!, 1 / fs);
    const t2 = performance.now();
    guessConstants([prepareRecording({ recording, kind: 'prbs' }, 0, 'auto')]);
    const t3 = performance.now();
    rows.push([
      String(n), ((t1 - t0) / 1000).toFixed(3), ((cpu.user + cpu.system) / 1e6).toFixed(3), ((t3 - t2) / 1000).toFixed(3), String(fit.iterations), String(fit.jacobianEvaluations), String(fit.converged),
      fit.starts.find((s) => s.chosen)!.start,
      ((t2 - t1) / 1000).toFixed(4),
      (fit.parameters.R!.value / m.R - 1).toExponential(1), (fit.parameters.J!.value / m.J - 1).toExponential(1),
    ]);
  }
  const w = rows[0]!.map((_, j) => Math.max(...rows.map((r) => r[j]!.length)));
  for (const r of rows) console.log(r.map((c, j) => c.padStart(w[j]!)).join('  '));
}
