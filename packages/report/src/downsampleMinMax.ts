/**
 * Reduce a long series for drawing: split the x range into `columns` equal bins (one per pixel
 * column) and keep, per bin, the points with the smallest and the largest y, in their original
 * order. Peaks and spikes survive; a run of NaN y values is kept as one NaN (a gap in the line).
 * Series with at most 2·columns points are returned as copies, unchanged.
 *
 * @param x - x values, non-decreasing (time)
 * @param y - y values (NaN marks a gap)
 * @param columns - number of bins (pixel columns), ≥ 1
 * @returns `{ x, y }`, at most 2·columns points plus gaps
 * @throws TypeError when x and y differ in length; RangeError when columns < 1
 * @example
 * downsampleMinMax(Float64Array.of(0, 1, 2, 3), Float64Array.of(0, 5, -1, 2), 1).y; // => Float64Array [5, -1]
 */
export function downsampleMinMax(x: ArrayLike<number>, y: ArrayLike<number>, columns: number): { x: Float64Array; y: Float64Array } {
  const n = x.length;
  if (y.length !== n) throw new TypeError(`downsampleMinMax: x and y must have the same length (got ${n} and ${y.length})`);
  if (!(columns >= 1) || !Number.isFinite(columns)) throw new RangeError(`downsampleMinMax: columns must be a finite number >= 1 (got ${columns})`);
  const cols = Math.floor(columns);
  if (n <= 2 * cols) return { x: Float64Array.from(x), y: Float64Array.from(y) };
  const xs = x instanceof Float64Array ? x : Float64Array.from(x);
  const ys = y instanceof Float64Array ? y : Float64Array.from(y);
  const ox = new Float64Array(2 * cols + n); // worst case: every sample a gap boundary
  const oy = new Float64Array(2 * cols + n);
  const m = minMaxInto(ox, oy, xs, ys, cols);
  return { x: ox.slice(0, m), y: oy.slice(0, m) };
}

/** Kernel: writes the kept points into ox/oy, returns their count. No allocation, no closures. */
function minMaxInto(ox: Float64Array, oy: Float64Array, x: Float64Array, y: Float64Array, cols: number): number {
  const n = x.length;
  let xmin = Infinity, xmax = -Infinity;
  for (let k = 0; k < n; k++) { const v = x[k]!; if (v < xmin) xmin = v; if (v > xmax) xmax = v; }
  const scale = cols / (xmax > xmin ? xmax - xmin : 1);
  let m = 0, bin = -1, iMin = -1, iMax = -1, gap = false;
  for (let k = 0; k <= n; k++) {
    const end = k === n;
    const yk = end ? NaN : y[k]!;
    const finite = !end && yk === yk && yk !== Infinity && yk !== -Infinity;
    let bk = bin;
    if (finite) {
      bk = Math.floor((x[k]! - xmin) * scale);
      if (bk >= cols) bk = cols - 1;
    }
    // Close the current bin at a gap, at a bin change, or at the end.
    if (iMin >= 0 && (!finite || bk !== bin)) {
      const a = iMin < iMax ? iMin : iMax, b = iMin < iMax ? iMax : iMin;
      ox[m] = x[a]!; oy[m] = y[a]!; m++;
      if (b !== a) { ox[m] = x[b]!; oy[m] = y[b]!; m++; }
      iMin = -1; iMax = -1;
    }
    if (end) break;
    if (!finite) {
      if (!gap && m > 0) { ox[m] = x[k]!; oy[m] = NaN; m++; }
      gap = true;
      continue;
    }
    gap = false;
    bin = bk;
    if (iMin < 0 || yk < y[iMin]!) iMin = k;
    if (iMax < 0 || yk > y[iMax]!) iMax = k;
  }
  return m;
}
