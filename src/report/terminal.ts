import type { StudyResult } from '../study/result.ts';
import { countText, fixed, intervalText, levelNumber, levelRangeText, orderText, sci, stderrText } from './numbers.ts';
import { normNames, rateAt, reportsCount } from './series.ts';
import { normOutcomes, studyTally, verdictLabel, type NormOutcome } from './verdict.ts';
import { fitAxisSuffix, hasTime, jointOrderText, jointVerdictText, showsRates, stepsText, timeLine } from './time.ts';

export interface TerminalOptions {
  /** ANSI colour; the CLI passes false when NO_COLOR is set or stdout is not a TTY. */
  color: boolean;
  /** Print only the summary across studies (after the per-study tables were printed one by one). */
  summaryOnly?: boolean;
}

type Paint = (text: string) => string;
interface Palette {
  bold: Paint;
  dim: Paint;
  good: Paint;
  bad: Paint;
  unsure: Paint;
}

// SGR codes (ECMA-48): 1 bold, 2 faint, 31 red, 32 green, 33 yellow, 22/39 reset; colour only ever doubles the text.
function palette(color: boolean): Palette {
  const sgr = (on: number, off: number): Paint => (color ? (t) => `\u001b[${on}m${t}\u001b[${off}m` : (t) => t);
  return { bold: sgr(1, 22), dim: sgr(2, 22), good: sgr(32, 39), bad: sgr(31, 39), unsure: sgr(33, 39) };
}

function outcomePaint(p: Palette, o: NormOutcome): Paint {
  if (o.asExpected) return p.good;
  return (o.departing ?? o.analysis.verdict) === 'inconclusive' ? p.unsure : p.bad;
}

/** Right-aligned columns separated by two spaces; widths from the plain text so colour never shifts a column. */
function alignRows(rows: string[][], leftColumns = 0): string[] {
  // reduce, not Math.max(...): spreading the rows of a 100k-level table overflows the call stack.
  const widths = rows[0].map((_, c) => rows.reduce((w, r) => Math.max(w, [...r[c]].length), 0));
  return rows.map((r) =>
    r
      .map((cell, c) => (c < leftColumns ? cell.padEnd(widths[c]) : cell.padStart(widths[c])))
      .join('  ')
      .trimEnd(),
  );
}

function levelTable(result: StudyResult, p: Palette): string[] {
  const norms = normNames(result);
  const time = hasTime(result);
  const rates = showsRates(result);
  const dofs = reportsCount(result, 'dofs');
  const header = ['level', 'h', ...(time ? ['steps', 'Δt'] : []), ...(dofs ? ['dofs'] : []), ...norms.flatMap((n) => (rates ? [`${n} error`, 'rate'] : [`${n} error`]))];
  const body = result.levels.map((level, i) => [
    String(levelNumber(level.index)),
    sci(level.h),
    ...(time ? [stepsText(level), sci(level.dt)] : []),
    ...(dofs ? [countText(level.dofs)] : []),
    ...norms.flatMap((norm) => (rates ? [sci(level.errors[norm]), fixed(rateAt(result, norm, i))] : [sci(level.errors[norm])])),
  ]);
  const rule = header.map((h, c) => '─'.repeat(body.reduce((w, r) => Math.max(w, [...r[c]].length), [...h].length)));
  const lines = alignRows([header, rule, ...body]);
  return lines.map((line, i) => '  ' + (i === 0 ? p.bold(line) : i === 1 ? p.dim(line) : line));
}

function fitLines(result: StudyResult, p: Palette): string[] {
  const outcomes = normOutcomes(result);
  const nameWidth = Math.max(...outcomes.map((o) => o.norm.length));
  const lines: string[] = [];
  for (const o of outcomes) {
    if (o.twoAxis) {
      lines.push(...jointFitLines(o, p, nameWidth));
      continue;
    }
    const fit = o.analysis.fit;
    const fitted = fit
      ? `fitted ${fixed(fit.order)} ± ${stderrText(fit.stderr)}, 95% CI ${intervalText(fit.ciLow, fit.ciHigh)}${fitAxisSuffix(result)}, levels ${levelRangeText(fit.levels)}`
      : 'no fit';
    const verdict = outcomePaint(p, o)(verdictLabel(o.analysis.verdict));
    const expectedNote = o.asExpected ? '' : p.dim(`  (expected ${o.expectedVerdict})`);
    lines.push(`  ${p.bold(o.norm.padEnd(nameWidth))}  ${fitted}; expected ${orderText(o.analysis.expected)}  ${verdict}${expectedNote}`);
    const indent = ' '.repeat(nameWidth + 4);
    for (const reason of o.analysis.reasons) lines.push(`${indent}${p.dim('·')} ${reason}`);
    for (const warning of o.analysis.warnings) lines.push(`${indent}${p.unsure('!')} ${warning}`);
  }
  return lines;
}

/** A norm of a two-axis design: its joint fit, each order with its interval, expected value and verdict, then the
 *  constants and the residual, the reasons and warnings. */
function jointFitLines(o: NormOutcome, p: Palette, nameWidth: number): string[] {
  const t = o.twoAxis!;
  const paint = (v: typeof t.verdict.space) => (o.asExpected || v === 'on-order' || v === 'exact' ? p.good : v === 'inconclusive' ? p.unsure : p.bad)(verdictLabel(v));
  const order = (which: 'p' | 'q') =>
    `${which} = ${jointOrderText(t.fit, which)} (expected ${orderText(which === 'p' ? t.expected.space : t.expected.time)}) ${paint(which === 'p' ? t.verdict.space : t.verdict.time)}`;
  const expectedNote = o.asExpected ? '' : p.dim(`  (expected ${o.expectedVerdict})`);
  const indent = ' '.repeat(nameWidth + 4);
  const lines = [`  ${p.bold(o.norm.padEnd(nameWidth))}  joint fit ${order('p')}; ${order('q')}${expectedNote}`];
  if (t.fit) {
    const converged = t.fit.converged ? '' : '; the fit did not converge';
    lines.push(`${indent}${p.dim(`C_h = ${sci(t.fit.Ch)}, C_t = ${sci(t.fit.Ct)}, residual σ = ${sci(t.fit.sigma)} over ${t.fit.points} points (${t.fit.dof} dof)${converged}`)}`);
  }
  for (const reason of t.reasons) lines.push(`${indent}${p.dim('·')} ${reason}`);
  for (const reason of o.analysis.reasons.filter((r) => !t.reasons.includes(r))) lines.push(`${indent}${p.dim('·')} ${reason}`);
  for (const warning of o.analysis.warnings) lines.push(`${indent}${p.unsure('!')} ${warning}`);
  return lines;
}

function studyBlock(result: StudyResult, p: Palette): string[] {
  const title = result.description ? `${result.study} — ${result.description}` : result.study;
  const facts = [result.file, `${result.dim}-D`, `${result.levels.length} levels`, `${fixed(result.seconds)} s`];
  const ladder = timeLine(result);
  const lines = [p.bold(title), p.dim(facts.join(' · ')), ...(ladder === null ? [] : [ladder]), '', ...levelTable(result, p), '', ...fitLines(result, p)];
  for (const warning of result.warnings) lines.push(`  ${p.unsure('! warning:')} ${warning}`);
  const flaw = result.expectation.flaw ? ` (declared: ${result.expectation.verdict}, ${result.expectation.flaw})` : '';
  lines.push(result.asExpected ? `  ${p.good('✓ as expected')}${flaw}` : `  ${p.bad('✗ NOT as expected')}${flaw}`);
  return lines;
}

function summaryBlock(results: readonly StudyResult[], p: Palette): string[] {
  const tally = studyTally(results);
  const head = `Summary: ${tally.studies} ${tally.studies === 1 ? 'study' : 'studies'}, ${tally.asExpected} as expected, ${tally.departures.length} not as expected`;
  const rows = results.map((r) => {
    const mark = r.asExpected ? p.good('✓') : p.bad('✗');
    const norms = normOutcomes(r)
      .map((o) => `${o.norm} ${outcomePaint(p, o)(o.twoAxis ? jointVerdictText(o.twoAxis) : verdictLabel(o.analysis.verdict))}${o.asExpected ? '' : ` (expected ${o.expectedVerdict})`}`)
      .join(', ');
    return { mark, name: r.study, norms };
  });
  const width = Math.max(0, ...rows.map((r) => r.name.length));
  return [p.bold(head), ...rows.map((r) => `  ${r.mark} ${r.name.padEnd(width)}  ${r.norms}`)];
}

/**
 * One study: its level table and the fitted orders with verdicts and reasons.
 * Several studies: each of those blocks, then a summary across studies (only the summary with `summaryOnly`).
 */
export function formatStudyTable(result: StudyResult | readonly StudyResult[], options: TerminalOptions): string {
  const p = palette(options.color);
  if (!Array.isArray(result)) return studyBlock(result as StudyResult, p).join('\n') + '\n';
  const results = result as readonly StudyResult[];
  const summary = summaryBlock(results, p).join('\n');
  if (options.summaryOnly) return summary + '\n';
  return [...results.map((r) => studyBlock(r, p).join('\n')), summary].join('\n\n') + '\n';
}
