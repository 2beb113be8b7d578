import { formatNumber } from './formatNumber.js';
import type { ParameterSet } from './types.js';
import { tuningRows } from './tuningRows.js';

function esc(s: string): string {
  return s.replace(/\|/g, '\\|').replace(/\r?\n/g, ' ');
}
function interval(ci: [number, number] | null): string {
  return ci === null ? '–' : `${formatNumber(ci[0])} … ${formatNumber(ci[1])}`;
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
    out.push(`| ${name} | ${formatNumber(e.value)} | ${e.unit} | ${interval(e.ci95)} | ${e.identifiable ? 'yes' : 'no'} | ${esc(e.note)} |`);
  }
  const r = set.resistanceAtReference;
  out.push('', `R at ${formatNumber(r.referenceTemperature)} °C: ${r.value === null ? '–' : `${formatNumber(r.value)} Ω (95 %: ${interval(r.ci95)})`}. ${esc(r.note)}.`, '');
  out.push('## Derived figures', '');
  out.push(`At ${set.ratedVoltage.value === null ? 'no rated voltage' : `${formatNumber(set.ratedVoltage.value)} V`} (${esc(set.ratedVoltage.source)}). ` +
    `Intervals: ${esc(set.intervals.method)}.`, '');
  out.push('| figure | value | unit | 95 % interval | formula | note |', '|---|---:|---|---|---|---|');
  for (const f of Object.values(set.derived)) {
    out.push(`| ${esc(f.label)} | ${formatNumber(f.value)} | ${f.unit} | ${interval(f.ci95)} | ${esc(f.formula)} | ${esc(f.note)} |`);
  }
  if (set.tuning !== undefined) {
    const t = tuningRows(set.tuning);
    out.push('', '## Loop tuning', '', `${esc(t.settings)}. Method: ${esc(set.tuning.method)}.`, '');
    out.push('| gain | value | unit | 95 % interval | formula |', '|---|---:|---|---|---|');
    for (const g of t.rows) out.push(`| ${g.label} | ${formatNumber(g.value)} | ${g.unit} | ${interval(g.ci95)} | ${esc(g.formula)} |`);
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
  out.push('', '## Fit', '', '| recording | kind | samples | channel | σ | RMS | NRMSE |', '|---|---|---:|---|---:|---:|---:|');
  for (const rec of set.fit.recordings) {
    for (const c of rec.channels) {
      out.push(`| ${esc(rec.name)} | ${rec.kind} | ${rec.samples} | ${c.channel} | ${formatNumber(c.sigma)} | ${formatNumber(c.rms)} | ${formatNumber(c.nrmse)} |`);
    }
  }
  out.push('', `Residual variance (≈ 1 when noise levels and model are right): ${formatNumber(set.fit.residualVariance)}; rows ${set.fit.rows}.`);
  const p = set.provenance;
  out.push('', '## Provenance', '', `${esc(p.tool.name)} ${esc(p.tool.version)}, ${esc(p.date)}.`, '');
  for (const f of p.inputs) out.push(`- \`${esc(f.file)}\` sha256 \`${f.sha256}\``);
  out.push('', `Options: \`${esc(JSON.stringify(p.options))}\``, '');
  return out.join('\n');
}
