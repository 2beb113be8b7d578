/**
 * Bench for @motorprint/model: memory floor, linear ZOH pass, chunked pass with sensitivities,
 * detailed model with friction. Goal: linear pass ≤ 3× the floor. Timings live here, not in tests.
 *
 * Floors: (a) sums the input with one accumulator — the floor. Its loop carries one add per
 * element, so on some machines it measures add latency rather than memory; (a′) reads the same array
 * once with four accumulators (the same arithmetic, no chain), which is the lower, stricter floor;
 * (a″) reads the input and writes two outputs, the memory traffic the linear pass really has.
 * Both ratios are printed; the goal line uses (a) and the stricter ratio is shown beside it.
 * Rows (a)–(b′) are timed interleaved (one run of each per round, best of 25 rounds).
 * (b) runs without load torque (the loop without load terms); (b′) is the same pass with a load.
 */
import { createSensitivityState, simulateChunkInto, simulateDetailed, simulateInto } from '../packages/model/src/index.js'; // the root has no workspace link to the package

const motor = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 }; // FACTS.md §5 motor (invented)

function best(reps: number, f: () => number): { ms: number; sink: number } {
  let ms = Infinity, sink = 0;
  for (let r = 0; r < reps; r++) {
    const t0 = process.hrtime.bigint();
    sink += f();
    ms = Math.min(ms, Number(process.hrtime.bigint() - t0) / 1e6);
  }
  return { ms, sink };
}

export default async function run(): Promise<void> {
  const n = 1_000_000;
  const v = new Float64Array(n);
  for (let k = 0; k < n; k++) v[k] = 6 + 6 * Math.sin(k / 500);
  const out = { current: new Float64Array(n), speed: new Float64Array(n) };
  // Rows (a)–(b′) are timed interleaved, one run of each per round, best of 25 rounds, so that the
  // floor and the passes see the same machine state (the machine is shared with other processes).
  const cases: Record<'floor' | 'floor4' | 'copy2' | 'lin' | 'linLoad', () => number> = {
    floor: () => { let s = 0; for (let k = 0; k < n; k++) s += v[k]!; return s; },
    floor4: () => {
      let s0 = 0, s1 = 0, s2 = 0, s3 = 0, k = 0;
      for (; k + 3 < n; k += 4) { s0 += v[k]!; s1 += v[k + 1]!; s2 += v[k + 2]!; s3 += v[k + 3]!; }
      for (; k < n; k++) s0 += v[k]!;
      return s0 + s1 + (s2 + s3);
    },
    copy2: () => {
      const c = out.current, w = out.speed;
      for (let k = 0; k < n; k++) { const x = v[k]!; c[k] = x; w[k] = x; }
      return w[n - 1]!;
    },
    lin: () => { simulateInto(out, motor, v, 1e-4); return out.speed[n - 1]!; },
    // Same pass with a load torque (invented 1 mN·m): simulateInto runs a separate loop with load terms.
    linLoad: () => { simulateInto(out, motor, v, 1e-4, { loadTorque: 1e-3 }); return out.speed[n - 1]!; },
  };
  const t = { floor: { ms: Infinity, sink: 0 }, floor4: { ms: Infinity, sink: 0 }, copy2: { ms: Infinity, sink: 0 },
    lin: { ms: Infinity, sink: 0 }, linLoad: { ms: Infinity, sink: 0 } };
  for (let round = 0; round < 25; round++) {
    for (const key of Object.keys(cases) as (keyof typeof cases)[]) {
      const r = best(1, cases[key]);
      t[key].ms = Math.min(t[key].ms, r.ms);
      t[key].sink += r.sink;
    }
  }
  const { floor, floor4, copy2, lin, linLoad } = t;
  const m = 4096;
  const ch = { current: new Float64Array(m), speed: new Float64Array(m), currentSensitivity: new Float64Array(8 * m), speedSensitivity: new Float64Array(8 * m) };
  const sens = best(5, () => {
    const st = createSensitivityState(motor);
    let acc = 0;
    for (let k0 = 0; k0 < n; k0 += m) {
      const k1 = Math.min(n, k0 + m);
      simulateChunkInto(st, v, 1e-4, k0, k1, ch);
      for (let r = 0; r < k1 - k0; r++) acc += ch.speedSensitivity[8 * r + 4]!; // consume like a JᵀJ sweep would
    }
    return acc;
  });
  const nd = 100_001; // 10 s at 10 kHz
  const vd = new Float64Array(nd);
  for (let k = 0; k < nd; k++) vd[k] = 3 * Math.sin((2 * Math.PI * k) / 10000) + (k % 20000 < 10000 ? 0.5 : -0.5);
  let steps = 0;
  const det = best(3, () => {
    const r = simulateDetailed({ ...motor, Tc: 2e-3, Ts: 3e-3, cd: 1e-8 }, vd, 1e-4);
    steps = r.stats.steps;
    return r.speed[nd - 1]!;
  });
  const rows: [string, number, number][] = [
    ['(a) read 1e6 Float64Array (floor)', floor.ms, n],
    ["(a′) same read, 4 accumulators", floor4.ms, n],
    ["(a″) read 1e6 + write 2×1e6 (traffic of b)", copy2.ms, n],
    ['(b) linear ZOH pass, 1e6 samples', lin.ms, n],
    ["(b′) same with load torque 1e-3 N·m", linLoad.ms, n],
    ['(c) ZOH + 8 sensitivities, chunked', sens.ms, n],
    [`(d) detailed, 10 s @ 10 kHz, Tc+Ts+cd (${steps} steps)`, det.ms, nd],
  ];
  const pad = (s: string, w: number) => s.padEnd(w);
  console.log(`${pad('case', 52)}${'ms'.padStart(10)}${'ns/sample'.padStart(12)}${'× floor'.padStart(10)}`);
  for (const [name, ms, count] of rows) {
    const ns = (ms * 1e6) / count;
    const ratio = ns / ((floor.ms * 1e6) / n);
    console.log(`${pad(name, 52)}${ms.toFixed(2).padStart(10)}${ns.toFixed(2).padStart(12)}${ratio.toFixed(1).padStart(10)}`);
  }
  const ratio = lin.ms / floor.ms;
  const strict = lin.ms / floor4.ms;
  console.log(`\ngoal: linear pass ≤ 3× floor (a) → ${ratio.toFixed(2)}× ${ratio <= 3 ? 'MET' : 'NOT MET'}` +
    `; against (a′): ${strict.toFixed(2)}× ${strict <= 3 ? 'MET' : 'NOT MET'}`);
  const ratioLoad = linLoad.ms / floor.ms;
  console.log(`with load torque (b′): ${ratioLoad.toFixed(2)}× floor (a) ${ratioLoad <= 3 ? 'MET' : 'NOT MET'}`);
  if (floor.sink + floor4.sink + copy2.sink + lin.sink + linLoad.sink + sens.sink + det.sink === 0.123456789) console.log(''); // keep results alive
}
