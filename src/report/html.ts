import type { StudyResult } from '../study/result.ts';
import { compactJson } from './compact-json.ts';
import type { InputProblem } from './input-problem.ts';
import { REPORT_CSS, TIME_CSS } from './html-style.ts';
import { countText, fixed, intervalText, levelNumber, levelRangeText, orderText, sci, sentence, stderrText } from './numbers.ts';
import { fileStem, normNames, rateAt, reportsCount } from './series.ts';
import { svgPlot, type PlotOptions } from './svg.ts';
import { normOutcomes, studyTally, verdictLabel, type NormOutcome } from './verdict.ts';
import { escapeXml as esc } from './xml.ts';
import { QUANTITY_CAUTION, quantityStatements, quantityTables } from './quantity-tables.ts';
import type { TwoAxisAnalysis, Verdict } from '../analysis/types.ts';
import { fitAxisSuffix, hasTime, jointOrderText, showsRates, stepsText, timeLine } from './time.ts';
import { ERROR_MAP_CSS, errorMapSection } from './error-map.ts';

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
  'whether the system modelled is fit for service: engineering decisions follow local codes and licensed practice.';

const anchor = (study: string) => `study-${fileStem(study)}`;

function verdictSpan(o: NormOutcome): string {
  return `<span class="verdict verdict-${o.analysis.verdict}">${esc(verdictLabel(o.analysis.verdict))}</span>`;
}

/** One verdict of a joint fit, with the axis it belongs to when `axis` is given: "h ✓ on-order". */
function jointVerdictSpan(v: Verdict, axis = ''): string {
  return `<span class="verdict verdict-${v}">${esc(`${axis ? `${axis} ` : ''}${verdictLabel(v)}`)}</span>`;
}

/** Both verdicts of a two-axis norm: "h ✓ on-order, Δt ✗ below-order". */
function jointVerdicts(t: TwoAxisAnalysis): string {
  return `${jointVerdictSpan(t.verdict.space, 'h')}, ${jointVerdictSpan(t.verdict.time, 'Δt')}`;
}

function outcomeBadge(ok: boolean, what = ok ? 'as expected' : 'not as expected'): string {
  return `<span class="outcome ${ok ? 'ok' : 'departure'}">${ok ? '✓' : '✗'} ${esc(what)}</span>`;
}

function fittedText(o: NormOutcome): string {
  if (o.twoAxis) return `p ${jointOrderText(o.twoAxis.fit, 'p')}; q ${jointOrderText(o.twoAxis.fit, 'q')}`;
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
      const expected = o.twoAxis
        ? `${orderText(o.twoAxis.expected.space)} in h, ${orderText(o.twoAxis.expected.time)} in Δt`
        : `${orderText(o.analysis.expected)}${fitAxisSuffix(r)}`;
      return (
        `<tr>${studyCell}<td class="text">${esc(o.norm)}</td>` +
        `<td class="num">${esc(expected)}</td><td class="num">${esc(fittedText(o))}</td>` +
        `<td class="text">${esc(o.expectedVerdict)}</td><td class="text">${o.twoAxis ? jointVerdicts(o.twoAxis) : verdictSpan(o)}</td>` +
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
  const time = hasTime(r);
  const rates = showsRates(r);
  const dofs = reportsCount(r, 'dofs');
  const cellCount = reportsCount(r, 'cells');
  const head = ['level', 'h', ...(time ? ['steps', 'Δt'] : []), ...(dofs ? ['dofs'] : []), ...(cellCount ? ['cells'] : []), ...norms.flatMap((n) => (rates ? [`${n} error`, `${n} rate`] : [`${n} error`])), 'solver its', 'time (s)'];
  const rows = r.levels.map((l, i) => {
    const cells = [
      String(levelNumber(l.index)),
      sci(l.h),
      ...(time ? [stepsText(l), sci(l.dt)] : []),
      ...(dofs ? [countText(l.dofs)] : []),
      ...(cellCount ? [countText(l.cells)] : []),
      ...norms.flatMap((n) => (rates ? [sci(l.errors[n]), fixed(rateAt(r, n, i))] : [sci(l.errors[n])])),
      l.solver ? String(l.solver.iterations) : '—',
      l.seconds.total === undefined ? '—' : fixed(l.seconds.total, 3),
    ];
    return `<tr>${cells.map((c) => `<td class="num">${esc(c)}</td>`).join('')}</tr>`;
  });
  const caption = !time
    ? 'Errors per level; the rate is the observed order between a level and the one before it.'
    : r.time?.axis === 'dt'
      ? 'Errors per level; steps over [0, T] and Δt = T/steps; the rate is the observed order in Δt between a level and the one before it.'
      : !rates
        ? 'Errors per (h, Δt) pair of the design; steps over [0, T] and Δt = T/steps. The joint fit below gives the orders.'
        : 'Errors per level; steps over [0, T] and Δt = T/steps; the rate is the observed order between a level and the one before it.';
  return [
    '<table class="levels">',
    `<caption>${esc(caption)}</caption>`,
    `<thead><tr>${head.map((h) => `<th>${esc(h)}</th>`).join('')}</tr></thead>`,
    `<tbody>${rows.join('\n')}</tbody>`,
    '</table>',
  ].join('\n');
}

/**
 * A two-axis design: per norm the joint fit e = C_h h^p + C_t Δt^q, each order with its 95% interval, the expected
 * value with its tolerance and its verdict, the constants and the residual, and the reasons (with the analysis'
 * warnings and, when the norm departs, why).
 */
function jointFitTable(r: StudyResult): string {
  const rows = normOutcomes(r).map((o) => {
    const t = o.twoAxis;
    const a = o.analysis;
    if (!t) return `<tr><td class="text">${esc(o.norm)}</td><td class="text" colspan="2">no joint fit</td><td class="text">${verdictSpan(o)}</td></tr>`;
    const fit = t.fit;
    const constants = fit ? `C_h = ${sci(fit.Ch)}, C_t = ${sci(fit.Ct)}; residual σ = ${sci(fit.sigma)} over ${fit.points} points (${fit.dof} dof)` : '';
    const notes = [
      ...t.reasons.map((x) => `<li>${esc(x)}</li>`),
      ...a.reasons.filter((x) => !t.reasons.includes(x)).map((x) => `<li>${esc(x)}</li>`),
      ...a.warnings.map((x) => `<li class="warning">⚠ ${esc(x)}</li>`),
      ...(fit && !fit.converged ? ['<li class="warning">⚠ the joint fit did not converge</li>'] : []),
      ...(o.problem ? [`<li class="warning">✗ ${esc(o.problem)}</li>`] : []),
      ...(constants ? [`<li class="fit-constants">${esc(constants)}</li>`] : []),
    ];
    // Each order in one cell, three lines: the fitted value with its interval, the expected value, the verdict.
    const order = (which: 'p' | 'q', expected: number | null, verdict: Verdict) =>
      `<td class="order" data-order="${which}"><div class="order-fit">${esc(`${which} = ${jointOrderText(fit, which)}`)}</div>` +
      `<div class="order-expected">${esc(`expected ${orderText(expected)} ± ${t.tolerance}`)}</div>` +
      `<div>${jointVerdictSpan(verdict)}</div></td>`;
    return (
      `<tr data-norm="${esc(o.norm)}"><td class="text">${esc(o.norm)}</td>` +
      order('p', t.expected.space, t.verdict.space) +
      order('q', t.expected.time, t.verdict.time) +
      `<td class="text"><ul class="reasons">${notes.join('')}</ul></td></tr>`
    );
  });
  return [
    '<table class="fits joint-fits">',
    '<caption>Joint fit e = C_h·h^p + C_t·Δt^q over every (h, Δt) pair: the spatial order p and the temporal order q with their 95% confidence intervals, the expected orders and a verdict for each; the constants and the residual of ln e close the reasons.</caption>',
    '<thead><tr><th class="text">norm</th><th class="text">spatial order (in h)</th><th class="text">temporal order (in Δt)</th><th class="text">reasons</th></tr></thead>',
    `<tbody>${rows.join('\n')}</tbody>`,
    '</table>',
  ].join('\n');
}

function fitTable(r: StudyResult): string {
  if (r.time?.axis === 'grid') return jointFitTable(r);
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
    `<thead><tr><th class="text">norm</th><th>fitted${esc(fitAxisSuffix(r))} ± std. error</th><th>95% CI</th><th>fit levels</th><th>expected ± tol.</th><th class="text">verdict</th><th class="text">reasons</th></tr></thead>`,
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
    `<caption>${esc(`${sentence(t.title)} ${sentence(t.legend)}`)}</caption>`,
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
    const t = o.twoAxis;
    if (t) {
      return (
        `<div class="card ${o.asExpected ? 'ok' : 'departure'}" data-norm="${esc(o.norm)}">` +
        `<div class="card-norm">${esc(o.norm)}</div>` +
        `<div class="card-verdict">${verdictSpan(o)}</div>` +
        `<div class="card-line">in h: p <strong>${esc(t.fit ? fixed(t.fit.p) : '—')}</strong>, expected ${esc(orderText(t.expected.space))}, ${jointVerdictSpan(t.verdict.space)}</div>` +
        `<div class="card-line">in Δt: q <strong>${esc(t.fit ? fixed(t.fit.q) : '—')}</strong>, expected ${esc(orderText(t.expected.time))}, ${jointVerdictSpan(t.verdict.time)}</div>` +
        `<div class="card-line">${o.asExpected ? '✓ as expected' : `✗ expected ${esc(o.expectedVerdict)}`}</div>` +
        '</div>'
      );
    }
    return (
      `<div class="card ${o.asExpected ? 'ok' : 'departure'}" data-norm="${esc(o.norm)}">` +
      `<div class="card-norm">${esc(o.norm)}</div>` +
      `<div class="card-verdict">${verdictSpan(o)}</div>` +
      `<div class="card-line">fitted <strong>${esc(a.fit ? fixed(a.fit.order) : '—')}</strong>${a.fit ? ` ${esc(intervalText(a.fit.ciLow, a.fit.ciHigh))}` : ''}</div>` +
      `<div class="card-line">expected ${esc(orderText(a.expected))} ± ${esc(String(a.tolerance))}${esc(fitAxisSuffix(r))}</div>` +
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

/** The package versions every study of the run shares (same name, same version): shown once, at the end of the page. */
export function sharedVersions(results: readonly StudyResult[]): Record<string, string> {
  if (results.length === 0) return {};
  const shared: Record<string, string> = { ...results[0]!.versions };
  for (const r of results.slice(1)) {
    for (const k of Object.keys(shared)) if (r.versions[k] !== shared[k]) delete shared[k];
  }
  return shared;
}

/** A study's versions that the run's shared table does not already give (a study resumed from an older run). */
function ownVersions(r: StudyResult, shared: Record<string, string>): Record<string, string> {
  return Object.fromEntries(Object.entries(r.versions).filter(([k, v]) => shared[k] !== v));
}

function studySection(r: StudyResult, plot: PlotOptions | undefined, shared: Record<string, string>): string {
  const own = ownVersions(r, shared);
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
  const ladder = timeLine(r);
  const grid = r.time?.axis === 'grid';
  const caption = grid
    ? 'Per norm, the error against h with a line per Δt (left) and against Δt with a line per mesh (right), on log-log axes; dashed: the joint fit e = C_h·h^p + C_t·Δt^q along each line.'
    : r.time?.axis === 'dt'
      ? 'Log-log plot of the error per norm against the time step Δt; each dashed triangle has the expected slope. Hollow markers sit on an error floor.'
      : 'Log-log plot of the error per norm; each dashed triangle has the expected slope. Hollow markers sit on an error floor.';
  const inputs = compactJson(JSON.parse(JSON.stringify(r.inputs ?? {}, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? String(v) : v))), { width: 72 });
  return [
    `<section class="study" id="${anchor(r.study)}" data-study="${esc(r.study)}">`,
    `<div class="study-head"><h2>${esc(r.study)}</h2>${outcomeBadge(r.asExpected)}</div>`,
    r.description ? `<p>${esc(r.description)}</p>` : '',
    `<p class="facts">${facts.join(' · ')}</p>`,
    ...(ladder === null ? [] : [`<p class="time-design">${esc(ladder)}</p>`]),
    grid ? '<div class="plot-row plot-grid">' : '<div class="plot-row">',
    `<figure>${svgPlot(r, plot)}<figcaption>${esc(caption)}</figcaption></figure>`,
    glance(r),
    '</div>',
    '<h3>Levels</h3>',
    levelTable(r),
    grid ? '<h3>Joint fit in h and Δt</h3>' : '<h3>Fitted orders</h3>',
    fitTable(r),
    quantitySection(r),
    // Only studies with maps get the section (and its line), so pages without maps stay byte for byte as before.
    ...(r.errorMaps?.length ? [errorMapSection(r)] : []),
    warnings,
    Object.keys(own).length ? '<div class="columns">' : '<div>',
    `<div><h3>Inputs</h3><pre class="inputs">${esc(inputs ?? 'none')}</pre></div>`,
    Object.keys(own).length ? `<div><h3>Package versions of this study</h3><p>where they differ from the run's</p>${versionsTable(own)}</div>` : '',
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
  const shared = sharedVersions(results);
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
    `<style>${REPORT_CSS}${results.some(hasTime) ? TIME_CSS : ''}${results.some((r) => r.errorMaps?.length) ? ERROR_MAP_CSS : ''}</style>`,
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
    ...results.map((r) => studySection(r, meta.plot, shared)),
    results.length ? `<section class="run-versions"><h2 id="versions">Package versions</h2><p>Shared by every study of this run.</p>${versionsTable(shared)}</section>` : '',
    `<footer>Made by rungs. Errors are measured against each study's exact solution, or read from the code or table that gave them; rates and fitted orders are least-squares slopes of log error against log h${results.some(hasTime) ? ' (against log Δt for ladders that refine the time step; two-axis designs are fitted jointly as e = C_h·h^p + C_t·Δt^q by nonlinear least squares on log e)' : ''}.</footer>`,
    '</main>',
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
