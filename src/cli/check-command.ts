import { existsSync } from 'node:fs';
import { beginRun, executeStudies, interruptStatus } from './execute.ts';
import type { SchedulerFlags } from './jobs-lane.ts';
import { interruptionText } from './run-command.ts';
import { formatStudyTable } from '../report/terminal.ts';
import { writeFileAtomic, writeReports } from '../report/write.ts';
import { junitXml } from '../report/junit.ts';
import { compareAll, makeBaseline, readBaseline, writeBaseline, type Baseline, type BaselineFinding } from '../gate/baseline.ts';
import { studyFacts } from '../gate/facts.ts';
import { failureLines, gateStatus, statusLine, type GateOutcome, type RunError } from '../gate/status.ts';
import { RungsInputError } from '../errors.ts';
import { problemLine, useColor } from './output.ts';

/** With --scheduler, --partition and --cancel-jobs as for `rungs run` (external studies' levels as jobs). */
export interface CheckFlags extends SchedulerFlags {
  out: string;
  baseline?: string;
  updateBaseline?: boolean;
  junit?: string;
  quick?: boolean;
  jobs?: number;
  levels?: number;
  quiet?: boolean;
  /** --study: only studies whose name or file name matches one of these patterns. */
  study?: string[];
}

const say = (line: string) => process.stdout.write(line + '\n');
const complain = (line: string) => process.stderr.write(line + '\n');

/**
 * `rungs check`: the nightly gate. Runs the studies, compares fitted orders with the expected ones and, with a
 * baseline, each level's errors within a relative tolerance. Exit 0 pass, 1 departure or regression, 2 bad input
 * (a study, the baseline or the reports); the JUnit file, when asked for, is written from the same outcome, so its
 * errors and failures always say what the exit status says.
 */
export async function checkCommand(paths: string[], flags: CheckFlags): Promise<number> {
  const runErrors: RunError[] = [];
  const runError = (name: string, message: string) => { runErrors.push({ name, message }); complain(`error: ${message}`); };

  if (flags.updateBaseline && !flags.baseline) {
    runError('command line', '--update-baseline needs --baseline FILE, the file to write');
    return finish({ results: [], problems: [], findings: [], runErrors }, flags, runError);
  }
  let baseline: Baseline | undefined;
  // When recording, an absent file is the normal start and an empty one may be filled; when comparing, neither is.
  if (flags.baseline && !(flags.updateBaseline && !existsSync(flags.baseline))) {
    try { baseline = readBaseline(flags.baseline, { allowEmpty: flags.updateBaseline }); } catch (err) {
      if (!(err instanceof RungsInputError)) throw err;
      runError('baseline file', err.message);
    }
  }
  // The output folder's lock (another run into it: bad input, exit 2) and SIGINT / SIGTERM (exit 130 / 143, the
  // reports of what finished written and marked incomplete, no baseline written).
  const start = beginRun(flags.out, `rungs check ${paths.join(' ')}`.trim(), true);
  if (!start.ok) {
    runError('output folder', start.message);
    return finish({ results: [], problems: [], findings: [], runErrors }, flags, runError);
  }
  const { run } = start;
  try {
    for (const note of run.notes) complain(note);
    return await checkRun(paths, flags, runErrors, runError, baseline, run);
  } finally {
    await run.end();
  }
}

async function checkRun(
  paths: string[], flags: CheckFlags, runErrors: RunError[], runError: (name: string, message: string) => void,
  baseline: Baseline | undefined, run: Parameters<typeof executeStudies>[1]['run'],
): Promise<number> {
  const color = useColor(process.stdout);
  const execution = await executeStudies(paths, {
    out: flags.out, quick: flags.quick, levels: flags.levels, jobs: flags.jobs, quiet: true, run, only: flags.study,
    schedulerFlags: { scheduler: flags.scheduler, partition: flags.partition, cancelJobs: flags.cancelJobs },
    onProblem: (p) => complain(problemLine(p.file, p.message)),
  });
  const { results, problems, incomplete } = execution;
  const interrupted = interruptionText(execution);
  let writeProblems: string[];
  try { writeProblems = writeReports(flags.out, results, { inputProblems: problems, incomplete, interrupted: interrupted ?? undefined }); } catch (err) { writeProblems = [(err as Error).message]; }
  for (const w of writeProblems) runError('reports', w);
  if (execution.interrupted) {
    // A gate that did not run to its end decides nothing: no baseline is written, the JUnit file says why.
    runError('interrupted', `stopped: ${interrupted}`);
    return finish({ results, problems, findings: [], runErrors }, flags, runError, interruptStatus(execution.interrupted));
  }

  if (!flags.quiet && results.length) say(formatStudyTable(results, { color, summaryOnly: true }));
  for (const line of failureLines(results)) say(line);

  const facts = flags.baseline ? await studyFacts(results) : {};
  let findings: BaselineFinding[] = [];
  if (baseline && !flags.updateBaseline) {
    // A study that could not run is an error already; "in the baseline but not run" would only repeat it.
    const failed = new Set(problems.map((p) => p.study));
    // A run shortened on purpose (--quick, --levels N) is compared on the levels it ran, and says so.
    const partial = flags.quick ? '--quick' : flags.levels !== undefined ? `--levels ${flags.levels}` : false;
    findings = compareAll(results, baseline, { partial, facts })
      .filter((f) => !(f.kind === 'study-not-run' && failed.has(f.study)));
    printFindings(findings, flags);
  }
  if (flags.updateBaseline && flags.baseline) {
    try {
      writeBaseline(flags.baseline, makeBaseline(results, baseline, facts));
      say(`baseline written: ${flags.baseline} (${results.length} stud${results.length === 1 ? 'y' : 'ies'})`);
      if (flags.quick || flags.levels) {
        say(`warning: recorded from ${flags.quick ? 'the quick ladders (--quick)' : `the first ${flags.levels} levels (--levels)`}: a full run will find levels missing from this baseline`);
      }
    } catch (err) {
      runError('baseline file', (err as Error).message);
    }
  }
  return finish({ results, problems, findings, runErrors }, flags, runError);
}

/** Writes the JUnit file (when asked for) and the status line from one outcome, and returns the exit status. */
function finish(outcome: GateOutcome, flags: CheckFlags, runError: (name: string, message: string) => void, stoppedStatus?: number): number {
  if (flags.junit) {
    const xml = junitXml(outcome.results, { suiteName: 'rungs', inputErrors: outcome.problems, baseline: outcome.findings, runErrors: outcome.runErrors });
    try {
      writeFileAtomic(flags.junit, xml);
    } catch (err) {
      // The file cannot say so itself; the status and this line must.
      runError('junit', `cannot write the JUnit file ${flags.junit}: ${(err as Error).message}`);
    }
  }
  if (stoppedStatus !== undefined) {
    say(`check stopped (exit ${stoppedStatus}): interrupted before its end; nothing was compared or recorded`);
    return stoppedStatus;
  }
  say(statusLine(outcome));
  return gateStatus(outcome);
}

/** Errors on standard error, failures, warnings and (unless --quiet) notes on standard output, then one summary. */
function printFindings(findings: readonly BaselineFinding[], flags: CheckFlags): void {
  for (const f of findings) {
    if (f.severity === 'error') complain(`error: ${flags.baseline}: ${f.line}`);
    else if (f.severity === 'failure') say(`${f.kind === 'regression' ? 'regression' : 'failure'}: ${f.line}`);
    else if (f.severity === 'warning') say(`warning: ${f.line}`);
    else if (!flags.quiet) say(`note: ${f.line}`);
  }
  const errors = findings.filter((f) => f.severity === 'error').length;
  const failures = findings.filter((f) => f.severity === 'failure').length;
  const partial = findings.filter((f) => f.kind === 'partial');
  const spans = new Set(partial.map((f) => `${f.level} of ${f.baseline}`));
  const by = flags.quick ? '--quick' : `--levels ${flags.levels}`;
  const quick = partial.length === 0 ? ''
    : spans.size === 1 ? `; ${by}: the first ${[...spans][0]} recorded levels compared`
      : `; ${by}: fewer levels than recorded compared in ${partial.length} stud${partial.length === 1 ? 'y' : 'ies'} (see the notes)`;
  if (errors === 0 && failures === 0) say(`baseline: no regressions${quick}`);
  else {
    const parts = [errors ? `${errors} error${errors > 1 ? 's' : ''} (the baseline cannot vouch for the run)` : '', failures ? `${failures} failure${failures > 1 ? 's' : ''}` : ''];
    say(`baseline: ${parts.filter(Boolean).join(', ')}${quick}`);
  }
}
