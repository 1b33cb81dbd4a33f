import type { StudyResult } from '../study/result.ts';
import { fixed, intervalText, levelNumber, levelRangeText, orderText, sci, sciParts } from './numbers.ts';
import { normNames, rateAt } from './series.ts';
import { normOutcomes, verdictLabel } from './verdict.ts';
import { QUANTITY_CAUTION, quantityStatements, quantityTables } from './quantity-tables.ts';

/** "L2 fitted 3.01 [2.99, 3.02], expected 3: ✓ on-order" per norm; shared by both table captions. */
function fitSummaries(result: StudyResult, withSymbol: boolean): string[] {
  return normOutcomes(result).map((o) => {
    const fit = o.analysis.fit;
    const fitted = fit ? `fitted ${fixed(fit.order)} ${intervalText(fit.ciLow, fit.ciHigh)} over levels ${levelRangeText(fit.levels)}` : 'no fit';
    const verdict = withSymbol ? verdictLabel(o.analysis.verdict) : o.analysis.verdict;
    const note = o.asExpected ? '' : ` (expected ${o.expectedVerdict})`;
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

/** Per study: a heading line, the level table (errors as 1.23e-04, rates to two decimals, '—' on level 1), a footer. */
export function markdownTable(result: StudyResult): string {
  const norms = normNames(result);
  const header = ['level', 'h', 'dofs', ...norms.flatMap((n) => [`${n} error`, `${n} rate`])];
  const rows = result.levels.map((level, i) => [
    String(levelNumber(level.index)),
    sci(level.h),
    String(level.dofs),
    ...norms.flatMap((n) => [sci(level.errors[n]), fixed(rateAt(result, n, i))]),
  ]);
  const line = (cells: string[]) => `| ${cells.map(escapeMarkdownCell).join(' | ')} |`;
  const title = result.description ? `**${escapeMarkdownCell(result.study)}**: ${escapeMarkdownCell(result.description)}` : `**${escapeMarkdownCell(result.study)}**`;
  return [
    title,
    '',
    line(header),
    `|${header.map(() => '---:').join('|')}|`,
    ...rows.map(line),
    '',
    normNames(result).length ? `Fitted orders: ${fitSummaries(result, true).map(escapeMarkdownCell).join('; ')}.` : 'No error columns analysed.',
    '',
    ...markdownQuantities(result),
  ].join('\n');
}

// ---- LaTeX (booktabs rules) ----

const LATEX_SPECIALS: Record<string, string> = {
  '\\': '\\textbackslash{}',
  '{': '\\{',
  '}': '\\}',
  $: '\\$',
  '&': '\\&',
  '#': '\\#',
  '%': '\\%',
  _: '\\_',
  '^': '\\textasciicircum{}',
  '~': '\\textasciitilde{}',
};

/** The ten characters LaTeX treats specially in text (common practice, no source). */
export function escapeLatex(text: string): string {
  return text.replace(/[\\{}$&#%_^~]/g, (c) => LATEX_SPECIALS[c]);
}

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

/** Text with the verdict words of fitSummaries, escaped; '∞' and '—' spelled for LaTeX. */
function latexText(text: string): string {
  return escapeLatex(text).replace(/−∞/g, '$-\\infty$').replace(/∞/g, '$\\infty$').replace(/–/g, '--').replace(/—/g, '---');
}

/** A table environment per study with \toprule/\midrule/\bottomrule (booktabs); errors as $m\times10^{k}$. */
export function latexTable(result: StudyResult): string {
  const norms = normNames(result);
  const columns = 3 + 2 * norms.length;
  const group = norms.map((n) => `\\multicolumn{2}{c}{${escapeLatex(n)}}`).join(' & ');
  const groupRules = norms.map((_, k) => `\\cmidrule(lr){${4 + 2 * k}-${5 + 2 * k}}`).join(' ');
  const sub = norms.map(() => 'error & rate').join(' & ');
  const rows = result.levels.map(
    (level, i) =>
      `    ${levelNumber(level.index)} & ${latexSci(level.h)} & ${level.dofs}${norms.length ? ' & ' : ''}` +
      norms.map((n) => `${latexSci(level.errors[n])} & ${latexRate(rateAt(result, n, i))}`).join(' & ') +
      ' \\\\',
  );
  const caption = `${latexText(result.study)}${result.description ? `: ${latexText(result.description)}` : ''}. ` +
    (norms.length ? `${fitSummaries(result, false).map(latexText).join('; ')}.` : 'No error columns analysed.');
  return [
    '% requires \\usepackage{booktabs}',
    '\\begin{table}[htbp]',
    '  \\centering',
    `  \\caption{${caption}}`,
    `  \\label{tab:${result.study.replace(/[^A-Za-z0-9:.-]/g, '-')}}`,
    `  \\begin{tabular}{${'r'.repeat(columns)}}`,
    '    \\toprule',
    ...(norms.length ? [`    & & & ${group} \\\\`, `    ${groupRules}`] : []),
    `    level & $h$ & dofs${norms.length ? ` & ${sub}` : ''} \\\\`,
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

/** Symbols of the quantity tables in plain LaTeX, so that no Unicode input encoding is needed. */
const LATEX_SYMBOLS: Record<string, string> = {
  φ: '$\\phi$', ε: '$\\varepsilon$', Δ: '$\\Delta$', '±': '$\\pm$', '·': '$\\cdot$', '−': '$-$', '²': '$^2$',
  '≥': '$\\geq$', '≤': '$\\leq$', '<': '$<$', '>': '$>$', '|': '$|$', ç: '\\c{c}',
};

/** One booktabs table per quantity table; the interval statements and the caution in the caption of the first. */
function latexQuantities(result: StudyResult): string[] {
  const qs = result.quantities ?? [];
  if (qs.length === 0) return [];
  const cell = (t: string) => latexText(t).replace(/[φεΔ±·−²≥≤<>|ç]/g, (c) => LATEX_SYMBOLS[c]!);
  const label = result.study.replace(/[^A-Za-z0-9:.-]/g, '-');
  return quantityTables(qs).flatMap((t, k) => {
    const extra = k === 0 ? ` ${quantityStatements(qs).map(cell).join('; ')}. ${cell(QUANTITY_CAUTION)}` : '';
    return [
      '\\begin{table}[htbp]',
      '  \\centering',
      `  \\caption{${cell(result.study)}: ${cell(t.title)}. ${cell(t.legend)}.${extra}}`,
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
