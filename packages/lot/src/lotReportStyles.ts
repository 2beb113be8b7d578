/** Internal: the lot report's inline CSS (system fonts only, print rules). */
export const LOT_REPORT_CSS = `
:root { --ink: #111; --muted: #555; --rule: #ccc; --pass: #1f5fa8; --undecided: #8a5a00; --fail: #a11; }
* { box-sizing: border-box; }
body { margin: 0; color: var(--ink); background: #fff;
  font: 14px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, "Liberation Sans", sans-serif; }
main { max-width: 1100px; margin: 0 auto; padding: 24px 28px 48px; }
header { border-bottom: 2px solid var(--ink); padding-bottom: 10px; margin-bottom: 16px; }
h1 { font-size: 22px; margin: 0 0 4px; }
h2 { font-size: 16px; margin: 26px 0 8px; padding-bottom: 3px; border-bottom: 1px solid var(--rule); }
h3 { font-size: 14px; margin: 16px 0 6px; }
p { margin: 6px 0; }
.sub { color: var(--muted); margin: 0; }
.verdict { display: inline-block; padding: 0 6px; border: 1px solid currentColor; border-radius: 3px; font-weight: 700; font-size: 12px; }
.verdict.pass { color: var(--pass); }
.verdict.fail { color: var(--fail); }
.verdict.undecided { color: var(--undecided); }
.verdict.error { color: #fff; background: var(--fail); border-color: var(--fail); }
.lotstate { font-size: 16px; }
table { border-collapse: collapse; width: 100%; margin: 6px 0 4px; font-size: 12.5px; }
th, td { text-align: left; padding: 3px 7px; border-bottom: 1px solid #e4e4e4; vertical-align: top; }
th { border-bottom: 1.5px solid var(--ink); font-weight: 600; white-space: nowrap; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.k-pass { color: var(--ink); }
td.k-fail { color: var(--fail); font-weight: 700; }
td.k-undecided { color: var(--undecided); font-weight: 700; }
td .ci { display: block; color: var(--muted); font-size: 10.5px; font-weight: 400; }
td.note { color: var(--muted); font-size: 12px; }
.rule { border-left: 3px solid var(--pass); padding: 4px 12px; margin: 8px 0; }
figure { margin: 8px 0 16px; break-inside: avoid; page-break-inside: avoid; }
figure svg { width: 100%; max-width: 860px; height: auto; display: block; }
td.serial { white-space: nowrap; font-weight: 600; }
figcaption { color: var(--muted); font-size: 12px; margin-top: 2px; }
.cautions { border: 1.5px solid var(--ink); padding: 8px 14px; margin-top: 10px; }
.cautions ul { margin: 4px 0; padding-left: 20px; }
code { font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, "Liberation Mono", monospace; font-size: 11.5px; }
footer { margin-top: 30px; color: var(--muted); font-size: 12px; border-top: 1px solid var(--rule); padding-top: 6px; }
@media print {
  @page { size: A4 landscape; margin: 12mm; }
  body { font-size: 10pt; }
  main { max-width: none; padding: 0; }
  h2 { break-after: avoid; page-break-after: avoid; }
  table, figure, .cautions, .rule { break-inside: avoid; page-break-inside: avoid; }
}
`;
