import { downsampleMinMax } from './downsampleMinMax.js';
import { escapeXml } from './escapeXml.js';
import { formatNumber } from './formatNumber.js';
import { niceTicks } from './niceTicks.js';
import type { PlotOptions, PlotResult, PlotSeries } from './types.js';

const STYLE: Record<NonNullable<PlotSeries['style']>, { stroke: string; dash: string; width: number }> = {
  solid: { stroke: '#111', dash: '', width: 1.3 },
  dashed: { stroke: '#555', dash: '6 3', width: 1.3 },
  accent: { stroke: '#1f5fa8', dash: '', width: 1.6 },
  dotted: { stroke: '#666', dash: '1.5 2.5', width: 1.3 },
};

function tickText(v: number, step: number): string {
  if (v === 0) return '0';
  const a = Math.max(Math.abs(v), step);
  if (a >= 1e5 || step < 1e-3) return formatNumber(v, 3);
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  return v.toFixed(decimals).replace(/^-/, '−');
}

/**
 * Draw series as a self-contained SVG line plot: axes with ticks at nice numbers, tick labels,
 * axis labels with units, a legend, optional horizontal reference lines. Black, grey and one
 * accent colour with dashes to tell series apart, so it reads in print. Series longer than two
 * points per pixel column are reduced to min/max per column (`downsampled` says so; captions
 * should mention it).
 *
 * @param options - series, labels (with units), size, reference lines; see {@link PlotOptions}
 * @returns `{ svg, downsampled }`
 * @throws TypeError for missing series or labels, or x/y of unequal length
 * @throws RangeError when no series has a finite point, or width/height are below 160/120 px
 * @example
 * svgLinePlot({ series: [{ name: 'speed', x: [0, 1, 2], y: [0, 5, 7] }], xLabel: 'time [s]', yLabel: 'speed [rad/s]' }).svg.startsWith('<svg'); // => true
 */
export function svgLinePlot(options: PlotOptions): PlotResult {
  const fn = 'svgLinePlot';
  if (options === null || typeof options !== 'object' || !Array.isArray(options.series) || options.series.length === 0) {
    throw new TypeError(`${fn}: options.series must be a non-empty array`);
  }
  if (typeof options.xLabel !== 'string' || typeof options.yLabel !== 'string') throw new TypeError(`${fn}: options.xLabel and options.yLabel must be strings`);
  const W = options.width ?? 640, H = options.height ?? 240;
  if (!(W >= 160) || !(H >= 120)) throw new RangeError(`${fn}: width and height must be at least 160 × 120 px (got ${W} × ${H})`);
  const title = options.title ?? '';
  const ml = 62, mr = 14, mt = title === '' ? 26 : 40, mb = 40;
  const pw = W - ml - mr, ph = H - mt - mb;
  let downsampled = false;
  const series: readonly PlotSeries[] = options.series;
  const data = series.map((s: PlotSeries, i: number) => {
    if (s.x.length !== s.y.length) throw new TypeError(`${fn}: options.series[${i}] x and y differ in length (${s.x.length} vs ${s.y.length})`);
    const kind = s.kind ?? 'line';
    if (kind === 'line' && s.x.length > 2 * pw) {
      downsampled = true;
      return { s, ...downsampleMinMax(s.x, s.y, pw) };
    }
    return { s, x: Float64Array.from(s.x), y: Float64Array.from(s.y) };
  });
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const d of data) {
    for (let k = 0; k < d.x.length; k++) {
      const xv = d.x[k]!, yv = d.y[k]!;
      if (!Number.isFinite(xv) || !Number.isFinite(yv)) continue;
      if (xv < x0) x0 = xv; if (xv > x1) x1 = xv; if (yv < y0) y0 = yv; if (yv > y1) y1 = yv;
    }
  }
  if (!Number.isFinite(x0)) throw new RangeError(`${fn}: no series has a finite point to draw`);
  for (const r of options.referenceLines ?? []) if (Number.isFinite(r.y)) { y0 = Math.min(y0, r.y); y1 = Math.max(y1, r.y); }
  if (options.includeZero === true || data.some((d) => d.s.kind === 'stem')) { y0 = Math.min(y0, 0); y1 = Math.max(y1, 0); }
  const xt = niceTicks(x0, x1, 6), yt = niceTicks(y0, y1, 5);
  // x spans the data exactly (time axes should end where the record ends); y gets nice ends.
  const xa = x1 > x0 ? x0 : xt.ticks[0]!, xb = x1 > x0 ? x1 : xt.ticks[xt.ticks.length - 1]!;
  const xTicks = xt.ticks.filter((t) => t >= xa - 1e-9 * (xb - xa) && t <= xb + 1e-9 * (xb - xa));
  const ya = yt.ticks[0]!, yb = yt.ticks[yt.ticks.length - 1]!;
  const sx = (v: number): number => ml + ((v - xa) / (xb - xa)) * pw;
  const sy = (v: number): number => mt + ph - ((v - ya) / (yb - ya)) * ph;
  const f2 = (v: number): string => v.toFixed(2);

  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${escapeXml(title || options.yLabel)}" font-family="inherit" font-size="11">`);
  if (title !== '') parts.push(`<text x="${ml}" y="16" font-size="12.5" font-weight="600" fill="#111">${escapeXml(title)}</text>`);
  // Grid and ticks.
  const grid: string[] = [];
  for (const t of xTicks) {
    const X = f2(sx(t));
    grid.push(`M${X} ${f2(mt)}V${f2(mt + ph)}`);
    parts.push(`<text x="${X}" y="${f2(mt + ph + 14)}" text-anchor="middle" fill="#222">${escapeXml(tickText(t, xt.step))}</text>`);
  }
  for (const t of yt.ticks) {
    const Y = f2(sy(t));
    grid.push(`M${f2(ml)} ${Y}H${f2(ml + pw)}`);
    parts.push(`<text x="${ml - 5}" y="${Y}" dy="0.32em" text-anchor="end" fill="#222">${escapeXml(tickText(t, yt.step))}</text>`);
  }
  parts.push(`<path class="grid" d="${grid.join('')}" stroke="#ddd" stroke-width="0.6" fill="none"/>`);
  parts.push(`<path class="axes" d="M${f2(ml)} ${f2(mt)}V${f2(mt + ph)}H${f2(ml + pw)}" stroke="#222" stroke-width="0.9" fill="none"/>`);
  if (ya < 0 && yb > 0) parts.push(`<path class="zero" d="M${f2(ml)} ${f2(sy(0))}H${f2(ml + pw)}" stroke="#999" stroke-width="0.7" fill="none"/>`);
  parts.push(`<text x="${f2(ml + pw / 2)}" y="${H - 6}" text-anchor="middle" fill="#111">${escapeXml(options.xLabel)}</text>`);
  parts.push(`<text transform="translate(13 ${f2(mt + ph / 2)}) rotate(-90)" text-anchor="middle" fill="#111">${escapeXml(options.yLabel)}</text>`);
  for (const r of options.referenceLines ?? []) {
    if (!Number.isFinite(r.y)) continue;
    parts.push(`<path class="reference" d="M${f2(ml)} ${f2(sy(r.y))}H${f2(ml + pw)}" stroke="#666" stroke-width="0.9" stroke-dasharray="2 3" fill="none"/>`);
    if (r.label) parts.push(`<text x="${f2(ml + pw - 3)}" y="${f2(sy(r.y) - 3)}" text-anchor="end" fill="#555" font-size="10">${escapeXml(r.label)}</text>`);
  }
  // Series.
  parts.push(`<g clip-path="none">`);
  for (const d of data) {
    const st = STYLE[d.s.style ?? 'solid'];
    let path = '';
    if (d.s.kind === 'stem') {
      const base = f2(sy(0));
      for (let k = 0; k < d.x.length; k++) {
        if (!Number.isFinite(d.x[k]!) || !Number.isFinite(d.y[k]!)) continue;
        path += `M${f2(sx(d.x[k]!))} ${base}V${f2(sy(d.y[k]!))}`;
      }
    } else {
      let pen = false;
      for (let k = 0; k < d.x.length; k++) {
        const xv = d.x[k]!, yv = d.y[k]!;
        if (!Number.isFinite(xv) || !Number.isFinite(yv)) { pen = false; continue; }
        path += `${pen ? 'L' : 'M'}${f2(sx(xv))} ${f2(sy(yv))}`;
        pen = true;
      }
    }
    if (path === '') continue;
    parts.push(`<path class="series" d="${path}" stroke="${st.stroke}" stroke-width="${d.s.kind === 'stem' ? 1.6 : st.width}"${st.dash ? ` stroke-dasharray="${st.dash}"` : ''} fill="none" stroke-linejoin="round"><title>${escapeXml(d.s.name)}</title></path>`);
  }
  parts.push('</g>');
  // Legend, right-aligned in the top margin.
  let lx = ml + pw;
  const ly = mt - 8;
  for (let i = data.length - 1; i >= 0; i--) {
    const s = data[i]!.s;
    const st = STYLE[s.style ?? 'solid'];
    const tw = 6.4 * s.name.length;
    lx -= tw + 40;
    parts.push(`<path class="legend" d="M${f2(lx)} ${f2(ly)}h22" stroke="${st.stroke}" stroke-width="${st.width + 0.3}"${st.dash ? ` stroke-dasharray="${st.dash}"` : ''} fill="none"/>`);
    parts.push(`<text x="${f2(lx + 26)}" y="${f2(ly)}" dy="0.32em" fill="#111">${escapeXml(s.name)}</text>`);
  }
  parts.push('</svg>');
  return { svg: parts.join(''), downsampled };
}
