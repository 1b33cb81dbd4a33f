import { beginRun, executeStudies, interruptStatus, type Execution } from './execute.ts';
import { formatStudyTable } from '../report/terminal.ts';
import { markdownTable, latexTable } from '../report/tables.ts';
import { resultForJson } from '../report/json.ts';
import { writeReports } from '../report/write.ts';
import { runStatus } from '../study/runner.ts';
import { problemLine, useColor } from './output.ts';
import { flawLines } from './flaws.ts';
import { formatQuantityReports } from '../fit/quantity-terminal.ts';
import type { SweepVerdict } from '../study/sweep.ts';

export interface RunFlags {
  levels?: number;
  out: string;
  json?: boolean;
  quiet?: boolean;
  table?: 'md' | 'latex';
  quick?: boolean;
  jobs?: number;
  /** Reuse the finished levels of an earlier run into --out whose inputs are unchanged. */
  resume?: boolean;
}

/** `rungs run`: exit 0 when every verdict is the one its study expects, 1 otherwise, 2 on bad input (and when the
 *  output folder is in use by another run); 130 / 143 when SIGINT / SIGTERM stopped it (reports written, incomplete). */
export async function runCommand(paths: string[], flags: RunFlags): Promise<number> {
  const color = useColor(process.stdout);
  const start = beginRun(flags.out, `rungs run ${paths.join(' ')}`.trim(), flags.quiet || flags.json);
  if (!start.ok) {
    process.stderr.write(`error: ${start.message}\n`);
    return 2;
  }
  const { run } = start;
  for (const note of run.notes) process.stderr.write(note + '\n');
  try {
    const execution = await executeStudies(paths, {
      out: flags.out, levels: flags.levels, quick: flags.quick, jobs: flags.jobs, quiet: flags.quiet || flags.json,
      resume: flags.resume, run,
      onResult: (r) => {
        if (flags.json) return;
        if (!flags.quiet) process.stdout.write(formatStudyTable(r, { color }) + '\n');
        if (!flags.quiet && r.quantities?.length) process.stdout.write(formatQuantityReports(r.quantities, { color }) + '\n');
        if (flags.table === 'md') process.stdout.write(markdownTable(r) + '\n');
        if (flags.table === 'latex') process.stdout.write(latexTable(r) + '\n');
      },
      onProblem: (p) => process.stderr.write(problemLine(p.file, p.message) + '\n'),
    });
    const { results, problems, incomplete } = execution;
    const interrupted = interruptionText(execution);
    let writeProblems: string[];
    try {
      writeProblems = writeReports(flags.out, results, { inputProblems: problems, incomplete, interrupted: interrupted ?? undefined });
    } catch (err) {
      writeProblems = [(err as Error).message];
    }
    for (const w of writeProblems) process.stderr.write(`error: ${w}\n`);
    if (flags.json) process.stdout.write(JSON.stringify(results.map((r) => ({ complete: !incomplete.has(r.study), ...resultForJson(r) })), null, 2) + '\n');
    else if (results.length) {
      process.stdout.write(formatStudyTable(results, { color, summaryOnly: true }) + '\n');
      for (const line of flawLines(results)) process.stdout.write(line + '\n');
      for (const v of execution.sweeps) process.stdout.write(sweepLine(v) + '\n');
    }
    if (execution.interrupted) {
      process.stderr.write(`stopped: ${interrupted}\n`);
      return interruptStatus(execution.interrupted);
    }
    if (problems.length || writeProblems.length) return 2;
    return runStatus(results);
  } finally {
    await run.end();
  }
}

/** What a stopped run did and did not do, for the terminal and the HTML report's banner; null for a whole run. */
export function interruptionText(e: Execution): string | null {
  if (!e.interrupted) return null;
  const complete = e.results.filter((r) => !e.incomplete.has(r.study)).map((r) => r.study);
  const partial = e.results.filter((r) => e.incomplete.has(r.study)).map((r) => `${r.study} (${r.levels.length} level${r.levels.length === 1 ? '' : 's'})`);
  const parts = [
    `${e.interrupted} stopped the run at ${new Date().toISOString()}`,
    complete.length ? `complete: ${complete.join(', ')}` : '',
    partial.length ? `incomplete, finished levels only ("complete": false in their JSON): ${partial.join(', ')}` : '',
    e.notRun.length ? `not run: ${e.notRun.join(', ')}` : '',
  ].filter(Boolean);
  return `${parts.join('; ')}. rungs run --resume reuses the finished levels.`;
}

/** One line per sweep: robust or not in its coefficient, and whether that is what the study declares. */
export function sweepLine(v: SweepVerdict): string {
  const worst = v.findings.reduce((a, f) => (f.growth > a.growth ? f : a), v.findings[0]);
  const what = v.robust ? 'robust' : 'NOT robust';
  return `${v.asExpected ? '✓' : '✗'} sweep ${v.group} over ${v.coefficient} = ${v.values.join(', ')}: ${what}` +
    `${worst ? ` (largest growth of the error constant ×${worst.growth.toPrecision(3)}, ${worst.norm})` : ''}` +
    `${v.asExpected ? '' : ` — the study declares it ${v.expected}`}`;
}
