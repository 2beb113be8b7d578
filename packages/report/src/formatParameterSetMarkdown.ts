import { formatInterval, intervalDigits } from './formatInterval.js';
import { formatNumber } from './formatNumber.js';
import type { ParameterSet } from './types.js';
import { tuningRows } from './tuningRows.js';

function esc(s: string): string {
  return s.replace(/\|/g, '\\|').replace(/\r?\n/g, ' ');
}
/** The value and its interval, written with the same number of significant digits (ends that differ). */
function valueAndInterval(value: number | null, ci: [number, number] | null): [string, string] {
  const d = intervalDigits(ci);
  return [formatNumber(value, d), formatInterval(ci, { digits: d })];
}

/**
 * The parameter set as a Markdown page: identification, constants with 95 % intervals, R at the
 * reference temperature, derived figures, loop tuning (when present), findings, constants not informed, fit summary and
 * provenance. Numbers to 4 significant digits (the JSON and CSV keep full precision).
 *
 * @param set - the parameter set
 * @returns Markdown text
 * @throws TypeError when `set` is not a parameter set
 * @example
 * formatParameterSetMarkdown(set).split('\n')[0]; // => '# DC motor parameters'
 */
export function formatParameterSetMarkdown(set: ParameterSet): string {
  if (set === null || typeof set !== 'object' || set.schema !== 'motorprint.parameter-set/1') {
    throw new TypeError('formatParameterSetMarkdown: set must be a parameter set with schema "motorprint.parameter-set/1"');
  }
  const out: string[] = ['# DC motor parameters', ''];
  const ident = Object.entries(set.identification);
  if (ident.length > 0) {
    out.push('| field | value |', '|---|---|');
    for (const [k, v] of ident) out.push(`| ${esc(k)} | ${esc(v)} |`);
    out.push('');
  }
  out.push(`Model: ${esc(set.variant.description)}. Fit ${set.fit.converged ? 'converged' : `did NOT converge (${set.fit.stopReason}) — do not use these numbers`}.`, '');
  out.push('## Constants', '', '| constant | value | unit | 95 % interval | identifiable | note |', '|---|---:|---|---|---|---|');
  for (const [name, e] of Object.entries(set.parameters)) {
    if (e === undefined) continue;
    const [v, ci] = valueAndInterval(e.value, e.ci95);
    out.push(`| ${name} | ${v} | ${e.unit} | ${ci} | ${e.identifiable ? 'yes' : 'no'} | ${esc(e.note)} |`);
  }
  const r = set.resistanceAtReference;
  const [rv, rci] = valueAndInterval(r.value, r.ci95);
  out.push('', r.value === null
    ? `R at ${formatNumber(r.referenceTemperature)} °C: ${esc(r.note)}.`
    : `R at ${formatNumber(r.referenceTemperature)} °C: ${rv} Ω (95 %: ${rci}). ${esc(r.note)}.`, '');
  out.push('## Derived figures', '');
  out.push(`At ${set.ratedVoltage.value === null ? 'no rated voltage' : `${formatNumber(set.ratedVoltage.value)} V`} (${esc(set.ratedVoltage.source)}). ` +
    `Intervals: ${esc(set.intervals.method)}.`, '');
  out.push('| figure | value | unit | 95 % interval | formula | note |', '|---|---:|---|---|---|---|');
  for (const f of Object.values(set.derived)) {
    const [v, ci] = valueAndInterval(f.value, f.ci95);
    out.push(`| ${esc(f.label)} | ${v} | ${f.unit} | ${ci} | ${esc(f.formula)} | ${esc(f.note)} |`);
  }
  if (set.tuning !== undefined) {
    const t = tuningRows(set.tuning);
    out.push('', '## Loop tuning', '', `${esc(t.settings)}. Method: ${esc(set.tuning.method)}.`, '');
    out.push('| gain | value | unit | 95 % interval | formula |', '|---|---:|---|---|---|');
    for (const g of t.rows) {
      const [v, ci] = valueAndInterval(g.value, g.ci95);
      out.push(`| ${g.label} | ${v} | ${g.unit} | ${ci} | ${esc(g.formula)} |`);
    }
    out.push('', ...set.tuning.assumptions.map((a) => `- Assumed: ${esc(a)}.`));
    for (const w of set.tuning.warnings) out.push(`- **warning**: ${esc(w)}.`);
  }
  out.push('', '## Findings', '');
  if (set.findings.length === 0) out.push('None reported.');
  for (const f of set.findings) {
    const ev = Object.entries(f.evidence).map(([k, v]) => `${k} = ${typeof v === 'number' ? formatNumber(v) : v}`).join(', ');
    out.push(`- **${f.severity}** — ${esc(f.title)} (\`${f.code}\`). Evidence: ${esc(ev || 'none given')}. ${esc(f.advice)}`);
  }
  if (set.notInformed.length > 0) {
    out.push('', '## Not informed by these recordings', '');
    for (const u of set.notInformed) out.push(`- ${u.name}: ${esc(u.reason)}; ${esc(u.wouldInform)} would inform it.`);
  }
  out.push('', '## Fit', '', '| recording | kind | samples | channel | σ | RMS | NRMSE | Ljung–Box p (whiteness) |', '|---|---|---:|---|---:|---:|---:|---:|');
  for (const rec of set.fit.recordings) {
    for (const c of rec.channels) {
      const w = c.whiteness;
      const white = w === undefined || w === null || w.pValue === null ? '—' : `${formatNumber(w.pValue, 2)} (${w.lags} lags)`;
      out.push(`| ${esc(rec.name)} | ${rec.kind} | ${rec.samples} | ${c.channel} | ${formatNumber(c.sigma)} | ${formatNumber(c.rms)} | ${formatNumber(c.nrmse)} | ${white} |`);
    }
  }
  out.push('', `Residual variance (≈ 1 when noise levels and model are right): ${formatNumber(set.fit.residualVariance)}; rows ${set.fit.rows}.`);
  const p = set.provenance;
  out.push('', '## Provenance', '', `${esc(p.tool.name)} ${esc(p.tool.version)}, ${esc(p.date)}.`, '');
  for (const f of p.inputs) out.push(`- \`${esc(f.file)}\` sha256 \`${f.sha256}\``);
  out.push('', `Options: \`${esc(JSON.stringify(p.options))}\``, '');
  return out.join('\n');
}
