/** The report's inline stylesheet: screen layout plus a print stylesheet; no web fonts, no external resources. */
export const REPORT_CSS = `
:root {
  --ink: #1f2328; --muted: #57606a; --line: #d0d7de; --soft: #f6f8fa;
  --good: #116329; --good-bg: #dafbe1; --bad: #a40e26; --bad-bg: #ffebe9; --warn: #7d4e00; --warn-bg: #fff8c5;
}
* { box-sizing: border-box; }
html { -webkit-text-size-adjust: 100%; }
body {
  margin: 0; color: var(--ink); background: #ffffff; line-height: 1.5; font-size: 15px;
  font-family: system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif;
}
main { max-width: 1040px; margin: 0 auto; padding: 28px 32px 48px; }
header.report-head { border-bottom: 2px solid var(--ink); padding-bottom: 12px; margin-bottom: 20px; }
h1 { font-size: 26px; margin: 0 0 4px; letter-spacing: -0.01em; }
h2 { font-size: 21px; margin: 0; }
h3 { font-size: 15px; margin: 22px 0 8px; text-transform: uppercase; letter-spacing: 0.04em; color: var(--muted); }
p { margin: 6px 0; }
.subtitle { color: var(--muted); margin: 0; }
.caution {
  border-left: 4px solid #9a6700; background: var(--warn-bg); padding: 10px 14px; margin: 0 0 24px;
  border-radius: 0 6px 6px 0; font-size: 14px;
}
.problems { border-left: 4px solid var(--bad); background: var(--bad-bg); padding: 10px 14px; margin: 0 0 24px; border-radius: 0 6px 6px 0; }
.problems ul { margin: 4px 0 0; padding-left: 20px; }
table { border-collapse: collapse; font-size: 13.5px; margin: 4px 0 8px; }
caption { text-align: left; color: var(--muted); font-size: 13px; padding-bottom: 4px; caption-side: top; }
th, td { padding: 5px 10px; border-bottom: 1px solid var(--line); vertical-align: top; }
thead th { border-bottom: 2px solid var(--ink); text-align: right; font-weight: 600; white-space: nowrap; }
thead th.text, td.text { text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tbody tr:nth-child(even) { background: var(--soft); }
table.overview { width: 100%; }
table.overview td.study { font-weight: 600; }
.verdict { white-space: nowrap; font-weight: 600; }
.outcome { display: inline-block; padding: 1px 9px; border-radius: 999px; font-size: 13px; font-weight: 600; white-space: nowrap; border: 1px solid currentColor; }
.outcome.ok { color: var(--good); background: var(--good-bg); }
.outcome.departure { color: var(--bad); background: var(--bad-bg); }
section.study { margin-top: 40px; padding-top: 20px; border-top: 1px solid var(--line); }
.study-head { display: flex; align-items: baseline; gap: 14px; flex-wrap: wrap; }
.facts { color: var(--muted); font-size: 13.5px; margin: 4px 0 12px; }
.facts code, code { font-family: ui-monospace, SFMono-Regular, Menlo, Consolas, 'Liberation Mono', monospace; font-size: 0.92em; }
figure { margin: 12px 0; min-width: 0; }
.plot-row { display: grid; grid-template-columns: minmax(0, 640px) minmax(200px, 1fr); gap: 24px; align-items: start; }
.glance { display: flex; flex-direction: column; gap: 12px; margin-top: 12px; }
.card { border: 1px solid var(--line); border-left: 5px solid var(--good); border-radius: 6px; padding: 10px 14px; }
.card.departure { border-left-color: var(--bad); background: var(--bad-bg); }
.card-norm { font-size: 13px; color: var(--muted); font-weight: 600; }
.card-verdict { font-size: 20px; margin: 2px 0 4px; }
.card-line { font-size: 13.5px; font-variant-numeric: tabular-nums; }
figure svg { max-width: 100%; height: auto; border: 1px solid var(--line); border-radius: 6px; }
figcaption { color: var(--muted); font-size: 13px; margin-top: 4px; }
ul.reasons { margin: 2px 0; padding-left: 18px; }
ul.reasons li.warning { color: var(--warn); }
.warnings { background: var(--warn-bg); border-radius: 6px; padding: 8px 14px; }
.warnings ul { margin: 4px 0; padding-left: 20px; }
.columns { display: grid; grid-template-columns: 2fr 1fr; gap: 24px; }
pre.inputs { background: var(--soft); border: 1px solid var(--line); border-radius: 6px; padding: 10px 12px; font-size: 12px; overflow-x: auto; margin: 0; white-space: pre-wrap; word-break: break-word; }
footer { margin-top: 48px; color: var(--muted); font-size: 12.5px; border-top: 1px solid var(--line); padding-top: 10px; }
a { color: #0550ae; }
@media (max-width: 900px) { main { padding: 16px; } .columns, .plot-row { grid-template-columns: 1fr; } }
@media print {
  @page { margin: 16mm 14mm; }
  body { font-size: 10pt; }
  main { max-width: none; padding: 0; }
  a { color: inherit; text-decoration: none; }
  .caution, .problems, .warnings, .outcome, .card, tbody tr:nth-child(even) { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  section.study { break-before: page; border-top: none; margin-top: 0; }
  figure, table, tr, .warnings, .card { break-inside: avoid; }
  .plot-row { grid-template-columns: minmax(0, 3fr) minmax(0, 1.2fr); gap: 12px; }
  figure svg { border: none; }
  pre.inputs { white-space: pre-wrap; }
}
`;

/** Added to the stylesheet only when the report holds a study with time, so that steady reports stay as they were:
 *  the ladder's sentence, the wide two-panel plot of a two-axis design (its verdict cards in a row below it), and a
 *  joint-fit table, each order in one cell of three lines (fit, expected, verdict). */
export const TIME_CSS = `
.time-design { font-size: 14px; margin: 0 0 12px; }
.plot-row.plot-grid { grid-template-columns: minmax(0, 1fr); }
.plot-row.plot-grid .glance { flex-direction: row; flex-wrap: wrap; margin-top: 0; }
.plot-row.plot-grid figure svg { width: 100%; }
table.joint-fits { width: 100%; }
table.joint-fits td.order { white-space: nowrap; font-variant-numeric: tabular-nums; }
table.joint-fits .order-expected { color: var(--muted); font-size: 12.5px; }
table.joint-fits li.fit-constants { color: var(--muted); list-style: none; margin-left: -18px; font-size: 12.5px; }
@media print {
  .plot-row.plot-grid { grid-template-columns: minmax(0, 1fr); }
}
`;
