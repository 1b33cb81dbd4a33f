import type { StudyResult } from '../study/result.ts';
import { compactJson } from './compact-json.ts';
import type { InputProblem } from './input-problem.ts';
import { REPORT_CSS } from './html-style.ts';
import { fixed, intervalText, levelNumber, levelRangeText, orderText, sci, stderrText } from './numbers.ts';
import { fileStem, normNames, rateAt } from './series.ts';
import { svgPlot, type PlotOptions } from './svg.ts';
import { normOutcomes, studyTally, verdictLabel, type NormOutcome } from './verdict.ts';
import { escapeXml as esc } from './xml.ts';
import { QUANTITY_CAUTION, quantityStatements, quantityTables } from './quantity-tables.ts';

export type { InputProblem };

export interface HtmlMeta {
  /** Page title (default "Convergence report"). */
  title?: string;
  /** When the report was made (ISO 8601); omitted from the page when absent. */
  generatedAt?: string;
  /** The command line that produced the run, shown in the header. */
  command?: string;
  inputProblems?: readonly InputProblem[];
  plot?: PlotOptions;
  /** The run was stopped before its end (a signal): the page opens with this text in a banner. */
  interrupted?: string;
}

const CAUTION =
  'Verifying a code shows that it solves its equations at the expected order of accuracy; it does not validate a ' +
  'model, which means showing that those equations describe the physical system. These results say nothing about ' +
  'whether a tile, or anything else, is fit for service: engineering decisions follow local codes and licensed practice.';

const anchor = (study: string) => `study-${fileStem(study)}`;

function verdictSpan(o: NormOutcome): string {
  return `<span class="verdict verdict-${o.analysis.verdict}">${esc(verdictLabel(o.analysis.verdict))}</span>`;
}

function outcomeBadge(ok: boolean, what = ok ? 'as expected' : 'not as expected'): string {
  return `<span class="outcome ${ok ? 'ok' : 'departure'}">${ok ? '✓' : '✗'} ${esc(what)}</span>`;
}

function fittedText(o: NormOutcome): string {
  const fit = o.analysis.fit;
  return fit ? `${fixed(fit.order)} ${intervalText(fit.ciLow, fit.ciHigh)}` : 'no fit';
}

function overview(results: readonly StudyResult[]): string {
  const rows = results.flatMap((r) => {
    const outcomes = normOutcomes(r);
    if (outcomes.length === 0) {
      return [`<tr><td class="text study"><a href="#${anchor(r.study)}">${esc(r.study)}</a></td><td class="text" colspan="5">no analysed norm</td><td class="text">${outcomeBadge(r.asExpected)}</td></tr>`];
    }
    return outcomes.map((o, k) => {
      const studyCell = k === 0 ? `<td class="text study" rowspan="${outcomes.length}"><a href="#${anchor(r.study)}">${esc(r.study)}</a></td>` : '';
      return (
        `<tr>${studyCell}<td class="text">${esc(o.norm)}</td>` +
        `<td class="num">${esc(orderText(o.analysis.expected))}</td><td class="num">${esc(fittedText(o))}</td>` +
        `<td class="text">${esc(o.expectedVerdict)}</td><td class="text">${verdictSpan(o)}</td>` +
        `<td class="text">${outcomeBadge(o.asExpected, o.asExpected ? 'as expected' : 'departure')}</td></tr>`
      );
    });
  });
  return [
    '<table class="overview">',
    '<caption>Fitted order with its 95% confidence interval against the expected order, per study and norm.</caption>',
    '<thead><tr><th class="text">study</th><th class="text">norm</th><th>expected order</th><th>fitted order [95% CI]</th><th class="text">expected verdict</th><th class="text">observed verdict</th><th class="text">outcome</th></tr></thead>',
    `<tbody>${rows.join('\n')}</tbody>`,
    '</table>',
  ].join('\n');
}

function levelTable(r: StudyResult): string {
  const norms = normNames(r);
  const head = ['level', 'h', 'dofs', 'cells', ...norms.flatMap((n) => [`${n} error`, `${n} rate`]), 'solver its', 'time (s)'];
  const rows = r.levels.map((l, i) => {
    const cells = [
      String(levelNumber(l.index)),
      sci(l.h),
      String(l.dofs),
      String(l.cells),
      ...norms.flatMap((n) => [sci(l.errors[n]), fixed(rateAt(r, n, i))]),
      l.solver ? String(l.solver.iterations) : '—',
      l.seconds.total === undefined ? '—' : fixed(l.seconds.total, 3),
    ];
    return `<tr>${cells.map((c) => `<td class="num">${esc(c)}</td>`).join('')}</tr>`;
  });
  return [
    '<table class="levels">',
    '<caption>Errors per level; the rate is the observed order between a level and the one before it.</caption>',
    `<thead><tr>${head.map((h) => `<th>${esc(h)}</th>`).join('')}</tr></thead>`,
    `<tbody>${rows.join('\n')}</tbody>`,
    '</table>',
  ].join('\n');
}

function fitTable(r: StudyResult): string {
  const rows = normOutcomes(r).map((o) => {
    const a = o.analysis;
    const fit = a.fit;
    const notes = [
      ...a.reasons.map((t) => `<li>${esc(t)}</li>`),
      ...a.warnings.map((t) => `<li class="warning">⚠ ${esc(t)}</li>`),
      ...(o.problem ? [`<li class="warning">✗ ${esc(o.problem)}</li>`] : []),
    ];
    return (
      `<tr><td class="text">${esc(o.norm)}</td>` +
      `<td class="num">${fit ? `${esc(fixed(fit.order))} ± ${esc(stderrText(fit.stderr))}` : '—'}</td>` +
      `<td class="num">${fit ? esc(intervalText(fit.ciLow, fit.ciHigh)) : '—'}</td>` +
      `<td class="num">${fit ? esc(levelRangeText(fit.levels)) : '—'}</td>` +
      `<td class="num">${esc(orderText(a.expected))} ± ${esc(String(a.tolerance))}</td>` +
      `<td class="text">${verdictSpan(o)}</td>` +
      `<td class="text"><ul class="reasons">${notes.join('')}</ul></td></tr>`
    );
  });
  return [
    '<table class="fits">',
    '<thead><tr><th class="text">norm</th><th>fitted ± std. error</th><th>95% CI</th><th>fit levels</th><th>expected ± tol.</th><th class="text">verdict</th><th class="text">reasons</th></tr></thead>',
    `<tbody>${rows.join('\n')}</tbody>`,
    '</table>',
  ].join('\n');
}

/** The quantities of interest: GCI, least-squares uncertainty (also per level), mixed-order fit, the intervals. */
function quantitySection(r: StudyResult): string {
  const qs = r.quantities ?? [];
  if (qs.length === 0) return '';
  const tables = quantityTables(qs).map((t) => [
    `<table class="quantities">`,
    `<caption>${esc(t.title)}. ${esc(t.legend)}.</caption>`,
    `<thead><tr>${t.header.map((h, c) => `<th${c === 0 ? ' class="text"' : ''}>${esc(h)}</th>`).join('')}</tr></thead>`,
    `<tbody>${t.rows.map((row) => `<tr>${row.map((v, c) => `<td class="${c === 0 ? 'text' : 'num'}">${esc(v)}</td>`).join('')}</tr>`).join('\n')}</tbody>`,
    '</table>',
  ].join('\n'));
  const notes = qs.flatMap((q) => [...q.warnings.map((w) => `<li class="warning">⚠ ${esc(`${q.name}: ${w}`)}</li>`), ...(q.notApplied ?? []).map((n) => `<li>${esc(`${q.name}: ${n}`)}</li>`)]);
  return [
    '<h3>Quantities of interest</h3>',
    ...tables,
    notes.length ? `<ul class="reasons">${notes.join('')}</ul>` : '',
    `<ul class="intervals">${quantityStatements(qs).map((t) => `<li>${esc(t)}</li>`).join('')}</ul>`,
    `<p class="caution">${esc(QUANTITY_CAUTION)}</p>`,
  ].join('\n');
}

/** Per norm a card with the verdict in words and symbol, the fitted and the expected order. */
function glance(r: StudyResult): string {
  const cards = normOutcomes(r).map((o) => {
    const a = o.analysis;
    return (
      `<div class="card ${o.asExpected ? 'ok' : 'departure'}" data-norm="${esc(o.norm)}">` +
      `<div class="card-norm">${esc(o.norm)}</div>` +
      `<div class="card-verdict">${verdictSpan(o)}</div>` +
      `<div class="card-line">fitted <strong>${esc(a.fit ? fixed(a.fit.order) : '—')}</strong>${a.fit ? ` ${esc(intervalText(a.fit.ciLow, a.fit.ciHigh))}` : ''}</div>` +
      `<div class="card-line">expected ${esc(orderText(a.expected))} ± ${esc(String(a.tolerance))}</div>` +
      `<div class="card-line">${o.asExpected ? '✓ as expected' : `✗ expected ${esc(o.expectedVerdict)}`}</div>` +
      '</div>'
    );
  });
  return `<aside class="glance" aria-label="verdicts of ${esc(r.study)}">${cards.join('')}</aside>`;
}

function versionsTable(versions: Record<string, string>): string {
  const rows = Object.keys(versions)
    .sort()
    .map((k) => `<tr><td class="text"><code>${esc(k)}</code></td><td class="text"><code>${esc(versions[k])}</code></td></tr>`);
  if (rows.length === 0) return '<p>none recorded</p>';
  return `<table class="versions"><thead><tr><th class="text">package</th><th class="text">version</th></tr></thead><tbody>${rows.join('')}</tbody></table>`;
}

function studySection(r: StudyResult, plot: PlotOptions | undefined): string {
  const flaw = r.expectation.verdict === 'pass' ? 'every norm on order' : `${r.expectation.verdict}${r.expectation.flaw ? `: ${r.expectation.flaw}` : ''}`;
  const facts = [
    `<code>${esc(r.file)}</code>`,
    `${r.dim}-D`,
    `${r.levels.length} levels`,
    `${esc(fixed(r.seconds))} s`,
    `started ${esc(r.startedAt)}`,
    `declared: ${esc(flaw)}`,
  ];
  const warnings = r.warnings.length
    ? `<div class="warnings"><strong>⚠ Warnings</strong><ul>${r.warnings.map((w) => `<li>${esc(w)}</li>`).join('')}</ul></div>`
    : '';
  const inputs = compactJson(JSON.parse(JSON.stringify(r.inputs ?? {}, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? String(v) : v))), { width: 72 });
  return [
    `<section class="study" id="${anchor(r.study)}" data-study="${esc(r.study)}">`,
    `<div class="study-head"><h2>${esc(r.study)}</h2>${outcomeBadge(r.asExpected)}</div>`,
    r.description ? `<p>${esc(r.description)}</p>` : '',
    `<p class="facts">${facts.join(' · ')}</p>`,
    '<div class="plot-row">',
    `<figure>${svgPlot(r, plot)}<figcaption>Log-log plot of the error per norm; each dashed triangle has the expected slope. Hollow markers sit on an error floor.</figcaption></figure>`,
    glance(r),
    '</div>',
    '<h3>Levels</h3>',
    levelTable(r),
    '<h3>Fitted orders</h3>',
    fitTable(r),
    quantitySection(r),
    warnings,
    '<div class="columns">',
    `<div><h3>Inputs</h3><pre class="inputs">${esc(inputs ?? 'none')}</pre></div>`,
    `<div><h3>Package versions</h3>${versionsTable(r.versions)}</div>`,
    '</div>',
    '</section>',
  ].join('\n');
}

function problemsBox(problems: readonly InputProblem[]): string {
  if (problems.length === 0) return '';
  const items = problems.map(
    (p) => `<li><strong>${esc(p.study || p.file || 'input')}</strong>${p.file && p.study ? ` (<code>${esc(p.file)}</code>)` : ''}: ${esc(p.message)}</li>`,
  );
  return `<div class="problems" role="alert"><strong>✗ ${problems.length} input ${problems.length === 1 ? 'problem' : 'problems'}: these studies did not run</strong><ul>${items.join('')}</ul></div>`;
}

/** One self-contained page (inline CSS and SVG, no scripts, no network): overview, then one section per study. */
export function htmlReport(results: readonly StudyResult[], meta: HtmlMeta = {}): string {
  const title = meta.title ?? 'Convergence report';
  const tally = studyTally(results);
  const problems = meta.inputProblems ?? [];
  const sub = [
    `${tally.studies} ${tally.studies === 1 ? 'study' : 'studies'}: ${tally.asExpected} as expected, ${tally.departures.length} not as expected`,
    problems.length ? `${problems.length} with input problems` : '',
    meta.generatedAt ? `generated ${esc(meta.generatedAt)}` : '',
  ].filter(Boolean);
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${esc(title)}</title>`,
    `<style>${REPORT_CSS}</style>`,
    '</head>',
    '<body>',
    '<main>',
    '<header class="report-head">',
    `<h1>${esc(title)}</h1>`,
    `<p class="subtitle">${sub.join(' · ')}</p>`,
    meta.command ? `<p class="subtitle"><code>${esc(meta.command)}</code></p>` : '',
    '</header>',
    `<p class="caution"><strong>Verification, not validation.</strong> ${esc(CAUTION)}</p>`,
    meta.interrupted ? `<div class="problems" role="alert"><strong>⚠ Incomplete run.</strong> ${esc(meta.interrupted)}</div>` : '',
    problemsBox(problems),
    '<h2 id="overview">Overview</h2>',
    overview(results),
    ...results.map((r) => studySection(r, meta.plot)),
    `<footer>Made by rungs. Errors are measured against manufactured exact solutions; rates and fitted orders are least-squares slopes of log error against log h.</footer>`,
    '</main>',
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
