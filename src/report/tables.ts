import type { StudyResult } from '../study/result.ts';
import { countText, fixed, intervalText, levelNumber, levelRangeText, orderText, sci, sciParts, sentence } from './numbers.ts';
import { normNames, rateAt, reportsCount } from './series.ts';
import { normOutcomes, verdictLabel } from './verdict.ts';
import { QUANTITY_CAUTION, quantityStatements, quantityTables } from './quantity-tables.ts';
import { escapeLatex, latexText } from './latex-text.ts';
import { fitAxisSuffix, hasTime, jointFitText, showsRates, stepsText, timeLine, type Notation } from './time.ts';

/** "L2 fitted 3.01 [2.99, 3.02], expected 3: ✓ on-order" per norm; shared by both table captions. A ladder in Δt says
 *  "fitted 1.00 [0.98, 1.02] in Δt"; a two-axis design gives its joint fit, "L2 joint fit p = …; q = …". */
function fitSummaries(result: StudyResult, withSymbol: boolean): string[] {
  return normOutcomes(result).map((o) => {
    const note = o.asExpected ? '' : ` (expected ${o.expectedVerdict})`;
    if (o.twoAxis) return `${o.norm} joint fit ${jointFitText(o.twoAxis, withSymbol)}${note}`;
    const fit = o.analysis.fit;
    const fitted = fit ? `fitted ${fixed(fit.order)} ${intervalText(fit.ciLow, fit.ciHigh)}${fitAxisSuffix(result)} over levels ${levelRangeText(fit.levels)}` : 'no fit';
    const verdict = withSymbol ? verdictLabel(o.analysis.verdict) : o.analysis.verdict;
    return `${o.norm} ${fitted}, expected ${orderText(o.analysis.expected)}: ${verdict}${note}`;
  });
}

// ---- Markdown (GitHub-flavoured pipe tables) ----

const HTML_ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;' };

/**
 * Text from a study or a table (names, descriptions, reasons, labels) made inert in Markdown: raw HTML is written as
 * entities (and an '&' that would start a character reference) (CommonMark passes tags and comments through to the page, spec §4.6 and §6.6), a pipe or a line break would
 * end a table cell early (GFM spec, tables extension), and a backslash would escape what follows it.
 */
export function escapeMarkdownCell(text: string): string {
  return text
    .replace(/\\/g, '\\\\')
    // '&' only where it would start a character reference ("&lt;"); "Eça & Hoekstra" stays as it is.
    .replace(/&(?=#?[A-Za-z0-9]+;)|[<>]/g, (c) => HTML_ENTITIES[c]!)
    .replace(/\|/g, '\\|')
    .replace(/\r\n?|\n/g, ' ');
}

/** Per study: a heading line, for a study with time the line that says what its ladder refines, the level table
 *  (errors as 1.23e-04, rates to two decimals, '—' on level 1; steps and Δt after h for a study with time), a footer. */
export function markdownTable(result: StudyResult): string {
  const norms = normNames(result);
  const time = hasTime(result);
  const rates = showsRates(result);
  const dofs = reportsCount(result, 'dofs');
  const header = ['level', 'h', ...(time ? ['steps', 'Δt'] : []), ...(dofs ? ['dofs'] : []), ...norms.flatMap((n) => (rates ? [`${n} error`, `${n} rate`] : [`${n} error`]))];
  const rows = result.levels.map((level, i) => [
    String(levelNumber(level.index)),
    sci(level.h),
    ...(time ? [stepsText(level), sci(level.dt)] : []),
    ...(dofs ? [countText(level.dofs)] : []),
    ...norms.flatMap((n) => (rates ? [sci(level.errors[n]), fixed(rateAt(result, n, i))] : [sci(level.errors[n])])),
  ]);
  const line = (cells: string[]) => `| ${cells.map(escapeMarkdownCell).join(' | ')} |`;
  const title = result.description ? `**${escapeMarkdownCell(result.study)}**: ${escapeMarkdownCell(result.description)}` : `**${escapeMarkdownCell(result.study)}**`;
  const ladder = timeLine(result);
  return [
    title,
    '',
    ...(ladder === null ? [] : [escapeMarkdownCell(ladder), '']),
    line(header),
    `|${header.map(() => '---:').join('|')}|`,
    ...rows.map(line),
    '',
    normNames(result).length ? sentence(`Fitted orders: ${fitSummaries(result, true).map(escapeMarkdownCell).join('; ')}`) : 'No error columns analysed.',
    '',
    ...markdownQuantities(result),
  ].join('\n');
}

// ---- LaTeX (booktabs rules) ----

export { escapeLatex };

/** $1.23\times10^{-4}$, or an em dash when there is no value. */
export function latexSci(x: number | null | undefined): string {
  if (x === null || x === undefined) return '---';
  const parts = sciParts(x, 3);
  if (parts === null) return Number.isNaN(x) ? 'n/a' : x > 0 ? '$\\infty$' : '$-\\infty$';
  return `$${parts.mantissa}\\times10^{${parts.exponent}}$`;
}

function latexRate(rate: number | null): string {
  if (rate === null) return '---';
  return Number.isFinite(rate) ? `$${fixed(rate)}$` : latexSci(rate);
}

/** A fit summary in LaTeX: every symbol spelled by latexText ("in Δt" as $\Delta t$). */
const latexSummary = latexText;

/** How the time sentence is written in LaTeX: each formula one math span, words escaped. */
const LATEX_NOTATION: Notation = {
  dt: '$\\Delta t$',
  coupled: (c, s) => `$\\Delta t = ${c}\\cdot h^{${s}}$`,
  model: '$e = C_h h^p + C_t \\Delta t^q$',
  pair: '$(h, \\Delta t)$',
  times: '$\\times$',
  text: (s) => latexText(s).replace(/Δ/g, '$\\Delta$'),
};

/** A table environment per study with \toprule/\midrule/\bottomrule (booktabs); errors as $m\times10^{k}$. A study
 *  with time has steps and $\Delta t$ columns after $h$ and says in the caption what its ladder refines. */
export function latexTable(result: StudyResult): string {
  const norms = normNames(result);
  const time = hasTime(result);
  const dofs = reportsCount(result, 'dofs');
  const lead = (time ? 4 : 2) + (dofs ? 1 : 0);
  // A two-axis design has one column per norm (its error), every other study an error and a rate.
  const per = showsRates(result) ? 2 : 1;
  const columns = lead + per * norms.length;
  const group = norms.map((n) => (per === 2 ? `\\multicolumn{2}{c}{${escapeLatex(n)}}` : escapeLatex(n))).join(' & ');
  const groupRules = per === 2 ? norms.map((_, k) => `\\cmidrule(lr){${lead + 1 + 2 * k}-${lead + 2 + 2 * k}}`).join(' ') : '';
  const sub = norms.map(() => (per === 2 ? 'error & rate' : 'error')).join(' & ');
  const rows = result.levels.map(
    (level, i) =>
      `    ${levelNumber(level.index)} & ${latexSci(level.h)} & ` +
      (time ? `${level.steps === undefined ? '---' : level.steps} & ${latexSci(level.dt)} & ` : '') +
      (dofs ? `${countText(level.dofs)}${norms.length ? ' & ' : ''}` : '') +
      norms.map((n) => (per === 2 ? `${latexSci(level.errors[n])} & ${latexRate(rateAt(result, n, i))}` : latexSci(level.errors[n]))).join(' & ') +
      ' \\\\',
  );
  const ladder = timeLine(result, LATEX_NOTATION);
  const caption = `${latexText(sentence(`${result.study}${result.description ? `: ${result.description}` : ''}`))} ` +
    (ladder === null ? '' : `${sentence(ladder)} `) +
    (norms.length ? sentence(fitSummaries(result, false).map(latexSummary).join('; ')) : 'No error columns analysed.');
  return [
    '% requires \\usepackage{booktabs}',
    '\\begin{table}[htbp]',
    '  \\centering',
    `  \\caption{${caption}}`,
    `  \\label{tab:${result.study.replace(/[^A-Za-z0-9:.-]/g, '-')}}`,
    `  \\begin{tabular}{${'r'.repeat(columns)}}`,
    '    \\toprule',
    ...(norms.length ? [`    ${'& '.repeat(lead)}${group} \\\\`, ...(groupRules ? [`    ${groupRules}`] : [])] : []),
    `    ${['level', '$h$', ...(time ? ['steps', '$\\Delta t$'] : []), ...(dofs ? ['dofs'] : []), ...(norms.length ? [sub] : [])].join(' & ')} \\\\`,
    '    \\midrule',
    ...rows,
    '    \\bottomrule',
    '  \\end{tabular}',
    '\\end{table}',
    '',
    ...latexQuantities(result),
  ].join('\n');
}

// ---- Quantities of interest (GCI, least-squares uncertainty, mixed-order fit) ----

/** Markdown tables of the study's quantities, the interval statements and the caution; nothing without quantities. */
function markdownQuantities(result: StudyResult): string[] {
  const qs = result.quantities ?? [];
  if (qs.length === 0) return [];
  const line = (cells: string[]) => `| ${cells.map(escapeMarkdownCell).join(' | ')} |`;
  const out: string[] = [`**Quantities of interest of ${escapeMarkdownCell(result.study)}**`, ''];
  for (const t of quantityTables(qs)) {
    out.push(`*${escapeMarkdownCell(t.title)}*`, '', line(t.header), `|${t.header.map((_, c) => (c === 0 ? ':---' : '---:')).join('|')}|`, ...t.rows.map(line), '', escapeMarkdownCell(t.legend), '');
  }
  out.push(...quantityStatements(qs).map((s) => `- ${escapeMarkdownCell(s)}`), '', `> ${escapeMarkdownCell(QUANTITY_CAUTION)}`, '');
  return out;
}

/** One booktabs table per quantity table; the interval statements and the caution in the caption of the first. */
function latexQuantities(result: StudyResult): string[] {
  const qs = result.quantities ?? [];
  if (qs.length === 0) return [];
  const cell = latexText;
  const label = result.study.replace(/[^A-Za-z0-9:.-]/g, '-');
  return quantityTables(qs).flatMap((t, k) => {
    const extra = k === 0 ? ` ${cell(sentence(quantityStatements(qs).join('; ')))} ${cell(QUANTITY_CAUTION)}` : '';
    return [
      '\\begin{table}[htbp]',
      '  \\centering',
      `  \\caption{${cell(`${result.study}: ${sentence(t.title)} ${sentence(t.legend)}`)}${extra}}`,
      `  \\label{tab:${label}-quantities-${k + 1}}`,
      `  \\begin{tabular}{l${'r'.repeat(t.header.length - 1)}}`,
      '    \\toprule',
      `    ${t.header.map(cell).join(' & ')} \\\\`,
      '    \\midrule',
      ...t.rows.map((r) => `    ${r.map(cell).join(' & ')} \\\\`),
      '    \\bottomrule',
      '  \\end{tabular}',
      '\\end{table}',
      '',
    ];
  });
}
