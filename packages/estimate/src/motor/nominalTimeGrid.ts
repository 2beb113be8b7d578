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
 * deviations. A logger whose time stamps are the actual (jittered) instants, driving a command
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
  const sd = Math.sqrt(ss / (n - 2));
  if (!(h > 0) || sd < 0.01 * h || worst >= 0.45 * h) return null;
  return { start: a, interval: h, jitter: sd };
}
