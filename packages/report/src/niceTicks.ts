function niceNumber(x: number, round: boolean): number {
  const e = Math.floor(Math.log10(x));
  const p = 10 ** e;
  const f = x / p;
  let nf: number;
  if (round) nf = f < 1.5 ? 1 : f < 3 ? 2 : f < 7 ? 5 : 10;
  else nf = f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10;
  return nf * p;
}

/**
 * Axis ticks at "nice" numbers (1, 2 or 5 × 10ⁿ apart) covering [min, max].
 *
 * ## Method
 * The nice-number labelling of Heckbert: a nice range, then a nice step of about range/(count − 1),
 * the first tick at floor(min/step)·step and the last at ceil(max/step)·step. Tick values are
 * k·step rounded to 12 significant digits so that 0.1 + 0.2 shows as 0.3. A zero-width range is
 * widened to ±max(|x|/2, 1).
 *
 * ## References
 * P. S. Heckbert (1990), "Nice numbers for graph labels", in Graphics Gems, Academic Press,
 * pp. 61–63, doi:10.1016/B978-0-08-050753-8.50025-0.
 *
 * @param min - smallest data value
 * @param max - largest data value
 * @param count - about how many ticks @default 5
 * @returns `{ ticks, step }`; empty ticks for non-finite input
 * @example
 * niceTicks(0.013, 0.987).ticks; // => [0, 0.2, 0.4, 0.6, 0.8, 1]
 */
export function niceTicks(min: number, max: number, count = 5): { ticks: number[]; step: number } {
  if (!Number.isFinite(min) || !Number.isFinite(max) || !(count >= 2)) return { ticks: [], step: NaN };
  let lo = Math.min(min, max), hi = Math.max(min, max);
  if (hi - lo <= 1e-12 * Math.max(Math.abs(lo), Math.abs(hi)) || hi === lo) {
    const w = Math.max(Math.abs(lo) / 2, 1);
    lo -= w; hi += w;
  }
  const range = niceNumber(hi - lo, false);
  const step = niceNumber(range / (count - 1), true);
  // Snap ends within 1e-9 of a step onto it, so −1e-17 does not open a whole extra interval.
  const first = Math.floor(lo / step + 1e-9), last = Math.ceil(hi / step - 1e-9);
  const ticks: number[] = [];
  for (let k = first; k <= last; k++) ticks.push(Number((k * step).toPrecision(12)));
  return { ticks, step };
}
