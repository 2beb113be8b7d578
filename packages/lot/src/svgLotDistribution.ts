import { escapeXml as h, formatNumber, niceTicks } from '@motorprint/report';
import type { MotorJudgement, SpecLimit } from './types.js';

const INK = '#111';
const MUTED = '#555';
const COLOUR = { pass: '#1f5fa8', fail: '#a11', undecided: '#8a5a00' } as const;

function marker(kind: 'pass' | 'fail' | 'undecided', x: number, y: number): string {
  const c = COLOUR[kind];
  if (kind === 'pass') return `<circle class="mark pass" cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" r="4" fill="${c}"/>`;
  if (kind === 'fail') {
    const d = 4;
    return `<path class="mark fail" d="M${(x - d).toFixed(1)} ${(y - d).toFixed(1)}L${(x + d).toFixed(1)} ${(y + d).toFixed(1)}M${(x - d).toFixed(1)} ${(y + d).toFixed(1)}L${(x + d).toFixed(1)} ${(y - d).toFixed(1)}" stroke="${c}" stroke-width="2.2"/>`;
  }
  const d = 5;
  return `<path class="mark undecided" d="M${x.toFixed(1)} ${(y - d).toFixed(1)}L${(x + d).toFixed(1)} ${y.toFixed(1)}L${x.toFixed(1)} ${(y + d).toFixed(1)}L${(x - d).toFixed(1)} ${y.toFixed(1)}Z" fill="#fff" stroke="${c}" stroke-width="2"/>`;
}

/**
 * Draws the distribution of one checked key over a lot as a self-contained SVG: one row per motor
 * with its estimate (marker by verdict: filled circle pass, cross fail, open diamond undecided) and
 * its 95 % interval as a bar, the tolerance zone shaded between the specification limits, the
 * limits as solid lines and the nominal as a dashed line. Shapes as well as colours tell the
 * verdicts apart, so the plot reads in black-and-white print.
 *
 * @param limit - the spec limit
 * @param motors - judged motors; those without a value of the key are left out (the caption should say so)
 * @param width - width [px] @default 860
 * @returns the `<svg>` text, or null when no motor has a value
 * @example
 * svgLotDistribution(limitR, judgement.motors)?.startsWith('<svg'); // => true
 */
export function svgLotDistribution(limit: SpecLimit, motors: readonly MotorJudgement[], width = 860): string | null {
  const rows = motors.flatMap((m) => {
    const k = m.keys.find((x) => x.key === limit.key);
    return k !== undefined && k.value !== null && Number.isFinite(k.value) ? [{ serial: m.serial, k, value: k.value }] : [];
  });
  if (rows.length === 0) return null;
  let lo = Infinity, hi = -Infinity;
  const take = (x: number | null | undefined) => { if (x !== null && x !== undefined && Number.isFinite(x)) { lo = Math.min(lo, x); hi = Math.max(hi, x); } };
  for (const r of rows) { take(r.value); take(r.k.ci95?.[0]); take(r.k.ci95?.[1]); }
  take(limit.lower); take(limit.upper); take(limit.nominal);
  const pad = (hi - lo) * 0.06 || Math.abs(hi) * 0.05 || 1;
  const ticks = niceTicks(lo - pad, hi + pad, 6);
  const x0 = Math.min(lo - pad, ticks.ticks[0] ?? lo - pad);
  const x1 = Math.max(hi + pad, ticks.ticks[ticks.ticks.length - 1] ?? hi + pad);
  const labelWidth = 86, mr = 30, mt = 44, rowH = 16, axisH = 66;
  const pw = width - labelWidth - mr;
  const height = mt + rows.length * rowH + axisH;
  const X = (v: number) => labelWidth + ((v - x0) / (x1 - x0)) * pw;
  const top = mt - 4, bottom = mt + rows.length * rowH + 2;
  const parts: string[] = [];
  parts.push(`<svg class="lot-distribution" xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" aria-label="${h(`${limit.key}: values of the lot with the specification limits`)}">`);
  parts.push(`<text x="${labelWidth}" y="16" font-size="12" font-weight="600" fill="${INK}">${h(`${limit.key} [${limit.unit}] — ${limit.label}`)}</text>`);
  // Tolerance zone and limits.
  const zl = limit.lower ?? x0, zh = limit.upper ?? x1;
  parts.push(`<rect class="zone" x="${X(zl).toFixed(1)}" y="${top}" width="${Math.max(0, X(zh) - X(zl)).toFixed(1)}" height="${bottom - top}" fill="#eef3f9"/>`);
  for (const [v, name] of [[limit.lower, 'LSL'], [limit.upper, 'USL']] as const) {
    if (v === null) continue;
    parts.push(`<line class="limit" x1="${X(v).toFixed(1)}" x2="${X(v).toFixed(1)}" y1="${top}" y2="${bottom}" stroke="${INK}" stroke-width="1.5"/>`);
    parts.push(`<text x="${X(v).toFixed(1)}" y="${top - 4}" font-size="10" text-anchor="middle" fill="${INK}">${name} ${h(formatNumber(v, 5))}</text>`);
  }
  if (limit.nominal !== null) {
    parts.push(`<line class="nominal" x1="${X(limit.nominal).toFixed(1)}" x2="${X(limit.nominal).toFixed(1)}" y1="${top}" y2="${bottom}" stroke="${MUTED}" stroke-dasharray="5 3"/>`);
  }
  // Rows.
  rows.forEach((r, i) => {
    const y = mt + i * rowH + rowH / 2;
    parts.push(`<text x="${labelWidth - 6}" y="${(y + 3.5).toFixed(1)}" font-size="10.5" text-anchor="end" fill="${INK}">${h(r.serial)}</text>`);
    parts.push(`<line x1="${labelWidth}" x2="${labelWidth + pw}" y1="${y}" y2="${y}" stroke="#e4e4e4" stroke-width="0.6"/>`);
    if (r.k.ci95 !== null) {
      parts.push(`<line class="interval" x1="${X(r.k.ci95[0]).toFixed(1)}" x2="${X(r.k.ci95[1]).toFixed(1)}" y1="${y}" y2="${y}" stroke="${COLOUR[r.k.verdict]}" stroke-width="2"/>`);
    }
    parts.push(marker(r.k.verdict, X(r.value), y));
  });
  // Axis.
  const ay = bottom + 4;
  parts.push(`<line x1="${labelWidth}" x2="${labelWidth + pw}" y1="${ay}" y2="${ay}" stroke="${INK}"/>`);
  for (const t of ticks.ticks) {
    if (t < x0 || t > x1) continue;
    parts.push(`<line x1="${X(t).toFixed(1)}" x2="${X(t).toFixed(1)}" y1="${ay}" y2="${ay + 4}" stroke="${INK}"/>`);
    parts.push(`<text x="${X(t).toFixed(1)}" y="${ay + 15}" font-size="10" text-anchor="middle" fill="${INK}">${h(formatNumber(t, 5))}</text>`);
  }
  // Legend.
  const ly = height - 22;
  let lx = labelWidth;
  for (const kind of ['pass', 'fail', 'undecided'] as const) {
    parts.push(marker(kind, lx + 5, ly - 4));
    parts.push(`<text x="${lx + 14}" y="${ly}" font-size="10" fill="${INK}">${kind}</text>`);
    lx += 78;
  }
  parts.push(`<text x="${labelWidth}" y="${ly + 15}" font-size="10" fill="${MUTED}">bar: 95 % interval · shaded: between the limits${limit.nominal !== null ? ' · dashed: nominal' : ''}</text>`);
  parts.push('</svg>');
  return parts.join('');
}
