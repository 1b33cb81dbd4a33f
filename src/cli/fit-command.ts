import { fitTableFile } from '../fit/fit-table.ts';
import { formatQuantityReports } from '../fit/quantity-terminal.ts';
import { formatStudyTable } from '../report/terminal.ts';
import { markdownTable, latexTable } from '../report/tables.ts';
import { resultsJson } from '../report/json.ts';
import { writeReports } from '../report/write.ts';
import { runStatus } from '../study/runner.ts';
import { RungsInputError } from '../errors.ts';
import { useColor } from './output.ts';
import { reportNamesAvoiding } from '../fit/output-names.ts';

export interface FitFlags {
  errors?: string;
  quantity?: string[];
  uncertainty?: string;
  expect?: string;
  by?: 'h' | 'dofs';
  hColumn?: string;
  dofsColumn?: string;
  dim?: number;
  tolerance?: number;
  fitWindow?: number;
  out: string;
  json?: boolean;
  /** Print only the verdict line (as `run --quiet`), and the quantities' one-line results. */
  quiet?: boolean;
  table?: 'md' | 'latex';
}

const list = (v: string | undefined) => v?.split(',').map((s) => s.trim()).filter(Boolean);

/** `rungs fit TABLE.csv`: the analysis of `run` for errors measured by any code, and the GCI of its quantities. */
export async function fitCommand(table: string, flags: FitFlags): Promise<number> {
  const color = useColor(process.stdout);
  try {
    const { result, quantities } = fitTableFile(table, {
      errors: list(flags.errors), quantities: flags.quantity?.flatMap((q) => list(q) ?? []),
      expect: flags.expect, by: flags.by, hColumn: flags.hColumn, dofsColumn: flags.dofsColumn, dim: flags.dim,
      tolerance: flags.tolerance, fitWindow: flags.fitWindow, procedures: flags.uncertainty,
    });
    result.quantities = quantities.length ? quantities : undefined;
    // The reports never replace the table they were read from (--out pointing at its folder): the study is renamed,
    // or, when the table has the name of a run-wide report (summary.csv, index.html), the fit is refused.
    const naming = reportNamesAvoiding(flags.out, result.study, [table]);
    if (naming.renamed) {
      result.study = naming.study;
      process.stderr.write(`note: ${naming.renamed}\n`);
    }
    if (!flags.expect && result.analyses.every((a) => a.expected === null)) {
      // Nothing to judge against: the orders are reported, and the run does not fail.
      result.asExpected = true;
      result.warnings.push('no --expect given: fitted orders are reported, not judged');
    }
    if (flags.json) process.stdout.write(resultsJson([result]) + '\n');
    else {
      if (result.analyses.length) process.stdout.write(formatStudyTable(flags.quiet ? [result] : result, { color, summaryOnly: flags.quiet }) + '\n');
      if (quantities.length && !flags.quiet) process.stdout.write(formatQuantityReports(quantities, { color }) + '\n');
      if (flags.table === 'md') process.stdout.write(markdownTable(result) + '\n');
      if (flags.table === 'latex') process.stdout.write(latexTable(result) + '\n');
    }
    let failed: string[];
    try { failed = writeReports(flags.out, [result]); } catch (err) { failed = [(err as Error).message]; }
    for (const f of failed) process.stderr.write(`error: ${f}\n`);
    if (failed.length) return 2;
    return result.analyses.length ? runStatus([result]) : 0;
  } catch (err) {
    if (err instanceof RungsInputError) { process.stderr.write(`error: ${err.message}\n`); return 2; }
    throw err;
  }
}
