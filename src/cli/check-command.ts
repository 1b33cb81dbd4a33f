import { existsSync, writeFileSync } from 'node:fs';
import { executeStudies } from './execute.ts';
import { formatStudyTable } from '../report/terminal.ts';
import { writeReports } from '../report/write.ts';
import { junitXml } from '../report/junit.ts';
import { compareAll, makeBaseline, readBaseline, writeBaseline, type Baseline } from '../gate/baseline.ts';
import { runStatus } from '../study/runner.ts';
import { RungsInputError } from '../errors.ts';
import { problemLine, useColor } from './output.ts';

export interface CheckFlags {
  out: string;
  baseline?: string;
  updateBaseline?: boolean;
  junit?: string;
  quick?: boolean;
  jobs?: number;
  levels?: number;
  quiet?: boolean;
}

/** `rungs check`: the nightly gate. Runs the studies, compares fitted orders with the expected ones and, with a
 *  baseline, each level's errors within a relative tolerance. Exit 0 pass, 1 departure or regression, 2 bad input. */
export async function checkCommand(paths: string[], flags: CheckFlags): Promise<number> {
  const color = useColor(process.stdout);
  const errors: string[] = [];
  let baseline: Baseline | undefined;
  if (flags.baseline && !(flags.updateBaseline && !existsSync(flags.baseline))) {
    try { baseline = readBaseline(flags.baseline); } catch (err) {
      if (!(err instanceof RungsInputError)) throw err;
      errors.push(err.message);
      process.stderr.write(`error: ${err.message}\n`);
    }
  }
  if (flags.updateBaseline && !flags.baseline) {
    process.stderr.write('error: --update-baseline needs --baseline FILE, the file to write\n');
    return 2;
  }
  const { results, problems } = await executeStudies(paths, {
    out: flags.out, quick: flags.quick, levels: flags.levels, jobs: flags.jobs, quiet: true,
    onProblem: (p) => process.stderr.write(problemLine(p.file, p.message) + '\n'),
  });
  let writeProblems: string[];
  try { writeProblems = writeReports(flags.out, results, { inputProblems: problems }); } catch (err) { writeProblems = [(err as Error).message]; }
  for (const w of writeProblems) process.stderr.write(`error: ${w}\n`);

  if (!flags.quiet && results.length) process.stdout.write(formatStudyTable(results, { color, summaryOnly: true }) + '\n');
  let regressions = 0;
  if (baseline && !flags.updateBaseline) {
    const findings = compareAll(results, baseline);
    for (const f of findings) {
      if (f.kind === 'ladder-mismatch') {
        // A baseline recorded on another ladder cannot be compared: that is bad input, not a regression.
        errors.push(f.line);
        process.stderr.write(`error: ${flags.baseline}: ${f.line}\n`);
      } else if (f.severity === 'failure') { regressions++; process.stdout.write(`regression: ${f.line}\n`); }
      else if (!flags.quiet) process.stdout.write(`note: ${f.line}\n`);
    }
    process.stdout.write(regressions ? `${regressions} baseline failure${regressions > 1 ? 's' : ''}\n` : 'baseline: no regressions\n');
  }
  if (flags.updateBaseline && flags.baseline) {
    try {
      writeBaseline(flags.baseline, makeBaseline(results, baseline));
      process.stdout.write(`baseline written: ${flags.baseline} (${results.length} stud${results.length === 1 ? 'y' : 'ies'})\n`);
    } catch (err) {
      errors.push((err as Error).message);
      process.stderr.write(`error: ${(err as Error).message}\n`);
    }
  }
  if (flags.junit) {
    try {
      writeFileSync(flags.junit, junitXml(results, { suiteName: 'rungs', inputErrors: problems }));
    } catch (err) {
      errors.push(`cannot write the JUnit file ${flags.junit}: ${(err as Error).message}`);
      process.stderr.write(`error: cannot write the JUnit file ${flags.junit}: ${(err as Error).message}\n`);
    }
  }
  if (errors.length || problems.length || writeProblems.length) return 2;
  return regressions > 0 ? 1 : runStatus(results);
}
