/** Internal: the report's inline CSS (system fonts only, print rules). */
export const REPORT_CSS = `
:root { --ink: #111; --muted: #555; --rule: #ccc; --accent: #1f5fa8; --warn: #8a5a00; --bad: #a11; }
* { box-sizing: border-box; }
body { margin: 0; color: var(--ink); background: #fff;
  font: 14px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, "Liberation Sans", sans-serif; }
main { max-width: 980px; margin: 0 auto; padding: 24px 28px 48px; }
header { border-bottom: 2px solid var(--ink); padding-bottom: 10px; margin-bottom: 16px; }
h1 { font-size: 22px; margin: 0 0 4px; letter-spacing: 0.01em; }
h2 { font-size: 16px; margin: 26px 0 8px; padding-bottom: 3px; border-bottom: 1px solid var(--rule); }
h3 { font-size: 14px; margin: 16px 0 6px; }
p { margin: 6px 0; }
.sub { color: var(--muted); margin: 0; }
dl.ident { display: grid; grid-template-columns: max-content 1fr max-content 1fr; gap: 2px 14px; margin: 10px 0 0; }
dl.ident dt { color: var(--muted); }
dl.ident dd { margin: 0; font-weight: 600; }
.status { display: inline-block; padding: 1px 8px; border: 1px solid currentColor; border-radius: 3px; font-weight: 600; font-size: 12px; }
.status.ok { color: var(--accent); }
.status.bad { color: var(--bad); }
table { border-collapse: collapse; width: 100%; margin: 6px 0 4px; font-size: 13px; }
th, td { text-align: left; padding: 3px 8px; border-bottom: 1px solid #e4e4e4; vertical-align: top; }
th { border-bottom: 1.5px solid var(--ink); font-weight: 600; white-space: nowrap; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.sym { font-weight: 600; white-space: nowrap; }
td.note { color: var(--muted); font-size: 12px; }
tr.no td { color: var(--muted); }
.grid2 { display: grid; grid-template-columns: 1fr 1fr; gap: 8px 18px; }
figure { margin: 8px 0 14px; break-inside: avoid; page-break-inside: avoid; }
figure svg { width: 100%; height: auto; display: block; }
figcaption { color: var(--muted); font-size: 12px; margin-top: 2px; }
.finding { border-left: 3px solid var(--rule); padding: 4px 10px; margin: 8px 0; break-inside: avoid; }
.finding.warning { border-left-color: var(--warn); }
.finding.problem { border-left-color: var(--bad); }
.finding .sev { text-transform: uppercase; font-size: 11px; font-weight: 700; letter-spacing: 0.05em; margin-right: 6px; }
.finding.problem .sev { color: var(--bad); }
.finding.warning .sev { color: var(--warn); }
.finding table { width: auto; }
.cautions { border: 1.5px solid var(--ink); padding: 8px 14px; margin-top: 10px; }
.cautions ul { margin: 4px 0; padding-left: 20px; }
code, pre { font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, "Liberation Mono", monospace; font-size: 12px; }
pre { background: #f6f6f6; border: 1px solid #e4e4e4; padding: 8px; white-space: pre-wrap; word-break: break-all; }
footer { margin-top: 30px; color: var(--muted); font-size: 12px; border-top: 1px solid var(--rule); padding-top: 6px; }
@media (max-width: 720px) { .grid2 { grid-template-columns: 1fr; } dl.ident { grid-template-columns: max-content 1fr; } }
@media print {
  @page { size: A4; margin: 14mm 12mm; }
  body { font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  h2 { break-after: avoid; page-break-after: avoid; }
  table, figure, .finding, .cautions { break-inside: avoid; page-break-inside: avoid; }
  a { color: inherit; text-decoration: none; }
  .grid2 { grid-template-columns: 1fr 1fr; }
}
`;
