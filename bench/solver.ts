/**
 * Bench for the least-squares core (packages/estimate/src/solver):
 *  (a) all 27 NIST StRD nonlinear datasets × 2 starts: our solver (analytic and central-difference
 *      Jacobians) vs the ml-levenberg-marquardt adapter — iterations, time, least parameter LRE;
 *  (b) an invented long record (two decays plus offset, p = 5, seeded Gaussian noise) streamed in
 *      chunks of 4096 at 1e4, 1e5, 1e6 samples, vs ml-levenberg-marquardt 5.1 with its analytic
 *      `jacobianFunction` at 1e4 and 1e5;
 *  (c) whether compensated summation matters for the SSR at 1e6 samples;
 *  (d) accumulation of the normal equations alone (p = 5, 8, 12 at 1e6 rows): the current
 *      single-pass kernels vs the previous one-pass-per-entry implementation (kept below as a
 *      private reference copy, `accumulateOnePassPerEntry`).
 * Speed goals (5-parameter fit): <= 0.1 s at 1e5 samples, <= 1 s at 1e6.
 */
// The root package does not depend on the workspace packages, so the bench reaches them by path.
import { levenbergMarquardt } from '../packages/estimate/node_modules/ml-levenberg-marquardt/lib/index.js';
import {
  accumulateNormalEquations,
  createNormalEquations,
  fitCurveWithMlLm,
  logRelativeError,
  solveLeastSquares,
  type LeastSquaresProblem,
  type NormalEquations,
} from '../packages/estimate/src/index.js';
import { fitStrd, STRD_OPTIONS, strdResponse, strdRunOptions } from '../packages/estimate/src/__tests__/strd/fitStrd.js';
import { loadStrd } from '../packages/estimate/src/__tests__/strd/loadStrd.js';
import { STRD_MODELS, STRD_NAMES } from '../packages/estimate/src/__tests__/strd/strdModels.js';

const pad = (s: string | number, w: number) => String(s).padStart(w);

function nistTable(): void {
  console.log('(a) NIST StRD nonlinear, 27 datasets x 2 starts. LRE = least agreeing digits over parameters (max 11).');
  console.log('    ours: solveLeastSquares via fitCurve, tolerances 1e-15; fd = central differences;');
  console.log('    ml-lm: fitCurveWithMlLm (theta/theta0 scaling, central differences, rounds of 10, relative stop 1e-12, cap 2000 it.)');
  console.log(
    `${'dataset'.padEnd(9)} st | ${pad('it', 5)} ${pad('ms', 6)} ${pad('LRE', 5)} ${'stop'.padEnd(18)} | ${pad('fd LRE', 6)} | ${pad('ml it', 6)} ${pad('ms', 7)} ${pad('LRE', 5)}`,
  );
  let oursOk = 0;
  let oursConverged = 0;
  let mlOk = 0;
  for (const name of STRD_NAMES) {
    const ds = loadStrd(name);
    for (const start of [1, 2] as const) {
      let t0 = performance.now();
      const runOptions = strdRunOptions(name, start);
      const ours = fitStrd(ds, start, true, runOptions);
      const oursMs = performance.now() - t0;
      const fd = fitStrd(ds, start, false, runOptions);
      const special = Object.keys(runOptions).length > Object.keys(STRD_OPTIONS).length;
      t0 = performance.now();
      let mlIt = 0;
      let mlLre = 0;
      try {
        const ml = fitCurveWithMlLm({
          x: ds.x,
          y: strdResponse(ds),
          model: STRD_MODELS[name]!.model,
          start: start === 1 ? ds.start1 : ds.start2,
          options: { maxIterations: 2000, relativeReductionTolerance: 1e-12 },
        });
        mlIt = ml.iterations;
        mlLre = Math.min(...ds.certified.map((c, j) => logRelativeError(ml.theta[j]!, c)));
      } catch {
        mlLre = 0;
      }
      const mlMs = performance.now() - t0;
      const lre = Math.min(...ours.parameterLre);
      if (lre >= 6) oursOk++;
      if (ours.fit.converged) oursConverged++;
      if (mlLre >= 6) mlOk++;
      console.log(
        `${name.padEnd(9)} ${start}  | ${pad(ours.fit.iterations, 5)} ${pad(oursMs.toFixed(1), 6)} ${pad(lre.toFixed(1), 5)} ${(ours.fit.stopReason + (special ? '*' : '')).padEnd(18)} | ${pad(Math.min(...fd.parameterLre).toFixed(1), 6)} | ${pad(mlIt, 6)} ${pad(mlMs.toFixed(1), 7)} ${pad(mlLre.toFixed(1), 5)}`,
      );
    }
  }
  console.log('    * = geodesic acceleration with dampingScale "current" (STRD_RUN_OPTIONS; only MGH10 Start 1)');
  console.log(`runs with LRE >= 6: ours ${oursOk}/54 (reporting converged: ${oursConverged}/54), ml-lm adapter ${mlOk}/54`);
}

/**
 * Reference copy of the previous `accumulateNormalEquations` (before the single-pass kernels):
 * one pass over the rows per entry of JᵀJ, Jᵀr and rᵀr, i.e. p(p+1)/2 + p + 1 passes. Same
 * results bit for bit; kept only for the before/after timing.
 */
function accumulateOnePassPerEntry(
  acc: NormalEquations,
  residuals: Float64Array,
  jacobian: Float64Array | null,
  rows: number,
  stride: number = rows,
): number {
  const p = acc.p;
  const chunk = acc.chunk;
  const high = acc.high;
  const low = acc.low;
  const tri = (p * (p + 1)) / 2;
  const last = tri + p;
  let t = 0;
  let s = 0;
  let k = 0;
  for (k = 0; k < rows; k++) s += residuals[k]! * residuals[k]!;
  const chunkSsr = s;
  chunk[last] = s;
  if (jacobian !== null) {
    for (let i = 0; i < p; i++) {
      const oi = i * stride;
      for (let j = i; j < p; j++) {
        const oj = j * stride;
        s = 0;
        for (k = 0; k < rows; k++) s += jacobian[oi + k]! * jacobian[oj + k]!;
        chunk[t++] = s;
      }
    }
    for (let i = 0; i < p; i++) {
      const oi = i * stride;
      s = 0;
      for (k = 0; k < rows; k++) s += jacobian[oi + k]! * residuals[k]!;
      chunk[t++] = s;
    }
  }
  const end = jacobian !== null ? last + 1 : 0;
  const compensated = acc.compensated;
  for (let m = jacobian !== null ? 0 : last; m < (jacobian !== null ? end : last + 1); m++) {
    const x = chunk[m]!;
    const h = high[m]!;
    const sum = h + x;
    if (compensated) {
      if (Math.abs(h) >= Math.abs(x)) low[m] = low[m]! + (h - sum + x);
      else low[m] = low[m]! + (x - sum + h);
    }
    high[m] = sum;
  }
  acc.ssr = high[last]! + low[last]!;
  acc.rows += rows;
  if (jacobian !== null) {
    const JtJ = acc.JtJ;
    const Jtr = acc.Jtr;
    t = 0;
    for (let i = 0; i < p; i++) {
      for (let j = i; j < p; j++) {
        const v = high[t]! + low[t]!;
        JtJ[i * p + j] = v;
        JtJ[j * p + i] = v;
        t++;
      }
    }
    for (let i = 0; i < p; i++) {
      Jtr[i] = high[t]! + low[t]!;
      t++;
    }
  }
  return chunkSsr;
}

type Accumulate = typeof accumulateNormalEquations;

/** Deterministic Gaussian noise (mulberry32 + Box–Muller), invented for the bench. */
function noise(n: number, sigma: number, seed: number): Float64Array {
  let a = seed >>> 0;
  const uni = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  const out = new Float64Array(n);
  for (let k = 0; k < n; k++) out[k] = sigma * Math.sqrt(-2 * Math.log(uni())) * Math.cos(2 * Math.PI * uni());
  return out;
}

// Invented record: y = 2·e^(−3t) + 0.8·e^(−0.4t) + 0.1 over t in [0, 10) s, noise σ = 0.01.
const TRUE = [2, 3, 0.8, 0.4, 0.1];
const START = [1.5, 2, 1, 0.3, 0];
const CHUNK = 4096;

function makeRecord(n: number): { t: Float64Array; y: Float64Array } {
  const t = new Float64Array(n);
  const y = noise(n, 0.01, 12345);
  for (let k = 0; k < n; k++) {
    const tk = (10 * k) / n;
    t[k] = tk;
    y[k] = y[k]! + TRUE[0]! * Math.exp(-TRUE[1]! * tk) + TRUE[2]! * Math.exp(-TRUE[3]! * tk) + TRUE[4]!;
  }
  return { t, y };
}

function twoDecayProblem(t: Float64Array, y: Float64Array, accumulate: Accumulate = accumulateNormalEquations): LeastSquaresProblem {
  const r = new Float64Array(CHUNK);
  const J = new Float64Array(CHUNK * 5);
  const n = t.length;
  return {
    parameterCount: 5,
    evaluate(th, want, acc) {
      const a1 = th[0]!;
      const k1 = th[1]!;
      const a2 = th[2]!;
      const k2 = th[3]!;
      const c = th[4]!;
      for (let s = 0; s < n; s += CHUNK) {
        const rows = n - s < CHUNK ? n - s : CHUNK;
        for (let i = 0; i < rows; i++) {
          const tk = t[s + i]!;
          const e1 = Math.exp(-k1 * tk);
          const e2 = Math.exp(-k2 * tk);
          r[i] = a1 * e1 + a2 * e2 + c - y[s + i]!;
          if (want) {
            J[i] = e1;
            J[rows + i] = -a1 * tk * e1;
            J[2 * rows + i] = e2;
            J[3 * rows + i] = -a2 * tk * e2;
            J[4 * rows + i] = 1;
          }
        }
        accumulate(acc, r, want ? J : null, rows);
      }
      return acc.ssr;
    },
  };
}

function longTable(): void {
  console.log('\n(b) invented record y = 2e^(-3t) + 0.8e^(-0.4t) + 0.1 + N(0, 0.01²), p = 5, chunks of 4096');
  console.log('    ours: solveLeastSquares, default tolerances; ml-lm: levenbergMarquardt 5.1 with analytic jacobianFunction,');
  console.log('    errorTolerance 0, 30 iterations (it has no relative stop), weights 1; time = median of 3 (ours), 1 run (ml-lm)');
  console.log('    ours ms = current accumulation; old-acc ms = same fit with the previous one-pass-per-entry accumulation');
  console.log(`${pad('n', 8)} | ${pad('ours ms', 8)} ${pad('old-acc ms', 10)} ${pad('it', 4)} ${pad('J ev', 5)} ${pad('f ev', 5)} ${'stop'.padEnd(18)} ${pad('max rel err', 11)} | ${pad('ml-lm ms', 9)} ${pad('ms/it', 7)} ${pad('max rel err', 11)}`);
  for (const n of [1e4, 1e5, 1e6]) {
    const { t, y } = makeRecord(n);
    const problem = twoDecayProblem(t, y);
    const times: number[] = [];
    let res = solveLeastSquares(problem, START);
    for (let rep = 0; rep < 3; rep++) {
      const t0 = performance.now();
      res = solveLeastSquares(problem, START);
      times.push(performance.now() - t0);
    }
    times.sort((a, b) => a - b);
    const oldProblem = twoDecayProblem(t, y, accumulateOnePassPerEntry);
    const oldTimes: number[] = [];
    let oldRes = solveLeastSquares(oldProblem, START);
    for (let rep = 0; rep < 3; rep++) {
      const t0 = performance.now();
      oldRes = solveLeastSquares(oldProblem, START);
      oldTimes.push(performance.now() - t0);
    }
    oldTimes.sort((a, b) => a - b);
    if (oldRes.iterations !== res.iterations || oldRes.theta.some((v, j) => v !== res.theta[j])) {
      console.log(`    !! n = ${n}: old and current accumulation gave different fits`);
    }
    const err = Math.max(...TRUE.map((v, j) => Math.abs(res.theta[j]! - v) / Math.abs(v)));
    let ml = `${pad('skipped', 9)} ${pad('', 7)} ${pad('', 11)}`;
    if (n <= 1e5) {
      const xs = Array.from(t);
      const ys = Array.from(y);
      const t0 = performance.now();
      const out = levenbergMarquardt(
        { x: xs, y: ys },
        ([a1, k1, a2, k2, c]) => (tk: number) => a1! * Math.exp(-k1! * tk) + a2! * Math.exp(-k2! * tk) + c!,
        {
          initialValues: START,
          maxIterations: 30,
          errorTolerance: 0,
          jacobianFunction: ([a1, k1, a2, k2]) => (tk: number) => {
            const e1 = Math.exp(-k1! * tk);
            const e2 = Math.exp(-k2! * tk);
            return [e1, -a1! * tk * e1, e2, -a2! * tk * e2, 1];
          },
        },
      );
      const ms = performance.now() - t0;
      const mlErr = Math.max(...TRUE.map((v, j) => Math.abs(out.parameterValues[j]! - v) / Math.abs(v)));
      ml = `${pad(ms.toFixed(0), 9)} ${pad((ms / out.iterations).toFixed(1), 7)} ${pad(mlErr.toExponential(2), 11)}`;
    }
    console.log(
      `${pad(n, 8)} | ${pad(times[1]!.toFixed(1), 8)} ${pad(oldTimes[1]!.toFixed(1), 10)} ${pad(res.iterations, 4)} ${pad(res.jacobianEvaluations, 5)} ${pad(res.functionEvaluations, 5)} ${res.stopReason.padEnd(18)} ${pad(err.toExponential(2), 11)} | ${ml}`,
    );
  }
  console.log('    ml-lm at 1e6 skipped: its per-iteration cost grows linearly from the 1e5 row (dense 5 x n Matrix per iteration), i.e. > 30 s for 30 iterations.');
}

function summationTable(): void {
  console.log('\n(c) does compensated summation matter? SSR of the 1e6 record at the start point, relative error vs a');
  console.log('    per-row Neumaier sum (reference); and the fitted theta with compensated vs plain chunk totals');
  const n = 1e6;
  const { t, y } = makeRecord(n);
  const th = Float64Array.from(START);
  const r = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    r[k] = th[0]! * Math.exp(-th[1]! * t[k]!) + th[2]! * Math.exp(-th[3]! * t[k]!) + th[4]! - y[k]!;
  }
  let hi = 0;
  let lo = 0;
  let naive = 0;
  for (let k = 0; k < n; k++) {
    const x = r[k]! * r[k]!;
    naive += x;
    const s = hi + x;
    lo += Math.abs(hi) >= Math.abs(x) ? hi - s + x : x - s + hi;
    hi = s;
  }
  const ref = hi + lo;
  const plain = createNormalEquations(5, false);
  const comp = createNormalEquations(5, true);
  for (let s = 0; s < n; s += CHUNK) {
    const rows = Math.min(CHUNK, n - s);
    accumulateNormalEquations(plain, r.subarray(s, s + rows), null, rows);
    accumulateNormalEquations(comp, r.subarray(s, s + rows), null, rows);
  }
  console.log(`    one running sum over 1e6 rows     rel err ${(Math.abs(naive - ref) / ref).toExponential(2)}`);
  console.log(`    chunks of 4096, plain totals      rel err ${(Math.abs(plain.ssr - ref) / ref).toExponential(2)}`);
  console.log(`    chunks of 4096, Neumaier totals   rel err ${(Math.abs(comp.ssr - ref) / ref).toExponential(2)}`);
  const problem = twoDecayProblem(t, y);
  let t0 = performance.now();
  const a = solveLeastSquares(problem, START, { compensatedSums: true });
  const ta = performance.now() - t0;
  t0 = performance.now();
  const b = solveLeastSquares(problem, START, { compensatedSums: false });
  const tb = performance.now() - t0;
  const dTheta = Math.max(...Array.from(a.theta, (v, j) => Math.abs(v - b.theta[j]!) / Math.abs(v)));
  console.log(`    fit: max rel theta difference compensated vs plain ${dTheta.toExponential(2)}; time ${ta.toFixed(0)} ms vs ${tb.toFixed(0)} ms`);
}

function accumulationTable(): void {
  console.log('\n(d) accumulation alone: 1e6 rows of invented random r and J (mulberry32/Box-Muller, seed 777) in chunks of 4096,');
  console.log('    column-major J with stride 4096; time = median of 7 runs over all chunks; "same bits" compares JtJ, Jtr, ssr');
  console.log(`${pad('p', 3)} | ${pad('old ms', 8)} ${pad('new ms', 8)} ${pad('speed-up', 8)} ${pad('new Mrow/s', 10)} | same bits`);
  const n = 1e6;
  for (const p of [5, 8, 12]) {
    const chunks = Math.ceil(n / CHUNK);
    const data = noise(chunks * CHUNK * (p + 1), 1, 777);
    const time = (f: Accumulate, acc: NormalEquations): number => {
      const ts: number[] = [];
      for (let rep = 0; rep < 7; rep++) {
        acc.high.fill(0);
        acc.low.fill(0);
        acc.ssr = 0;
        acc.rows = 0;
        const t0 = performance.now();
        for (let c = 0; c < chunks; c++) {
          const s = c * CHUNK;
          const rows = Math.min(CHUNK, n - s);
          // Chunk c: residuals then p columns of CHUNK slots each, packed in `data`.
          const base = c * CHUNK * (p + 1);
          f(acc, data.subarray(base, base + rows), data.subarray(base + CHUNK, base + CHUNK * (p + 1)), rows, CHUNK);
        }
        ts.push(performance.now() - t0);
      }
      ts.sort((a, b) => a - b);
      return ts[3]!;
    };
    const accOld = createNormalEquations(p);
    const accNew = createNormalEquations(p);
    const tOld = time(accumulateOnePassPerEntry, accOld);
    const tNew = time(accumulateNormalEquations, accNew);
    const same =
      accOld.ssr === accNew.ssr &&
      accOld.JtJ.every((v, i) => v === accNew.JtJ[i]) &&
      accOld.Jtr.every((v, i) => v === accNew.Jtr[i]);
    console.log(
      `${pad(p, 3)} | ${pad(tOld.toFixed(1), 8)} ${pad(tNew.toFixed(1), 8)} ${pad((tOld / tNew).toFixed(2) + 'x', 8)} ${pad((n / 1e3 / tNew).toFixed(0), 10)} | ${same ? 'yes' : 'NO'}`,
    );
  }
}

export default async function run(): Promise<void> {
  nistTable();
  longTable();
  summationTable();
  accumulationTable();
}
