/**
 * Bench for packages/diagnose: (a) residualStats on 1e5 and 1e6 samples (autocorrelation to lag 50
 * by direct sums, Ljung–Box, runs test); (b) interval coverage of the locked-rotor R, L fit over
 * 2000 seeds (invented recordings); (c) finding rates over seeds on invented recordings;
 * (d) coverage of diagnoseFit's 95 % intervals on fitMotor results over 3000 seeds; (e) stiction
 * detection / false-alarm rates on invented slow ramps; (f) diagnoseFit finding rates and time;
 * (g) false alarms per finding; (h) diagnoseFit's time on one long PRBS run (1e5 and 1e6 samples).
 * Speed goal: residualStats on 1e6 samples with 50 lags in <= 0.5 s; diagnoseFit (with scans) on a
 * locked-rotor + 2 kHz PRBS pair in <= 0.5 s.
 */
import { fitCurve, fitMotor } from '../packages/estimate/src/index.js';
import { createRandom, lockedRotorResponse } from '../packages/model/src/index.js';
import { confidenceIntervals, detectStiction, diagnoseFit, identifyMotor, residualStats, scanRecording } from '../packages/diagnose/src/index.js';
import { MOTOR, invented, inventedRamp } from '../packages/diagnose/src/__tests__/inventedRecordings.js';

const pad = (s: string | number, w: number): string => String(s).padStart(w);

export default async function run(): Promise<void> {
  console.log('(a) residualStats, 50 lags, white residuals (goal: 1e6 samples <= 0.5 s)');
  console.log(`${pad('samples', 9)} ${pad('ms', 8)} ${pad('LB p', 8)} ${pad('runs p', 8)}`);
  for (const n of [1e5, 1e6]) {
    const rng = createRandom(3);
    const y = Float64Array.from({ length: n }, () => rng.normal());
    const yh = new Float64Array(n);
    residualStats(y, yh, 50);
    const t0 = performance.now();
    const s = residualStats(y, yh, 50);
    const ms = performance.now() - t0;
    console.log(`${pad(n, 9)} ${pad(ms.toFixed(1), 8)} ${pad(s.ljungBox.pValue.toFixed(3), 8)} ${pad(s.runs.pValue.toFixed(3), 8)}`);
  }

  console.log('\n(b) 95 % interval coverage, locked-rotor R, L fit (FACTS.md §5 motor, invented noise 0.012 A), 2000 seeds');
  const R = 2, L = 1e-3, V = 12, dt = 5e-5, N = 120, seeds = 2000;
  let cR = 0, cL = 0;
  const t0 = performance.now();
  for (let s = 1; s <= seeds; s++) {
    const rng = createRandom(s);
    const t = Float64Array.from({ length: N }, (_, k) => k * dt);
    const y = Float64Array.from(t, (tk) => lockedRotorResponse(R, L, V, tk).current + 0.012 * rng.normal());
    const fit = fitCurve({
      x: t, y, start: [1.5, 1.5e-3],
      model: (th, [x], out) => { for (let k = 0; k < out.length; k++) out[k] = lockedRotorResponse(th[0]!, th[1]!, V, x![k]!).current; },
    });
    const rep = confidenceIntervals(['R', 'L'], fit.theta, fit.covariance);
    const iR = rep.parameters[0]!.interval, iL = rep.parameters[1]!.interval;
    if (iR && iR[0] <= R && R <= iR[1]) cR++;
    if (iL && iL[0] <= L && L <= iL[1]) cL++;
  }
  console.log(`${pad('param', 6)} ${pad('coverage', 9)} ${pad('binom SD', 9)}`);
  const sd = Math.sqrt((0.95 * 0.05) / seeds);
  console.log(`${pad('R', 6)} ${pad((100 * cR / seeds).toFixed(2) + ' %', 9)} ${pad((100 * sd).toFixed(2) + ' %', 9)}`);
  console.log(`${pad('L', 6)} ${pad((100 * cL / seeds).toFixed(2) + ' %', 9)} ${pad((100 * sd).toFixed(2) + ' %', 9)}`);
  console.log(`(${((performance.now() - t0) / 1000).toFixed(1)} s)`);

  console.log('\n(c) finding rates on invented recordings (FACTS.md §5 motor), 20 seeds each');
  const cases: [string, Parameters<typeof invented>[0], Parameters<typeof invented>[1], Parameters<typeof invented>[3], string][] = [
    ['Tc 2e-3, steady-state', { ...MOTOR, Tc: 2e-3 }, 'steady-state', {}, 'coulomb-friction'],
    ['Tc 2e-3, prbs', { ...MOTOR, Tc: 2e-3 }, 'prbs', {}, 'coulomb-friction'],
    ['Tc 2e-3, coast-down 3 s', { ...MOTOR, Tc: 2e-3 }, 'coast-down', { duration: 3 }, 'coulomb-friction'],
    ['cd 1e-7, steady-state', { ...MOTOR, cd: 1e-7 }, 'steady-state', {}, 'speed-squared-drag'],
    ['Imax 3 A, step', { ...MOTOR, Imax: 3 }, 'step', {}, 'drive-saturation'],
    ['Rth 3, Cth 5, locked 5 s 1 kHz', { ...MOTOR, Rth: 3, Cth: 5 }, 'locked-rotor', { duration: 5, sampleRate: 1000 }, 'winding-heating'],
    ['clean, locked 1 kHz', MOTOR, 'locked-rotor', { sampleRate: 1000, duration: 0.05 }, 'slow-sampling'],
    ['clean, step', MOTOR, 'step', {}, '(any)'],
    ['clean, prbs', MOTOR, 'prbs', {}, '(any)'],
    ['clean, steady-state', MOTOR, 'steady-state', {}, '(any)'],
    ['clean, multisine', MOTOR, 'multisine', {}, '(any)'],
    ['clean, locked-rotor', MOTOR, 'locked-rotor', {}, '(any)'],
    ['clean, coast-down 3 s', MOTOR, 'coast-down', { duration: 3 }, '(any)'],
  ];
  console.log(`${'case'.padEnd(32)} ${'code'.padEnd(20)} ${pad('rate', 6)}  others seen`);
  for (const [label, p, kind, extra, code] of cases) {
    let hit = 0;
    const others = new Map<string, number>();
    for (let s = 1; s <= 20; s++) {
      const f = scanRecording(invented(p, kind, 500 + s, extra), { kind }).findings.map((x) => x.code);
      if (code === '(any)' ? f.length > 0 : f.includes(code)) hit++;
      for (const c of f) if (c !== code) others.set(c, (others.get(c) ?? 0) + 1);
    }
    console.log(`${label.padEnd(32)} ${code.padEnd(20)} ${pad((hit / 20).toFixed(2), 6)}  ${[...others].map(([c, k]) => `${c}×${k}`).join(' ')}`);
  }

  console.log('\n(d) 95 % interval coverage, diagnoseFit on fitMotor (locked-rotor 10 kHz + PRBS 0.1 s at 5 kHz, invented), 3000 seeds');
  {
    const seeds = 3000, names = ['R', 'L', 'Kt', 'J', 'b'] as const;
    const cov: Record<string, number> = { R: 0, L: 0, Kt: 0, J: 0, b: 0 };
    let unconverged = 0;
    const t1 = performance.now();
    for (let s = 1; s <= seeds; s++) {
      const recs = [
        { recording: invented(MOTOR, 'locked-rotor', s), kind: 'locked-rotor' as const },
        { recording: invented(MOTOR, 'prbs', 10_000 + s, { duration: 0.1, sampleRate: 5000 }), kind: 'prbs' as const },
      ];
      const fit = fitMotor(recs);
      if (!fit.converged) unconverged++;
      const d = diagnoseFit(fit, recs, { scanRecordings: false });
      for (const c of names) { const ci = d.parameters[c]!.interval95; if (ci && ci[0] <= MOTOR[c] && MOTOR[c] <= ci[1]) cov[c]!++; }
    }
    const sd3 = Math.sqrt((0.95 * 0.05) / seeds);
    console.log(`${pad('param', 6)} ${pad('coverage', 9)} ${pad('binom SD', 9)}`);
    for (const c of names) console.log(`${pad(c, 6)} ${pad((100 * cov[c]! / seeds).toFixed(2) + ' %', 9)} ${pad((100 * sd3).toFixed(2) + ' %', 9)}`);
    console.log(`(unconverged ${unconverged}; ${((performance.now() - t1) / seeds).toFixed(1)} ms per fit + diagnosis)`);
  }

  console.log('\n(e) stiction on invented slow ramps (0 → 2 V over 1 s, 2 kHz; Tc 2 mN·m), 50 seeds each');
  console.log(`${'case'.padEnd(24)} ${pad('fires', 6)}`);
  for (const [label, p] of [['Ts 5 mN·m', { ...MOTOR, Tc: 2e-3, Ts: 5e-3 }], ['Ts 3 mN·m', { ...MOTOR, Tc: 2e-3, Ts: 3e-3 }], ['no stiction', { ...MOTOR, Tc: 2e-3 }]] as const) {
    let hit = 0;
    for (let s = 1; s <= 50; s++) if (detectStiction(inventedRamp(p, 700 + s))) hit++;
    console.log(`${label.padEnd(24)} ${pad(`${hit}/50`, 6)}`);
  }

  console.log('\n(f) identifyMotor on a locked-rotor + PRBS (2 kHz, 2 s) pair, 30 seeds each');
  console.log(`${'case'.padEnd(16)} ${pad('any', 6)} ${pad('fit-level', 10)} ${pad('Coulomb chosen', 18)} ${pad('ms', 7)} ${pad('', 8)}  codes`);
  for (const [label, p] of [['clean', MOTOR], ['Tc 2 mN·m', { ...MOTOR, Tc: 2e-3 }]] as const) {
    let any = 0, fitLevel = 0, pref = 0, tf = 0, td = 0;
    const codes = new Map<string, number>();
    for (let s = 1; s <= 30; s++) {
      const recs = [
        { recording: invented(p, 'locked-rotor', 900 + s), kind: 'locked-rotor' as const },
        { recording: invented(p, 'prbs', 1900 + s, { sampleRate: 2000 }), kind: 'prbs' as const },
      ];
      const a = performance.now();
      const id = identifyMotor(recs);
      const d = id.diagnosis;
      tf += performance.now() - a;
      if (d.findings.length > 0) any++;
      if (d.findings.some((f) => f.origin !== 'recording-scan')) fitLevel++;
      if (id.model.extensions.includes('coulomb')) pref++;
      for (const f of d.findings) codes.set(`${f.code}/${f.origin}`, (codes.get(`${f.code}/${f.origin}`) ?? 0) + 1);
    }
    console.log(`${label.padEnd(16)} ${pad(`${any}/30`, 6)} ${pad(`${fitLevel}/30`, 10)} ${pad(`${pref}/30`, 18)} ${pad((tf / 30).toFixed(0), 7)} ${pad((td / 30).toFixed(0), 8)}  ${[...codes].map(([c, k]) => `${c}×${k}`).join(' ')}`);
  }
  console.log('\n(g) false alarms of every finding on CLEAN invented recordings (FACTS.md §5 motor), 100 seeds per kind;');
  console.log('    95 % upper bound: exact one-sided Clopper–Pearson (binomial); and detection rates with the effect on');
  const cp = (k: number, n: number): number => {
    // Smallest p with P(X <= k | n, p) <= 0.05, by bisection on the binomial CDF.
    const cdf = (p: number): number => { let t = Math.pow(1 - p, n), c = t; for (let i = 1; i <= k; i++) { t *= ((n - i + 1) / i) * (p / (1 - p)); c += t; } return c; };
    let lo = k / n, hi = 1;
    for (let it = 0; it < 60; it++) { const mid = (lo + hi) / 2; if (cdf(mid) > 0.05) lo = mid; else hi = mid; }
    return hi;
  };
  const gcases: [string, Parameters<typeof invented>[0], Parameters<typeof invented>[1], Parameters<typeof invented>[3]][] = [
    ['clean step', MOTOR, 'step', {}], ['clean prbs 10 kHz', MOTOR, 'prbs', {}], ['clean prbs 2 kHz', MOTOR, 'prbs', { sampleRate: 2000 }],
    ['clean multisine', MOTOR, 'multisine', {}], ['clean steady-state', MOTOR, 'steady-state', {}],
    ['clean coast-down 3 s', MOTOR, 'coast-down', { duration: 3 }], ['clean locked-rotor', MOTOR, 'locked-rotor', {}],
    ['Tc 2e-3 steady-state', { ...MOTOR, Tc: 2e-3 }, 'steady-state', {}], ['Tc 2e-3 prbs 10 kHz', { ...MOTOR, Tc: 2e-3 }, 'prbs', {}],
    ['Tc 2e-3 prbs 2 kHz', { ...MOTOR, Tc: 2e-3 }, 'prbs', { sampleRate: 2000 }], ['Tc 2e-3 coast-down 3 s', { ...MOTOR, Tc: 2e-3 }, 'coast-down', { duration: 3 }],
    ['cd 1e-7 steady-state', { ...MOTOR, cd: 1e-7 }, 'steady-state', {}],
  ];
  const G = 100;
  console.log(`${'case'.padEnd(24)} ${'finding'.padEnd(20)} ${pad('count', 7)} ${pad('rate', 6)} ${pad('95% up', 7)}`);
  for (const [label, p, kind, extra] of gcases) {
    const m = new Map<string, number>();
    for (let s = 1; s <= G; s++) for (const c of new Set(scanRecording(invented(p, kind, 5000 + s, extra), { kind }).findings.map((f) => f.code))) m.set(c, (m.get(c) ?? 0) + 1);
    if (m.size === 0) console.log(`${label.padEnd(24)} ${'(none)'.padEnd(20)} ${pad(`0/${G}`, 7)} ${pad('0.00', 6)} ${pad(cp(0, G).toFixed(3), 7)}`);
    for (const [c, k] of m) console.log(`${label.padEnd(24)} ${c.padEnd(20)} ${pad(`${k}/${G}`, 7)} ${pad((k / G).toFixed(2), 6)} ${pad(cp(k, G).toFixed(3), 7)}`);
  }

  console.log('\n(h) diagnoseFit on one long invented PRBS run (10 kHz, current + speed), lumped fit: first call in this process and best of 3');
  console.log(`${pad('samples', 9)} ${pad('first ms', 9)} ${pad('best ms', 8)}  findings`);
  for (const n of [1e5, 1e6]) {
    const recs = [{ recording: invented(MOTOR, 'prbs', 77, { sampleRate: 10000, duration: n / 10000 }), kind: 'prbs' as const }];
    const fit = fitMotor(recs, { extensions: {}, coulomb: false });
    const times: number[] = [];
    let codes = '';
    for (let r = 0; r < 4; r++) {
      const a = performance.now();
      const d = diagnoseFit(fit, recs, { alpha: 0.01 });
      times.push(performance.now() - a);
      codes = d.findings.map((f) => f.code).join(' ') || '(none)';
    }
    console.log(`${pad(n, 9)} ${pad(times[0]!.toFixed(0), 9)} ${pad(Math.min(...times.slice(1)).toFixed(0), 8)}  ${codes}`);
  }
}
