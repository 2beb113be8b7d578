/**
 * Bench for packages/report: (a) buildParameterSet time (covariance, derived figures with
 * delta-method intervals) on a real fit; (b) renderHtmlReport time and size against record length,
 * where min/max-per-column downsampling keeps the page small; (c) coverage of the derived-figure
 * 95 % intervals over seeds (invented recordings of the FACTS.md §5 motor, itself invented).
 * Speed goals: buildParameterSet <= 5 ms; renderHtmlReport with a 1e6-sample recording <= 1 s and
 * <= 1 MB of HTML.
 */
import { fitMotor } from '../packages/estimate/src/index.js';
import type { MotorFit } from '../packages/estimate/src/index.js';
import { createRandom, motorFigures } from '../packages/model/src/index.js';
import { buildParameterSet, renderHtmlReport } from '../packages/report/src/index.js';
import { INVENTED_PROVENANCE, inventedRecording } from '../packages/report/src/__tests__/inventedFit.js';

const pad = (s: string | number, w: number): string => String(s).padStart(w);

function fitSeed(seed: number): { fit: MotorFit; recs: ReturnType<typeof inventedRecording>[] } {
  const recs = [inventedRecording('step', 1000 + seed), inventedRecording('locked-rotor', 2000 + seed)];
  const fit = fitMotor([{ recording: recs[0]!, kind: 'step', name: 'step' }, { recording: recs[1]!, kind: 'locked-rotor', name: 'locked' }], {});
  return { fit, recs };
}

export default async function run(): Promise<void> {
  const { fit, recs } = fitSeed(1);
  console.log('(a) buildParameterSet on a step + locked-rotor fit (goal <= 5 ms)');
  for (let k = 0; k < 20; k++) buildParameterSet(fit, { recordings: recs, provenance: INVENTED_PROVENANCE });
  const reps = 200;
  let t0 = performance.now();
  for (let k = 0; k < reps; k++) buildParameterSet(fit, { recordings: recs, provenance: INVENTED_PROVENANCE });
  console.log(`${pad('ms per call', 12)} ${pad(((performance.now() - t0) / reps).toFixed(3), 8)}`);

  console.log('\n(b) renderHtmlReport against record length (invented sine + noise traces; goal: 1e6 samples <= 1 s, <= 1 MB)');
  console.log('    ms: autocorrelation computed here (50 lags, 2 channels); ms+diag: taken from a diagnosis');
  console.log(`${pad('samples', 9)} ${pad('ms', 8)} ${pad('ms+diag', 12)} ${pad('HTML kB', 9)}`);
  const set = buildParameterSet(fit, { recordings: recs, provenance: INVENTED_PROVENANCE });
  for (const n of [1e3, 1e4, 1e5, 1e6]) {
    const rng = createRandom(5);
    const time = Float64Array.from({ length: n }, (_, k) => k * 1e-4);
    const current = time.map((t) => Math.sin(20 * t) + 0.01 * rng.normal());
    const speed = time.map((t) => 100 * Math.cos(20 * t) + 0.5 * rng.normal());
    const resI = time.map(() => 0.01 * rng.normal());
    const resW = time.map(() => 0.5 * rng.normal());
    const fakeFit = {
      recordings: [{
        ...fit.recordings[0]!, name: `invented ${n}`, samples: n,
        channels: [
          { ...fit.recordings[0]!.channels[0]!, channel: 'current' as const, samples: n, residuals: resI },
          { ...fit.recordings[0]!.channels[1]!, channel: 'speed' as const, samples: n, residuals: resW },
        ],
      }],
    };
    const recordings = [{ time, channels: { current, speed } }];
    // A diagnosis carrying the autocorrelations (as diagnoseFit gives them): the report then skips its own.
    const acf = Float64Array.from({ length: 51 }, (_, k) => (k === 0 ? 1 : 0.01 * rng.normal()));
    const diagnosis = { residuals: ['current', 'speed'].map((channel) => ({ recording: `invented ${n}`, channel, stats: { autocorrelation: acf, whitenessBand: 1.96 / Math.sqrt(n) } })) };
    renderHtmlReport({ parameterSet: set, fit: fakeFit, recordings });
    t0 = performance.now();
    const html = renderHtmlReport({ parameterSet: set, fit: fakeFit, recordings });
    const ms = performance.now() - t0;
    t0 = performance.now();
    renderHtmlReport({ parameterSet: set, fit: fakeFit, recordings, diagnosis });
    const msDiag = performance.now() - t0;
    console.log(`${pad(n, 9)} ${pad(ms.toFixed(1), 8)} ${pad(msDiag.toFixed(1), 12)} ${pad((html.length / 1024).toFixed(0), 9)}`);
  }

  const seeds = 100;
  console.log(`\n(c) coverage of derived-figure 95 % intervals, ${seeds} seeds (true figures of the invented motor at the fitted rated voltage)`);
  const keys = ['electricalTimeConstant', 'mechanicalTimeConstantViscous', 'noLoadSpeed', 'stallTorque', 'motorConstant', 'maxOutputPower', 'peakEfficiency'];
  const hits: Record<string, number> = Object.fromEntries(keys.map((k) => [k, 0]));
  const widths: Record<string, number> = Object.fromEntries(keys.map((k) => [k, 0]));
  let used = 0;
  t0 = performance.now();
  for (let s = 1; s <= seeds; s++) {
    const r = fitSeed(s);
    if (!r.fit.converged) continue;
    used++;
    const ps = buildParameterSet(r.fit, { provenance: INVENTED_PROVENANCE });
    const V = ps.ratedVoltage.value!;
    const m = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };
    const mf = motorFigures(m, V);
    // Truth by the same formulas (docs/derived-figures.md) with the invented constants.
    const a = (m.Kt * V) / m.R, c = (m.Kt * m.Ke) / m.R + m.b;
    const ws = (V / m.Ke) * (1 - Math.sqrt((m.b * V) / (c * V)));
    const iS = (V - m.Ke * ws) / m.R;
    const truth: Record<string, number> = {
      electricalTimeConstant: mf.electricalTimeConstant, mechanicalTimeConstantViscous: mf.mechanicalTimeConstantViscous,
      noLoadSpeed: mf.steadySpeed, stallTorque: mf.stallTorque, motorConstant: mf.motorConstant, maxOutputPower: (a * a) / (4 * c),
      peakEfficiency: (100 * (a - c * ws) * ws) / (V * iS),
    };
    for (const k of keys) {
      const f = ps.derived[k]!;
      if (f.ci95 !== null && f.ci95[0] <= truth[k]! && truth[k]! <= f.ci95[1]) hits[k]!++;
      if (f.ci95 !== null) widths[k]! += (f.ci95[1] - f.ci95[0]) / 2 / f.value!;
    }
  }
  console.log(`${pad('figure', 30)} ${pad('coverage', 9)} ${pad('mean ± %', 9)}`);
  for (const k of keys) console.log(`${pad(k, 30)} ${pad((hits[k]! / used).toFixed(3), 9)} ${pad(((100 * widths[k]!) / used).toFixed(3), 9)}`);
  console.log(`converged fits used: ${used}/${seeds}; ${((performance.now() - t0) / 1000).toFixed(1)} s (fits dominate)`);
  console.log('binomial SD of a true 0.95 coverage over 100 fits: 0.022');
}
