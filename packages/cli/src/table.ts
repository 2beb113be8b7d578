/**
 * Formats rows as a plain-text table with columns padded to their widest cell.
 * Numbers in `align` 'right' columns line up on the right.
 */
export function formatTable(header: string[], rows: string[][], align: ('left' | 'right')[] = []): string {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => (r[c] ?? '').length)));
  const line = (cells: string[]) =>
    cells
      .map((cell, c) => (align[c] === 'right' ? cell.padStart(widths[c] ?? 0) : cell.padEnd(widths[c] ?? 0)))
      .join('  ')
      .trimEnd();
  return [line(header), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n');
}

/** Formats a number with `digits` significant digits, without trailing noise (1.2e-6, 0.0351, 1200). */
export function formatNumber(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return String(Number(x.toPrecision(digits)));
  return x.toExponential(digits - 1).replace(/\.?0+e/, 'e');
}
