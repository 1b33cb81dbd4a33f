import { beginRun, executeStudies, interruptStatus, type Execution } from './execute.ts';
import { formatStudyTable } from '../report/terminal.ts';
import { markdownTable, latexTable } from '../report/tables.ts';
import { resultForJson } from '../report/json.ts';
import { writeReports } from '../report/write.ts';
import { runStatus } from '../study/runner.ts';
import { problemLine, useColor, writePdfStep } from './output.ts';
import { flawLines } from './flaws.ts';
import { formatQuantityReports } from '../fit/quantity-terminal.ts';
import type { SweepVerdict } from '../study/sweep.ts';
import { writeFileSync } from 'node:fs';
import { findStudyFiles, loadStudy, type LoadedStudy } from '../study/load.ts';
import { OUTCOME, outcomeWord } from './outcome-words.ts';
import { studySelection } from './select.ts';
import { WATCH_LIST_ENV, watchedFiles } from './watch.ts';
import type { InputProblem } from './execute.ts';

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
  /** --study: only studies whose name or file name matches one of these patterns. */
  study?: string[];
  /** Also print the HTML report to <out>/index.pdf with a headless Chromium. */
  pdf?: boolean;
  /** External studies' levels as jobs: --scheduler, --partition, --cancel-jobs (src/cli/jobs-lane.ts). */
  scheduler?: 'slurm' | 'local';
  partition?: string;
  cancelJobs?: boolean;
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
      resume: flags.resume, run, only: flags.study,
      schedulerFlags: { scheduler: flags.scheduler, partition: flags.partition, cancelJobs: flags.cancelJobs },
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
    if (flags.pdf && !(await writePdfStep(flags.out, flags.quiet || flags.json))) writeProblems.push('index.pdf');
    if (flags.json) process.stdout.write(JSON.stringify(results.map((r) => ({ complete: !incomplete.has(r.study), ...resultForJson(r) })), null, 2) + '\n');
    else if (results.length) {
      process.stdout.write(formatStudyTable(results, { color, summaryOnly: true }) + '\n');
      for (const line of flawLines(results)) process.stdout.write(line + '\n');
      for (const v of execution.sweeps) process.stdout.write(sweepLine(v) + '\n');
    }
    if (!flags.json) for (const line of errorLines(problems)) process.stdout.write(line + '\n');
    if (process.env[WATCH_LIST_ENV]) await writeWatchList(process.env[WATCH_LIST_ENV]!, paths, flags.study);
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
    ` — ${outcomeWord(v.asExpected)}${v.asExpected ? '' : `: the study declares it ${v.expected}`}`;
}

/** The summary's last lines: which studies ended in an error (each message was printed when it happened), so that
 *  a study that could not run is not missed among the ones that did. */
export function errorLines(problems: readonly InputProblem[]): string[] {
  const seen = new Set<string>();
  const lines: string[] = [];
  for (const p of problems) {
    if (!p.study && !p.file) continue;
    const what = p.study ? `${p.study}${p.file ? `  [${p.file}]` : ''}` : p.file;
    if (seen.has(what)) continue;
    seen.add(what);
    lines.push(`  ✗ ${what}  ${OUTCOME.error}`);
  }
  if (!lines.length) return [];
  return [`${OUTCOME.error}: ${lines.length} ${lines.length === 1 ? 'study or input' : 'studies or inputs'} could not be run (messages above):`, ...lines];
}

/** For `rungs run --watch` (watch.ts): the files this run's studies depend on, written where the watcher asked. */
async function writeWatchList(target: string, paths: string[], patterns: string[] | undefined): Promise<void> {
  const selection = studySelection(patterns);
  const loaded: LoadedStudy[] = [];
  let files: string[] = [];
  try { files = findStudyFiles(paths); } catch { /* reported by the run */ }
  for (const file of files) {
    try {
      const l = await loadStudy(file); // already imported by the run: no second import
      if (selection.matches(file, l.declaration.name)) loaded.push(l);
    } catch { /* reported by the run; the watcher watches every study file under the paths */ }
  }
  try { writeFileSync(target, JSON.stringify(watchedFiles(loaded))); } catch { /* the watcher then watches the study files only */ }
}
