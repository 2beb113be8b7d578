import { autocorrelationInto } from '@motorprint/diagnose';
import { tuningRows } from './tuningRows.js';
import { measuredChannel } from '@motorprint/estimate';
import { escapeXml } from './escapeXml.js';
import { formatInterval, intervalDigits } from './formatInterval.js';
import { formatNumber } from './formatNumber.js';
import { operatingCurve } from './operatingCurve.js';
import { REPORT_CSS } from './reportStyles.js';
import { svgLinePlot } from './svgLinePlot.js';
import type { DerivedFigure, HtmlReportInput, ParameterEntry, ParameterSet, PlotOptions } from './types.js';

const h = escapeXml;
/** z_{0.975}, for the whiteness band ±z/√n when no diagnosis is given (common practice). */
const Z975 = 1.959963984540054;
const UNIT: Record<string, string> = { current: 'A', speed: 'rad/s' };

function interval(ci: [number, number] | null): string {
  return formatInterval(ci, { digits: 5 });
}
/** A value with as many digits as its interval's ends need (at least 5). */
function valueText(value: number | null, ci: [number, number] | null): string {
  return formatNumber(value, intervalDigits(ci, 5));
}
function relative(value: number | null, ci: [number, number] | null): string {
  if (value === null || ci === null || value === 0) return '–';
  const r = (100 * (ci[1] - ci[0])) / 2 / Math.abs(value);
  return `±${formatNumber(r, 2)} %`;
}
function figure(plot: PlotOptions, caption: string): string {
  let res;
  try { res = svgLinePlot(plot); } catch (e) { return `<p class="sub">${h(plot.title ?? '')}: not drawn (${h((e as Error).message)})</p>`; }
  const note = res.downsampled ? ' Long series drawn as the minimum and maximum per pixel column; no peak is lost.' : '';
  return `<figure>${res.svg}<figcaption>${h(caption)}${h(note)}</figcaption></figure>`;
}

function constantsTable(set: ParameterSet): string {
  const rows: string[] = [];
  const names: Record<string, string> = {
    R: 'armature resistance', L: 'armature inductance', Kt: 'torque constant', Ke: 'back-EMF constant', J: 'rotor inertia',
    b: 'viscous friction', Tc: 'Coulomb friction torque',
  };
  for (const [k, e] of Object.entries(set.parameters) as [string, ParameterEntry | undefined][]) {
    if (e === undefined) continue;
    rows.push(`<tr${e.identifiable ? '' : ' class="no"'}><td class="sym">${h(k)}</td><td>${h(names[k] ?? '')}</td>` +
      `<td class="num">${valueText(e.value, e.ci95)}</td><td>${h(e.unit)}</td><td class="num">${interval(e.ci95)}</td>` +
      `<td class="num">${relative(e.value, e.ci95)}</td><td>${e.fixed ? 'fixed' : e.identifiable ? 'yes' : 'no'}</td>` +
      `<td class="note">${h(e.note || (e.informedBy.length > 0 ? `from ${e.informedBy.join(', ')}` : ''))}</td></tr>`);
  }
  const r = set.resistanceAtReference;
  rows.push(`<tr${r.value === null ? ' class="no"' : ''}><td class="sym">R<sub>${h(formatNumber(r.referenceTemperature))} °C</sub></td>` +
    `<td>resistance at ${h(formatNumber(r.referenceTemperature))} °C</td><td class="num">${valueText(r.value, r.ci95)}</td><td>Ω</td>` +
    `<td class="num">${interval(r.ci95)}</td><td class="num">${relative(r.value, r.ci95)}</td><td>${r.value === null ? 'not computed' : set.parameters.R.identifiable ? 'yes' : 'no'}</td>` +
    `<td class="note">${h(r.note)}</td></tr>`);
  return `<table><thead><tr><th>symbol</th><th>constant</th><th>value</th><th>unit</th><th>95 % interval</th><th>± half-width</th>` +
    `<th>identified</th><th>note</th></tr></thead><tbody>${rows.join('')}</tbody></table>`;
}

function derivedTable(set: ParameterSet): string {
  const rows = (Object.values(set.derived) as DerivedFigure[]).map((f) =>
    `<tr${f.value === null ? ' class="no"' : ''}><td>${h(f.label)}</td><td class="num">${valueText(f.value, f.ci95)}</td><td>${h(f.unit)}</td>` +
    `<td class="num">${interval(f.ci95)}</td><td><code>${h(f.formula)}</code></td><td class="note">${h(f.note)}</td></tr>`);
  return `<table><thead><tr><th>figure</th><th>value</th><th>unit</th><th>95 % interval</th><th>formula</th><th>note</th></tr></thead>` +
    `<tbody>${rows.join('')}</tbody></table>`;
}

function tuningSection(set: ParameterSet): string {
  if (set.tuning === undefined) return '';
  const t = tuningRows(set.tuning);
  const rows = t.rows.map((g) => `<tr${g.value === null ? ' class="no"' : ''}><td>${h(g.label)}</td><td class="num">${formatNumber(g.value, 5)}</td><td>${h(g.unit)}</td>` +
    `<td class="num">${interval(g.ci95)}</td><td><code>${h(g.formula)}</code></td></tr>`).join('');
  const items = [...set.tuning.assumptions.map((a) => `<li>Assumed: ${h(a)}.</li>`), ...set.tuning.warnings.map((w) => `<li><strong>Warning:</strong> ${h(w)}.</li>`)].join('');
  return `<section><h2>Loop tuning</h2><p>${h(t.settings)}. ${h(set.tuning.method)}.</p>` +
    `<table><thead><tr><th>gain</th><th>value</th><th>unit</th><th>95 % interval</th><th>formula</th></tr></thead><tbody>${rows}</tbody></table><ul>${items}</ul></section>`;
}

function tracesSection(input: HtmlReportInput): string {
  const recs = input.recordings ?? [];
  const out: string[] = [];
  input.fit.recordings.forEach((r, i) => {
    const rec = recs[i];
    out.push(`<h3>${h(r.name)} — ${h(r.kind)}, ${r.samples} samples</h3>`);
    out.push(`<p class="sub">Input: ${h(r.input.method)} — ${h(r.input.reason)}.</p>`);
    if (rec === undefined) { out.push('<p class="sub">Recording not passed to the report: traces not drawn.</p>'); return; }
    for (const c of r.channels) {
      const measured = measuredChannel(rec, c.channel);
      const unit = UNIT[c.channel] ?? '';
      if (measured === undefined || c.residuals === null) {
        out.push(`<p class="sub">${h(c.channel)}: ${c.residuals === null ? 'residuals not kept by the fit' : 'channel missing from the recording'}; not drawn.</p>`);
        continue;
      }
      const res = c.residuals;
      const fitted = new Float64Array(measured.length);
      for (let k = 0; k < fitted.length; k++) fitted[k] = measured[k]! + (k < res.length ? res[k]! : NaN);
      const stats = `σ ${formatNumber(c.sigma)} ${unit}, residual RMS ${formatNumber(c.rms)} ${unit}, NRMSE ${formatNumber(c.nrmse)}`;
      out.push('<div class="grid2">');
      out.push(figure({
        title: `${c.channel}: measured and fitted`, xLabel: 'time [s]', yLabel: `${c.channel} [${unit}]`, width: 460, height: 230,
        series: [{ name: 'measured', x: rec.time, y: measured, style: 'dashed' }, { name: 'fitted', x: rec.time, y: fitted, style: 'accent' }],
      }, `Fitted = measured + residual (model − measured). ${stats}.`));
      out.push(figure({
        title: `${c.channel}: residual (model − measured)`, xLabel: 'time [s]', yLabel: `residual [${unit}]`, width: 460, height: 230,
        series: [{ name: 'residual', x: rec.time, y: res, style: 'solid' }], includeZero: true,
        referenceLines: Number.isFinite(c.sigma) ? [{ y: 2 * c.sigma, label: '+2σ' }, { y: -2 * c.sigma, label: '−2σ' }] : [],
      }, `Dotted lines at ±2σ of the noise level used for weighting.`));
      // Autocorrelation with its whiteness band.
      const diag = input.diagnosis?.residuals?.find((d) => d.recording === r.name && d.channel === c.channel);
      let acf: ArrayLike<number>, band: number, source: string;
      if (diag !== undefined) { acf = diag.stats.autocorrelation; band = diag.stats.whitenessBand; source = 'from the diagnosis'; }
      else {
        let count = 0;
        for (let k = 0; k < res.length; k++) if (Number.isFinite(res[k]!)) count++;
        const finite = new Float64Array(count);
        for (let k = 0, j = 0; k < res.length; k++) if (Number.isFinite(res[k]!)) finite[j++] = res[k]!;
        const lags = Math.max(1, Math.min(50, Math.floor(finite.length / 4)));
        acf = autocorrelationInto(new Float64Array(lags + 1), finite, lags);
        band = Z975 / Math.sqrt(Math.max(finite.length, 1));
        source = 'computed here from the residuals';
      }
      const lagX = Array.from({ length: acf.length - 1 }, (_, k) => k + 1);
      const lagY = Array.from(acf).slice(1);
      let outside = 0;
      for (const v of lagY) if (Math.abs(v) > band) outside++;
      out.push(figure({
        title: `${c.channel}: residual autocorrelation`, xLabel: 'lag [samples]', yLabel: 'autocorrelation r_k [1]', width: 460, height: 210,
        series: [{ name: 'r_k', x: lagX, y: lagY, kind: 'stem', style: 'solid' }],
        referenceLines: [{ y: band, label: `±${formatNumber(band, 2)}` }, { y: -band }],
      }, `Lags 1–${lagX.length}, ${source}. Dotted: approximate 95 % band ±1.96/√n for white residuals; ${outside} of ${lagX.length} lags outside (about 5 % expected when white).`));
      out.push('</div>');
    }
  });
  return out.join('');
}

function curvesSection(set: ParameterSet): string {
  const p = set.parameters;
  const V = set.ratedVoltage.value;
  const vals = { R: p.R.value, L: p.L.value, Kt: p.Kt.value, Ke: p.Ke.value, J: p.J.value, b: p.b.value, Tc: p.Tc?.value ?? 0 };
  if (V === null || [vals.R, vals.Kt, vals.Ke, vals.b, vals.Tc].some((v) => v === null)) {
    return '<p class="sub">Not drawn: the rated voltage or a constant the curves need (R, Kt, Ke, b) is missing.</p>';
  }
  const c = operatingCurve({ R: vals.R!, L: vals.L ?? NaN, Kt: vals.Kt!, Ke: vals.Ke!, J: vals.J ?? NaN, b: vals.b!, Tc: vals.Tc! }, V, 201);
  if (c.speed.length === 0) return '<p class="sub">Not drawn: friction exceeds the stall torque at this voltage.</p>';
  const mNm = c.torque.map((t) => 1000 * t);
  const rpm = c.speed.map((w) => (w * 60) / (2 * Math.PI));
  const eff = c.efficiency.map((e) => 100 * e);
  const pk = set.derived.peakEfficiencyTorque?.value;
  return '<div class="grid2">' +
    figure({
      title: `speed vs load torque at ${formatNumber(V)} V`, xLabel: 'load torque [mN·m]', yLabel: 'speed [r/min]', width: 460, height: 240,
      series: [{ name: 'speed', x: mNm, y: rpm, style: 'solid' }], includeZero: true,
    }, `Steady state with friction (b${p.Tc ? ' and Tc' : ''}) from no load to stall; the speed drops by ${formatNumber(set.derived.speedDropPerLoadTorqueRpm?.value ?? null)} r/min per mN·m of load.`) +
    figure({
      title: `efficiency and output power at ${formatNumber(V)} V`, xLabel: 'load torque [mN·m]', yLabel: 'efficiency [%] · output power [W]', width: 460, height: 240,
      series: [{ name: 'efficiency [%]', x: mNm, y: eff, style: 'accent' }, { name: 'output power [W]', x: mNm, y: c.outputPower, style: 'dashed' }],
      includeZero: true,
    }, `Peak efficiency ${formatNumber(set.derived.peakEfficiency?.value ?? null)} % at ${formatNumber(pk === null || pk === undefined ? null : 1000 * pk)} mN·m; maximum output power ${formatNumber(set.derived.maxOutputPower?.value ?? null)} W. Copper and friction losses only (no iron, brush or drive losses).`) +
    '</div>';
}

function findingsSection(set: ParameterSet, input: HtmlReportInput): string {
  const out: string[] = [];
  if (set.findings.length === 0) out.push('<p>No findings were reported for this fit.</p>');
  for (const f of set.findings) {
    const ev = Object.entries(f.evidence).map(([k, v]) => `<tr><td>${h(k)}</td><td class="num">${h(typeof v === 'number' ? formatNumber(v) : v)}</td></tr>`).join('');
    out.push(`<div class="finding ${h(f.severity)}"><p><span class="sev">${h(f.severity)}</span><strong>${h(f.title)}</strong> <code>${h(f.code)}</code></p>` +
      (ev ? `<table><tbody>${ev}</tbody></table>` : '') + `<p>${h(f.advice)}</p></div>`);
  }
  if (set.notInformed.length > 0) {
    out.push('<h3>Constants these recordings do not inform</h3><ul>');
    for (const u of set.notInformed) out.push(`<li><strong>${h(u.name)}</strong>: ${h(u.reason)}. Would be informed by: ${h(u.wouldInform)}.</li>`);
    out.push('</ul>');
  }
  const cmp = input.diagnosis?.comparisons ?? [];
  if (cmp.length > 0) {
    out.push('<h3>Model comparisons</h3><table><thead><tr><th>question</th><th>recording</th><th>F-test p</th><th>preferred</th></tr></thead><tbody>');
    for (const c of cmp) out.push(`<tr><td>${h(c.question)}</td><td>${h(c.recording ?? 'whole fit')}</td><td class="num">${c.fPValue < 1e-15 ? '&lt; 1e−15' : formatNumber(c.fPValue, 3)}</td><td>${h(c.preferred)}</td></tr>`);
    out.push('</tbody></table>');
  }
  return out.join('');
}

/** The model choice the parameter set carries: its summary and every candidate tried, with why it joined or not. */
function modelChoiceSection(set: ParameterSet): string {
  const m = set.model;
  if (m === undefined) return '';
  const rows = m.candidates.map((c) => {
    const name = c.added === null ? 'lumped linear model' : `+ ${c.added}`;
    const p = c.comparison !== null ? `F-test p ${c.comparison.fPValue === null ? '–' : formatNumber(c.comparison.fPValue, 2)}`
      : c.scoreTest !== undefined ? `score test p ${c.scoreTest.pValue === null ? '–' : formatNumber(c.scoreTest.pValue, 2)} (not fitted)` : '';
    return `<tr><td>${h(name)}</td><td>${c.accepted ? 'yes' : 'no'}</td><td>${h(p)}</td><td>${h(c.reason)}</td></tr>`;
  });
  return `<section><h2>Model choice</h2><p>${h(m.summary)}.</p>` +
    `<table><thead><tr><th>candidate</th><th>in the model</th><th>test</th><th>why</th></tr></thead><tbody>${rows.join('')}</tbody></table></section>`;
}

/** The held-out checks the parameter set carries: each recording predicted with the constants pinned. */
function checksSection(set: ParameterSet): string {
  const checks = set.checks ?? [];
  if (checks.length === 0) return '<p class="sub">No held-out recording was checked: every recording listed above was used in the fit.</p>';
  const rows = checks.flatMap((c) => c.channels.map((x, i) =>
    `<tr>${i === 0 ? `<td rowspan="${c.channels.length}"><code>${h(c.name)}</code></td><td rowspan="${c.channels.length}">${h(c.kind)}</td>` : ''}` +
    `<td>${h(x.channel)}</td><td class="num">${x.samples}</td><td class="num">${formatNumber(x.rms, 3)}</td><td class="num">${formatNumber(x.nrmse, 3)}</td>` +
    `${i === 0 ? `<td rowspan="${c.channels.length}">${c.converged ? 'yes' : '<strong>no</strong>: its own nuisances did not settle'}</td>` : ''}</tr>`));
  return '<p>Recordings left out of the fit and predicted with the fitted constants pinned (only each recording\'s own offsets and start free). ' +
    'NRMSE = RMS of the prediction error / SD of the measurement: 0 is perfect, 1 no better than the mean.</p>' +
    `<table><thead><tr><th>recording</th><th>kind</th><th>channel</th><th>samples</th><th>RMS</th><th>NRMSE</th><th>prediction converged</th></tr></thead><tbody>${rows.join('')}</tbody></table>`;
}

/** What an input file was used for: fitted, held-out check, or (when neither names it) input. */
function inputRole(set: ParameterSet, file: string): string {
  if (set.fit.recordings.some((r) => r.name === file)) return 'fitted';
  if ((set.checks ?? []).some((c) => c.name === file)) return 'held-out check';
  return 'input';
}

/** Residual variance above this (a rule of thumb, no source) gets a plain warning above the constants. */
const VARIANCE_WARNING = 1.5;

function varianceWarning(set: ParameterSet): string {
  const v = set.fit.residualVariance;
  if (v === null || !(v > VARIANCE_WARNING)) return '';
  return `<div class="finding warning"><p><span class="sev">note</span>The residual variance is ${formatNumber(v, 3)}, well above 1: ` +
    'the model or the noise levels leave something out (see Findings). The intervals below assume they do not, so read them as too narrow.</p></div>';
}

const CAUTIONS = `<div class="cautions"><strong>Before repeating these tests</strong><ul>
<li>Locked-rotor tests heat the winding fast: at stall the whole input power is copper loss. Keep each run short, let the winding cool between runs, and watch its temperature.</li>
<li>Rotating shafts, couplings and flywheels need guards; keep loose clothing, hair and cables clear, and secure the motor to the bench.</li>
<li>Bench supplies, drives and their capacitors hold dangerous energy and can feed energy back when a motor is back-driven; switch off and discharge before touching connections.</li>
<li>Follow local electrical codes and your lab's licensed practice; these notes do not replace them.</li>
</ul></div>`;

/**
 * A self-contained HTML report of a motor fit that an engineer can hand on: identification,
 * constants with 95 % intervals, R at the reference temperature, derived figures, measured vs
 * fitted traces for each recording and channel, residuals, residual autocorrelation with its
 * whiteness band, speed–torque and efficiency curves at the rated voltage, the held-out checks
 * (recordings predicted with the constants pinned), findings with
 * evidence and advice, safety cautions, and provenance (the sha256 of every input file). No network: inline CSS (system fonts) and
 * inline SVG drawn by `svgLinePlot`; no scripts. Prints on A4 (`@media print`).
 *
 * @param input - parameter set, fit (residual series), recordings (measured traces), diagnosis, title
 * @returns the HTML document text
 * @throws TypeError when `input.parameterSet` is not a parameter set or `input.fit.recordings` is missing
 * @example
 * const html = renderHtmlReport({ parameterSet: set, fit, recordings: inputs.map((i) => i.recording) });
 * html.startsWith('<!DOCTYPE html>'); // => true
 */
export function renderHtmlReport(input: HtmlReportInput): string {
  const fn = 'renderHtmlReport';
  if (input === null || typeof input !== 'object') throw new TypeError(`${fn}: input must be an object`);
  const set = input.parameterSet;
  if (set === null || typeof set !== 'object' || set.schema !== 'motorprint.parameter-set/1') {
    throw new TypeError(`${fn}: input.parameterSet must be a parameter set with schema "motorprint.parameter-set/1"`);
  }
  if (input.fit === null || typeof input.fit !== 'object' || !Array.isArray(input.fit.recordings)) {
    throw new TypeError(`${fn}: input.fit.recordings must be an array (the fit's per-recording reports)`);
  }
  if (input.recordings !== undefined && !Array.isArray(input.recordings)) throw new TypeError(`${fn}: input.recordings must be an array`);
  const title = input.title ?? 'DC motor parameter report';
  const p = set.provenance;
  const ident = Object.entries(set.identification).map(([k, v]) => `<dt>${h(k)}</dt><dd>${h(v)}</dd>`).join('');
  const status = set.fit.converged
    ? `<span class="status ok">fit converged</span>`
    : `<span class="status bad">fit did NOT converge (${h(set.fit.stopReason)}) — do not use these numbers</span>`;
  const V = set.ratedVoltage;
  const inputs = p.inputs.map((f) => `<tr><td><code>${h(f.file)}</code></td><td>${h(inputRole(set, f.file))}</td><td><code>${h(f.sha256)}</code></td></tr>`).join('');
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${h(title)}</title><style>${REPORT_CSS}</style></head>
<body><main>
<header><h1>${h(title)}</h1>
<p class="sub">${h(set.variant.description)} · ${h(p.tool.name)} ${h(p.tool.version)} · ${h(p.date)} · ${status}</p>
${ident ? `<dl class="ident">${ident}</dl>` : ''}</header>
<section><h2>Constants</h2>
<p>SI units; 95 % intervals (${h(set.intervals.method.split(';')[0] ?? '')}). Residual variance ${formatNumber(set.fit.residualVariance, 3)} (≈ 1 when noise levels and model are right), ${set.fit.rows} residual rows, ${set.intervals.degreesOfFreedom ?? '–'} degrees of freedom.</p>
${varianceWarning(set)}${constantsTable(set)}</section>
<section><h2>Derived figures</h2>
<p>At ${V.value === null ? 'no rated voltage' : `<strong>${formatNumber(V.value)} V</strong>`} (${h(V.source)}). Intervals by the delta method on ln f with a central-difference gradient w.r.t. the fitted parameters, nuisances marginalised (docs/derived-figures.md).</p>
${derivedTable(set)}</section>
${tuningSection(set)}
<section><h2>Operating curves</h2>${curvesSection(set)}</section>
<section><h2>Recordings: measured and fitted</h2>${tracesSection(input)}</section>
<section><h2>Held-out checks</h2>${checksSection(set)}</section>
<section><h2>Findings</h2>${findingsSection(set, input)}</section>
${modelChoiceSection(set)}
<section><h2>Cautions</h2>${CAUTIONS}</section>
<section><h2>Provenance</h2>
<p>${h(p.tool.name)} ${h(p.tool.version)}, fit dated ${h(p.date)} (as stated by the caller).</p>
<p>The SHA-256 of every input file, so that each can be checked to be the one fitted or checked here.</p>
<table><thead><tr><th>input file</th><th>used as</th><th>sha256</th></tr></thead><tbody>${inputs || '<tr><td colspan="3">none listed</td></tr>'}</tbody></table>
<h3>Options used</h3><pre>${h(JSON.stringify(p.options, null, 2))}</pre></section>
<footer>Parameter set schema ${h(set.schema)}. Generated by ${h(p.tool.name)}; the numbers come from the recordings listed above and nothing else.</footer>
</main></body></html>
`;
}
