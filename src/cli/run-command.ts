import { executeStudies } from './execute.ts';
import { formatStudyTable } from '../report/terminal.ts';
import { markdownTable, latexTable } from '../report/tables.ts';
import { resultsJson } from '../report/json.ts';
import { writeReports } from '../report/write.ts';
import { runStatus } from '../study/runner.ts';
import { problemLine, useColor } from './output.ts';
import { flawLines } from './flaws.ts';
import { formatQuantityReports } from '../fit/quantity-terminal.ts';

export interface RunFlags {
  levels?: number;
  out: string;
  json?: boolean;
  quiet?: boolean;
  table?: 'md' | 'latex';
  quick?: boolean;
  jobs?: number;
}

/** `rungs run`: exit 0 when every verdict is the one its study expects, 1 otherwise, 2 on bad input. */
export async function runCommand(paths: string[], flags: RunFlags): Promise<number> {
  const color = useColor(process.stdout);
  const { results, problems } = await executeStudies(paths, {
    out: flags.out, levels: flags.levels, quick: flags.quick, jobs: flags.jobs, quiet: flags.quiet || flags.json,
    onResult: (r) => {
      if (flags.json) return;
      if (!flags.quiet) process.stdout.write(formatStudyTable(r, { color }) + '\n');
      if (!flags.quiet && r.quantities?.length) process.stdout.write(formatQuantityReports(r.quantities, { color }) + '\n');
      if (flags.table === 'md') process.stdout.write(markdownTable(r) + '\n');
      if (flags.table === 'latex') process.stdout.write(latexTable(r) + '\n');
    },
    onProblem: (p) => process.stderr.write(problemLine(p.file, p.message) + '\n'),
  });
  let writeProblems: string[];
  try {
    writeProblems = writeReports(flags.out, results, { inputProblems: problems });
  } catch (err) {
    writeProblems = [(err as Error).message];
  }
  for (const w of writeProblems) process.stderr.write(`error: ${w}\n`);
  if (flags.json) process.stdout.write(resultsJson(results) + '\n');
  else if (results.length) {
    process.stdout.write(formatStudyTable(results, { color, summaryOnly: true }) + '\n');
    for (const line of flawLines(results)) process.stdout.write(line + '\n');
  }
  if (problems.length || writeProblems.length) return 2;
  return runStatus(results);
}
