import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';

/** A regular grid t = start + j·interval that jittered sample instants scatter around. */
export interface NominalGrid {
  /** First instant of the grid [s]. */
  start: number;
  /** Grid interval [s]. */
  interval: number;
  /** SD of the sample instants about the grid [s]. */
  jitter: number;
}

/**
 * Finds the regular clock behind jittered sample instants: t_k = a + k·h + δ_k with δ_k small
 * (|δ_k| < 0.45·h) and no missing samples; null when the instants are regular already
 * (SD of δ below 1 % of h: time stamps rounded to the logger's resolution are not jitter) or do not follow one clock (gaps, drifts larger than half an interval).
 *
 * ## Method
 * Least-squares line of t_k on k (the jitter is taken to average out), then the spread of the
 * deviations; the interval is snapped to the roundest number (at most 4 significant digits) and
 * the start to the first time stamp when they lie within 3 standard errors of the line. A logger whose time stamps are the actual (jittered) instants, driving a command
 * that changes on its own nominal clock, needs the clock to place the command's changes.
 *
 * @param time - sample instants [s], increasing
 * @returns the grid and the jitter SD, or null
 * @example
 * nominalTimeGrid(Float64Array.from({ length: 50 }, (_, k) => k * 1e-3 + (k % 2 ? 1e-4 : -1e-4)))?.interval; // ≈ 0.001
 */
export function nominalTimeGrid(time: Float64Array): NominalGrid | null {
  const n = time.length;
  if (n < 8) return null;
  const { h, a, ss, worst } = (n >= KERNEL_MIN_LENGTH ? timeLineKernel(time) : null) ?? timeLine(time);
  const sd = Math.sqrt(ss / (n - 2));
  if (!(h > 0) || sd < 0.01 * h || worst >= 0.45 * h) return null;
  // The line is only as good as the jitter allows (SE of the interval σ·√(12/n³), of the start
  // ≈ 2σ/√n), and a command that moves at every tick needs every sample in the right interval over
  // the whole record: a logger's clock runs at a round interval and starts at its own zero, so the
  // line is snapped to those when they lie within 3 standard errors of it.
  const seH = sd * Math.sqrt(12 / (n * n * n));
  const seA = (2 * sd) / Math.sqrt(n);
  const round = roundNear(h, 3 * seH);
  const interval = round ?? h;
  const start = Math.abs(a - time[0]!) <= 3 * seA ? time[0]! : a;
  return { start, interval, jitter: sd };
}

/** The least-squares line t ≈ a + k·h through the instants, with Σe² and max |e| of the deviations e = t − a − k·h. */
interface TimeLine { h: number; a: number; ss: number; worst: number }

/** The line's three passes in plain JavaScript (the reference of {@link timeLineKernel} and its fallback; exported for the tests). */
export function timeLine(time: Float64Array): TimeLine {
  const n = time.length;
  let sk = 0, st = 0;
  for (let k = 0; k < n; k++) { sk += k; st += time[k]!; }
  const kb = sk / n, tb = st / n;
  let skk = 0, skt = 0;
  for (let k = 0; k < n; k++) { const dk = k - kb; skk += dk * dk; skt += dk * (time[k]! - tb); }
  const h = skt / skk;
  const a = tb - h * kb;
  let ss = 0, worst = 0;
  for (let k = 0; k < n; k++) {
    const e = time[k]! - a - k * h;
    ss += e * e;
    worst = Math.max(worst, Math.abs(e));
  }
  return { h, a, ss, worst };
}

/** {@link timeLine} through the WebAssembly kernel (sampleKernels.wat): the same bits; null where it cannot run. */
export function timeLineKernel(time: Float64Array): TimeLine | null {
  const n = time.length;
  const room = sampleKernels.room(8 * (n + 4));
  if (room === null) return null;
  const { f64, exports: k } = room;
  f64.set(time, 0);
  k.timeLine(0, n, 8 * n);
  return { h: f64[n]!, a: f64[n + 1]!, ss: f64[n + 2]!, worst: f64[n + 3]! };
}

/** The number with the fewest significant digits (at most 4) within `tol` of x, or null. */
function roundNear(x: number, tol: number): number | null {
  for (let digits = 1; digits <= 4; digits++) {
    const e = Math.pow(10, Math.floor(Math.log10(x)) - digits + 1);
    const r = Math.round(x / e) * e;
    if (Math.abs(r - x) <= tol) return r;
  }
  return null;
}
