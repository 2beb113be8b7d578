import { escapeXml as h, formatInterval, formatNumber } from '@motorprint/report';
import { OUTLIER_THRESHOLD } from './keyStatistics.js';
import { LOT_REPORT_CSS } from './lotReportStyles.js';
import { svgLotDistribution } from './svgLotDistribution.js';
import type { DecisionRule, KeyStatistics, LotJudgement, LotSpec, SpecLimit } from './types.js';

/** Input of {@link renderLotReport}. */
export interface LotReportInput {
  /** Page title. @default `Incoming inspection — <spec name>` */
  title?: string;
  /** The lot folder as given. */
  lotFolder: string;
  /** The resolved spec. */
  spec: LotSpec;
  /** Spec file name as given. */
  specFile: string;
  /** The decision rule. */
  rule: DecisionRule;
  /** The judged lot. */
  judgement: LotJudgement;
  /** Tool name and version. */
  tool: { name: string; version: string };
  /** Date of the run (ISO 8601, as the caller states it; the library reads no clock). */
  date: string;
  /** Bench cautions to print, one item each (the caller's usual list). */
  cautions: readonly string[];
}

function limitText(l: SpecLimit): string {
  if (l.nominal !== null && l.tolerancePercent !== null) {
    return `${formatNumber(l.nominal, 6)} ± ${formatNumber(l.tolerancePercent, 4)} % (${formatInterval([l.lower!, l.upper!], { digits: 6 })})`;
  }
  if (l.lower !== null && l.upper !== null) return formatInterval([l.lower, l.upper], { digits: 6 });
  return l.lower !== null ? `≥ ${formatNumber(l.lower, 6)}` : `≤ ${formatNumber(l.upper, 6)}`;
}

function statsRow(s: KeyStatistics, l: SpecLimit): string {
  const out = s.outliers.map((o) => `${o.serial} (z ${formatNumber(o.robustZ, 3)})`).join(', ');
  return `<tr><td><strong>${h(s.key)}</strong></td><td>${h(s.unit)}</td><td class="num">${h(limitText(l))}</td><td class="num">${s.n}</td>` +
    `<td class="num">${formatNumber(s.mean, 5)}</td><td class="num">${formatNumber(s.sd, 3)}</td><td class="num">${formatNumber(s.min, 5)}</td>` +
    `<td class="num">${formatNumber(s.max, 5)}</td><td class="num">${formatNumber(s.cp, 3)}</td><td class="num">${formatNumber(s.cpk, 3)}</td>` +
    `<td>${h(out || 'none')}</td><td class="note">${h(s.notes.join('; '))}</td></tr>`;
}

/**
 * A self-contained HTML page of a lot run that an engineer can file or print: the lot's state and
 * counts, the decision rule with its guard band, the verdict table (each checked key's estimate and
 * 95 % interval, marked by verdict), one distribution plot per checked key with the limits drawn,
 * the capability table (n, mean, SD, min, max, Cp, Cpk, outliers) with the definitions and their
 * sources, motors that could not be fitted, ignored files and findings, the cautions, and the
 * inputs with their SHA-256. No scripts, no external resources.
 *
 * @param input - see {@link LotReportInput}
 * @returns the HTML document
 * @throws TypeError when the judgement or spec is missing
 * @example
 * renderLotReport({ lotFolder: 'lot', spec, specFile: 'spec.json', rule: decisionRule(), judgement, tool, date, cautions: [] }).startsWith('<!DOCTYPE html>'); // => true
 */
export function renderLotReport(input: LotReportInput): string {
  const fn = 'renderLotReport';
  if (input === null || typeof input !== 'object') throw new TypeError(`${fn}: input must be an object`);
  if (input.judgement === null || typeof input.judgement !== 'object' || !Array.isArray(input.judgement.motors)) {
    throw new TypeError(`${fn}: input.judgement must be the result of judgeLot`);
  }
  if (input.spec === null || typeof input.spec !== 'object' || !Array.isArray(input.spec.limits)) throw new TypeError(`${fn}: input.spec must be a resolved spec`);
  const { spec, judgement: j, rule } = input;
  const title = input.title ?? `Incoming inspection — ${spec.name}`;
  const c = j.counts;
  const lotClass = j.verdict === 'pass' ? 'pass' : 'fail';

  const head = spec.limits.map((l) => `<th>${h(l.key)} [${h(l.unit)}]</th>`).join('');
  const rows = j.motors.map((m) => {
    const cells = spec.limits.map((l) => {
      const k = m.keys.find((x) => x.key === l.key);
      if (k === undefined) return '<td class="num">–</td>';
      const ci = formatInterval(k.ci95, { digits: 6, missing: 'no interval' });
      return `<td class="num k-${k.verdict}" title="${h(k.reason)}">${formatNumber(k.value, 6)}${k.verdict === 'pass' ? '' : ` ${k.verdict}`}<span class="ci">${h(ci)}</span></td>`;
    }).join('');
    return `<tr><td class="serial">${h(m.serial)}</td><td><span class="verdict ${m.verdict}">${m.verdict}</span></td>${cells}<td class="note">${m.verdict === 'pass' ? '' : h(m.reason)}</td></tr>`;
  }).join('');

  const plots = spec.limits.map((l) => {
    const svg = svgLotDistribution(l, j.motors);
    const missing = j.motors.filter((m) => m.keys.find((k) => k.key === l.key)?.value == null).map((m) => m.serial);
    const caption = `${l.key}: limits ${limitText(l)} ${l.unit}.` + (missing.length > 0 ? ` Not drawn (no value): ${missing.join(', ')}.` : '') +
      ' An interval narrower than its marker is hidden behind it.';
    return svg === null ? `<p class="sub">${h(l.key)}: no motor has a value; nothing to draw.</p>` : `<figure>${svg}<figcaption>${h(caption)}</figcaption></figure>`;
  }).join('');

  const stats = j.statistics.map((s) => statsRow(s, spec.limits.find((l) => l.key === s.key)!)).join('');
  const errors = j.motors.filter((m) => m.verdict === 'error');
  const remarks = j.motors.flatMap((m) => [
    ...m.outcome.ignoredFiles.map((x) => `<li><strong>${h(m.serial)}</strong>: not fitted ${h(x.file)} (${h(x.reason)})</li>`),
    ...(m.outcome.findings.length > 0 ? [`<li><strong>${h(m.serial)}</strong>: findings of the fit — ${h(m.outcome.findings.join(', '))}</li>`] : []),
  ]);
  const inputs = j.motors.flatMap((m) => m.outcome.inputs.map((f) =>
    `<tr><td>${h(m.serial)}</td><td><code>${h(f.file)}</code></td><td>${h(f.kind)} (${f.kindSource})</td><td class="num">${f.rows}</td><td><code>${h(f.sha256)}</code></td></tr>`)).join('');

  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${h(title)}</title><style>${LOT_REPORT_CSS}</style></head>
<body><main>
<header><h1>${h(title)}</h1>
<p class="sub">Lot folder <code>${h(input.lotFolder)}</code> · spec “${h(spec.name)}” (<code>${h(input.specFile)}</code>)${spec.description ? ` — ${h(spec.description)}` : ''} · ${h(input.tool.name)} ${h(input.tool.version)} · ${h(input.date)}</p>
<p class="lotstate">Lot: <span class="verdict ${lotClass}">${j.verdict === 'pass' ? 'every motor passes' : 'not accepted'}</span>
 — ${j.motors.length} motors: ${c.pass} pass, ${c.fail} fail, ${c.undecided} undecided, ${c.error} error</p></header>
<section><h2>Decision rule</h2>
<div class="rule"><p>${h(rule.text)}</p><p><strong>Guard band:</strong> ${h(rule.guardBand)}</p>
<p class="sub">Following ${h(rule.references.join('; '))}.${spec.ratedVoltage !== null ? ` Derived figures are stated at ${h(formatNumber(spec.ratedVoltage))} V (the spec's rated voltage).` : ''}</p></div></section>
<section><h2>Verdicts</h2>
<p>Each cell: the estimate, then its 95 % interval; a key that does not pass is marked. Hover a cell for the reason.</p>
<table class="verdicts"><thead><tr><th>serial</th><th>verdict</th>${head}<th>reason</th></tr></thead><tbody>${rows}</tbody></table>
${c.undecided > 0 ? '<p class="sub">Undecided: the 95 % interval straddles a limit. A motor whose true value lies on the limit comes out undecided whenever its interval covers that value (about 95 % of repeats); longer or repeated runs narrow the interval.</p>' : ''}</section>
<section><h2>Distribution of each checked key</h2>${plots}</section>
<section><h2>Lot statistics and capability</h2>
<table class="capability"><thead><tr><th>key</th><th>unit</th><th>limits</th><th>n</th><th>mean</th><th>SD</th><th>min</th><th>max</th><th>Cp</th><th>Cpk</th><th>outliers (robust z)</th><th>note</th></tr></thead>
<tbody>${stats}</tbody></table>
<p class="sub">Over the fitted motors that have a value. SD with n − 1. Cp = (USL − LSL)/(6·SD); Cpk = min(USL − mean, mean − LSL)/(3·SD), the side given for a one-sided limit
(NIST/SEMATECH e-Handbook of Statistical Methods §6.1.6, ISO 22514-2; from memory). With one lot and no subgroups SD is the overall spread, so these are what ISO 22514-2 calls performance indices (Pp, Ppk).
Outliers: robust z = 0.6745·(x − median)/MAD with |z| &gt; ${OUTLIER_THRESHOLD} (Iglewicz and Hoaglin 1993, from memory).</p></section>
${errors.length > 0 ? `<section><h2>Motors that could not be fitted</h2><table><thead><tr><th>serial</th><th>reason</th></tr></thead><tbody>${errors.map((m) => `<tr><td><strong>${h(m.serial)}</strong></td><td>${h(m.reason)}</td></tr>`).join('')}</tbody></table></section>` : ''}
${remarks.length > 0 ? `<section><h2>Remarks</h2><ul>${remarks.join('')}</ul></section>` : ''}
<section><h2>Cautions</h2><div class="cautions"><strong>Before putting motors on the bench</strong><ul>${input.cautions.map((t) => `<li>${h(t)}</li>`).join('')}</ul></div></section>
<section><h2>Inputs</h2><table><thead><tr><th>serial</th><th>file</th><th>kind</th><th>rows</th><th>sha256</th></tr></thead><tbody>${inputs || '<tr><td colspan="5">none read</td></tr>'}</tbody></table></section>
<footer>Generated by ${h(input.tool.name)} ${h(input.tool.version)}; every number comes from the recordings listed above. Verdicts are only as good as the recordings and the model behind the intervals.</footer>
</main></body></html>
`;
}
