import { estimateKernel, KERNEL_MIN_LENGTH, kernelMemory, useKernels } from '../estimateKernels.js';
import { addChunkSums } from '../solver/accumulateNormalEquations.js';
import { SUMS_SCRATCH, sumChunkInKernel } from '../solver/sumChunkKernel.js';
import type { SweepBuffers, SweepSpec } from './sweepLinearModel.js';

/** Samples per call of a run kernel (two rows each fit the chunk). */
export const RUN_BLOCK = 512;

/** Runs taken by the kernels so far (read by the tests, which check that their comparisons reach the kernels). */
export const kernelRuns = { count: 0 };

/** Largest kernel memory a run asks for (the loader keeps up to this much between calls). */
const MAX_BYTES = 64 * 2 ** 20;

/**
 * The measured series and the input of the last run, left in the kernel's memory between the
 * sweeps of one problem (one `createMotorProblem`, whose sweeps all run inside one library call with
 * no caller code between them, so the arrays cannot change): valid while `kernelMemory.keptBy` is
 * this record (any other writer of that part of the memory clears it, `claimKernelMemory`) and the
 * buffers, the arrays (by identity) and the layout are the same. Weak references only: it keeps
 * nothing alive.
 */
let keptSeries: {
  exports: object; b: WeakRef<SweepBuffers>; n: number; MI: number; MW: number; IN: number; CL: number; end: number;
  mi: WeakRef<Float64Array> | null; mw: WeakRef<Float64Array> | null; input: WeakRef<Float64Array> | null; cls: WeakRef<Int32Array> | null;
} | null = null;

function refOrNull<T extends object>(x: T | null): WeakRef<T> | null {
  return x === null ? null : new WeakRef(x);
}

function derefOrNull<T extends object>(x: WeakRef<T> | null): T | null {
  return x === null ? null : x.deref() ?? null;
}

/** Most distinct sample intervals of a run with effect columns (more: the JavaScript loops run). */
const MAX_INTERVALS = 64;

/** Doubles of the parameter block (`estimateKernels.wat`, freeRunSens). */
const BLOCK_DOUBLES = 96;

/**
 * A uniform free run [k0, k1) through the WebAssembly kernels `freeRunSens`, `freeRunBasis` (level
 * classes fitted) or `freeRunValues`
 * (internal; called by `sweepLinearModel` in place of its `freeRun`). The chunk buffers, the state
 * and the series are copied into the kernel's memory, the run goes in blocks of `RUN_BLOCK`
 * samples with the chunk accumulated at the same rows as `freeRun` does (the chunk sums by the
 * kernel's own sum functions on that memory, then `addChunkSums`), and the buffers, the state and
 * the written residual series are copied back, so `b`, `s.outI`/`s.outW` and `b.acc` end as the
 * JavaScript run leaves them, to the bit (the kernels do its operations in its order).
 *
 * With effect columns (the score pass, both channels present) the kernel `freeRunEffects` adds
 * them after each block as sweepLinearModel's `freeRunEffects` does; the factor e^{−h/τ} of each
 * distinct interval h is computed here with Math.exp (kernels keep to exactly rounded operations).
 *
 * @returns false, having changed nothing, where the kernel does not apply (a fitted sine basis,
 *   effect columns without both channels, a short run, more than `MAX_INTERVALS` distinct
 *   intervals with effect columns) or cannot run; the caller then runs the JavaScript loops
 */
export function freeRunInKernel(b: SweepBuffers, s: SweepSpec, k0: number, k1: number): boolean {
  if (!useKernels.on || k1 - k0 < KERNEL_MIN_LENGTH || b.r.length !== b.st) return false;
  const sens = b.wantJ;
  // The kernels read the input as levels[cls[k]] or input[k]; a fitted sine basis stays in JavaScript.
  const m = s.m;
  if (m > 0 && (s.cls === null || b.su.length < 2 * m || s.colU.length < m)) return false;
  const basis = sens && m > 0;
  // Effect columns (written only with a Jacobian): with both channels (else freeRunEffects takes its generic rows).
  const ef = sens ? b.effects : null;
  if (ef !== null && (s.mi === null || s.mw === null || s.time.length < s.n)) return false;
  const n = s.n, st = b.st, jac = b.jac, cls = s.cls;
  const mi = s.mi, mw = s.mw, outI = s.outI, outW = s.outW;
  if (k1 > n || (mi !== null && mi.length < n) || (mw !== null && mw.length < n) || (outI !== null && outI.length < n) || (outW !== null && outW.length < n)) return false;
  if (cls === null ? s.input.length < n : cls.length < n) return false;
  // Layout (doubles): sums scratch, parameter block, r, jac, the measured series and the input (kept
  // between the sweeps of one problem, see `keptSeries`), then the rest.
  const P = SUMS_SCRATCH;
  const R0 = P + BLOCK_DOUBLES;
  const J0 = R0 + st;
  let end = J0 + jac.length;
  const MI = mi === null ? 0 : end; end += mi === null ? 0 : n;
  const MW = mw === null ? 0 : end; end += mw === null ? 0 : n;
  const IN = cls === null ? end : 0; end += cls === null ? n : 0;
  const CL = cls === null ? 0 : end; end += cls === null ? 0 : (n + 1) >> 1;
  const keptEnd = end;
  const LV = cls === null ? 0 : end; end += cls === null ? 0 : s.levels.length;
  const OI = outI === null ? 0 : end; end += outI === null ? 0 : n;
  const OW = outW === null ? 0 : end; end += outW === null ? 0 : n;
  // Effect columns: their block, the time base, each sample's interval index and the distinct intervals with e^{−h/τ}.
  const SU = end; end += basis ? 2 * m : 0;
  const CU = end; end += basis ? m : 0;
  const E = end; end += ef === null ? 0 : 24;
  const T0 = end; end += ef === null ? 0 : n;
  const IX = end; end += ef === null ? 0 : (n + 1) >> 1;
  const HT = end; end += ef === null ? 0 : MAX_INTERVALS;
  const QS = end; end += ef === null ? 0 : MAX_INTERVALS;
  if (8 * end > MAX_BYTES) return false;
  const room = estimateKernel.room(8 * end);
  if (room === null) return false;
  const ex = room.exports, mem = room.f64;
  if (ef !== null) {
    // e^{−h/τ} of each distinct interval h = time[k+1] − time[k] (JavaScript's Math.exp, as freeRunEffects takes it).
    mem.set(s.time.subarray(0, n), T0);
    const count = ex.intervalIndex(8 * T0, k0, k1 < n ? k1 : n - 1, 8 * IX, 8 * HT, MAX_INTERVALS);
    if (count < 0) return false;
    const tau = ef.tau;
    for (let j = 0; j < count; j++) { const h = mem[HT + j]!; mem[QS + j] = Math.exp(-h / tau); }
    mem.set(ef.state.subarray(0, 10), E);
    mem[E + 10] = tau; mem[E + 11] = s.R / ef.copper; mem[E + 12] = s.R;
    for (let c = 0; c < 4; c++) mem[E + 13 + c] = (ef.col + c) * st;
  }
  mem.set(b.slot.subarray(0, 56), P);
  mem.set(b.x.subarray(0, 16), P + 56);
  mem[P + 72] = s.sI; mem[P + 73] = s.sW; mem[P + 74] = s.off; mem[P + 75] = s.tau;
  mem[P + 76] = s.tcW; mem[P + 77] = s.ldW; mem[P + 78] = s.offW; mem[P + 79] = n;
  for (let j = 0; j < 9; j++) mem[P + 80 + j] = s.col[j]!;
  if (basis) {
    mem[P + 89] = s.uScale; mem[P + 90] = m; mem[P + 91] = 8 * SU; mem[P + 92] = 8 * CU;
    mem.set(b.su.subarray(0, 2 * m), SU);
    for (let j = 0; j < m; j++) mem[CU + j] = s.colU[j]!;
  }
  mem.set(b.r, R0);
  if (sens) mem.set(jac, J0);
  const input = cls === null ? s.input : null;
  const kept = keptSeries;
  if (!(kernelMemory.keptBy === kept && kept !== null && kept.exports === ex && kept.b.deref() === b && kept.n === n && kept.MI === MI && kept.MW === MW &&
    kept.IN === IN && kept.CL === CL && kept.end === keptEnd && derefOrNull(kept.mi) === mi && derefOrNull(kept.mw) === mw &&
    derefOrNull(kept.input) === input && derefOrNull(kept.cls) === cls)) {
    if (mi !== null) mem.set(mi.subarray(0, n), MI);
    if (mw !== null) mem.set(mw.subarray(0, n), MW);
    if (input !== null) mem.set(input.subarray(0, n), IN);
    if (cls !== null) new Int32Array(mem.buffer, 8 * CL, n).set(cls.subarray(0, n));
    keptSeries = {
      exports: ex, b: new WeakRef(b), n, MI, MW, IN, CL, end: keptEnd,
      mi: refOrNull(mi), mw: refOrNull(mw), input: refOrNull(input), cls: refOrNull(cls),
    };
    kernelMemory.keptBy = keptSeries;
    kernelMemory.keptFrom = J0 + jac.length;
  }
  if (cls !== null) mem.set(s.levels, LV);
  kernelRuns.count++;
  const acc = b.acc;
  const run = basis ? ex.freeRunBasis : sens ? ex.freeRunSens : ex.freeRunValues;
  let rows = b.rows;
  for (let k = k0; k < k1; k += RUN_BLOCK) {
    const e = k + RUN_BLOCK < k1 ? k + RUN_BLOCK : k1;
    if (rows + 2 * (e - k) > st) {
      // freeRun's flush, on the kernel's memory.
      if (acc !== null && rows > 0) {
        if (sens) sumChunkInKernel(ex, mem, acc.p, acc.chunk, 8 * R0, 8 * J0, rows, 8 * st, 0);
        else acc.chunk[acc.chunk.length - 1] = ex.sumSquares(8 * R0, rows);
        addChunkSums(acc, sens, rows);
      }
      rows = 0;
    }
    const row0 = rows, i0 = mem[P + 56]!, w0 = mem[P + 57]!;
    rows = run(8 * P, k, e, rows, 8 * R0, 8 * J0, 8 * MI, 8 * MW, 8 * OI, 8 * OW, 8 * IN, 8 * CL, 8 * LV);
    if (ef !== null) ex.freeRunEffects(8 * P, 8 * E, k, e, row0, i0, w0, 8 * J0, 8 * IN, 8 * CL, 8 * LV, 8 * T0, 8 * IX, 8 * QS);
  }
  if (ef !== null) ef.state.set(mem.subarray(E, E + 10));
  if (basis) b.su.set(mem.subarray(SU, SU + 2 * m));
  b.rows = rows;
  b.x.set(mem.subarray(P + 56, P + 72));
  b.r.set(mem.subarray(R0, R0 + st));
  if (sens) jac.set(mem.subarray(J0, J0 + jac.length));
  if (outI !== null) outI.set(mem.subarray(OI + k0, OI + k1), k0);
  if (outW !== null) outW.set(mem.subarray(OW + k0, OW + k1), k0);
  return true;
}
