#!/usr/bin/env node
// Only commander and what the help text needs are loaded up front: each command's code (and with it mathjs, the
// numerics, the reports and the worker pool) is imported when that command runs, so `--version` and `--help` start as
// fast as Node does (test/bench/startup.bench.ts).
import { Command, InvalidArgumentError, Option } from 'commander';
import { LANGUAGES } from '../codegen/languages.ts';
import { packageVersions } from '../study/versions.ts';
import { warmStudyCompiler } from '../study/study-compiler.ts';

/** --jobs when not given: the cores this process may use (the pool's own default, loaded only for a run). */
async function withJobs<T extends { jobs?: number }>(o: T): Promise<T> {
  if (o.jobs === undefined) o.jobs = (await import('../parallel/pool.ts')).defaultJobs();
  return o;
}

function jobCount(v: string): number {
  const n = Number(v);
  if (!Number.isInteger(n) || n < 1) throw new InvalidArgumentError('give a whole number of jobs, at least 1');
  return n;
}

function positiveInt(v: string): number {
  const n = Number(v);
  if (!Number.isInteger(n) || n < 2) throw new InvalidArgumentError('give a whole number of levels, at least 2');
  return n;
}

/** --study, repeatable and comma-separated: each value adds patterns. */
function studyPatterns(v: string, previous: string[] = []): string[] {
  return [...previous, ...v.split(',').map((p) => p.trim()).filter(Boolean)];
}
const STUDY_HELP = 'only the studies whose name or file name (without .study.ts) matches; * and ? as in the shell, ' +
  'comma-separated or repeated (e.g. --study \'tile-*\' --study rod-p1)';

// The scheduler options, the same for run and check (src/cli/jobs-lane.ts SchedulerFlags).
const schedulerOption = () => new Option('--scheduler <name>', "run external studies' levels as jobs: slurm (sbatch) or local processes; resources from each study's scheduler field").choices(['slurm', 'local']);
const PARTITION_HELP = 'with a scheduler: the partition the jobs go to';
const CANCEL_JOBS_HELP = 'with a scheduler: cancel the jobs when the run is stopped (default: they run on, and --resume collects them)';

const program = new Command();
program
  .name('rungs')
  .version(packageVersions().rungs, '-V, --version', 'print the version of rungs')
  .description('Convergence studies for finite element discretizations: run a ladder of refined meshes, measure the errors, fit the observed orders and give a verdict with reasons.')
  .showHelpAfterError()
  .exitOverride((err) => { process.exit(err.exitCode === 0 ? 0 : 2); });

program
  .command('run')
  .description('run studies (files or folders of *.study.ts) and write their reports')
  .argument('[paths...]', 'study files or folders', ['studies'])
  .option('--levels <n>', 'run only the first n levels of each ladder', positiveInt)
  .option('--out <dir>', 'folder for the reports', 'reports')
  .option('--jobs <n>', 'levels run in parallel on worker threads (default: the number of cores)', jobCount)
  .option('--json', 'print the whole result as JSON on standard output instead of tables')
  .option('--resume', 'reuse the finished levels of an earlier run into --out whose inputs are unchanged; compute the rest')
  .option('--quiet', 'print only the verdict lines')
  .option('--study <patterns>', STUDY_HELP, studyPatterns)
  .option('--watch', 'run again whenever a study file, or a file its external command names, changes (Ctrl-C to stop)')
  .option('--pdf', 'also print the HTML report to <out>/index.pdf (needs Chromium or Chrome; RUNGS_CHROMIUM names one)')
  .addOption(new Option('--table <format>', 'also print a report table').choices(['md', 'latex']))
  .addOption(schedulerOption())
  .option('--partition <name>', PARTITION_HELP)
  .option('--cancel-jobs', CANCEL_JOBS_HELP)
  .action(async (paths: string[], o) => {
    if (o.watch) {
      const { watchRuns } = await import('./watch.ts');
      process.exitCode = await watchRuns({ args: process.argv.slice(process.argv.indexOf('run') + 1), paths, quiet: o.quiet });
      return;
    }
    warmStudyCompiler();
    const { runCommand } = await import('./run-command.ts');
    process.exitCode = await runCommand(paths, await withJobs(o));
  });

program
  .command('check')
  .description('the gate for CI: run studies, compare orders with the expected ones and errors with a baseline')
  .argument('[paths...]', 'study files or folders', ['studies'])
  .option('--baseline <file>', 'baseline file (plain JSON) to compare each level\'s errors with')
  .option('--update-baseline', 'write the baseline file from this run instead of comparing')
  .option('--junit <file>', 'write JUnit XML: one test case per study and norm')
  .option('--quick', 'run each study\'s short ladder (ladder.quick, default its 3 coarsest levels; a two-axis design: every step count on its coarsest meshes)')
  .option('--levels <n>', 'run only the first n levels of each ladder', positiveInt)
  .option('--out <dir>', 'folder for the reports', 'reports')
  .option('--jobs <n>', 'levels run in parallel on worker threads (default: the number of cores)', jobCount)
  .option('--quiet', 'print only failures')
  .option('--study <patterns>', STUDY_HELP, studyPatterns)
  .option('--pdf', 'also print the HTML report to <out>/index.pdf (needs Chromium or Chrome; RUNGS_CHROMIUM names one)')
  .addOption(schedulerOption())
  .option('--partition <name>', PARTITION_HELP)
  .option('--cancel-jobs', CANCEL_JOBS_HELP)
  .action(async (paths: string[], o) => {
    warmStudyCompiler();
    const { checkCommand } = await import('./check-command.ts');
    process.exitCode = await checkCommand(paths, await withJobs(o));
    if (o.pdf && !(await (await import('./output.ts')).writePdfStep(o.out, o.quiet))) process.exitCode = 2;
  });

program
  .command('fit')
  .description('analyse a table of errors or quantities from any code: rates, fitted orders, verdicts, GCI')
  .argument('<table>', 'CSV file with a header row: h or dofs, and error or quantity columns')
  .option('--errors <names>', 'error columns, comma-separated (default: columns ending in _error, else every numeric column)')
  .option('--quantity <names...>', 'quantity columns for Richardson extrapolation and the GCI')
  .option('--uncertainty <procedures>', 'procedures for the quantities, comma-separated: gci, least-squares (4+ levels), mixed-order (3+ levels); default: every one the levels allow')
  .option('--expect <orders>', 'expected order for every error column (e.g. 2) or per column (L2=2,H1semi=1)')
  .addOption(new Option('--by <size>', 'fit against h or dofs').choices(['h', 'dofs']))
  .option('--h-column <name>', 'column holding h (default h)')
  .option('--dofs-column <name>', 'column holding the number of unknowns (default dofs)')
  .option('--dim <d>', 'spatial dimension (needed to fit in dofs)', (v) => {
    const n = Number(v);
    if (![1, 2, 3].includes(n)) throw new InvalidArgumentError('give 1, 2 or 3');
    return n;
  })
  .option('--tolerance <t>', 'allowed |fitted − expected| (default 0.1)', Number)
  .option('--fit-window <k>', 'finest levels in the fit (default 3)', positiveInt)
  .option('--out <dir>', 'folder for the reports', 'reports')
  .option('--json', 'print the result as JSON')
  .option('--quiet', 'print only the verdict line (the reports are still written)')
  .addOption(new Option('--table <format>', 'also print a report table').choices(['md', 'latex']))
  .action(async (table: string, o) => {
    const { fitCommand } = await import('./fit-command.ts');
    process.exitCode = await fitCommand(table, o);
  });

program
  .command('data')
  .description('hand a study\'s manufactured data to your solver: exact solution, gradient, sources, boundary data and coefficients as code (with a self-test per language) and problem.json; or their values at your points')
  .argument('[paths...]', 'study files or folders', ['studies'])
  .option('--lang <names>', `languages, comma-separated (default all: ${LANGUAGES.join(', ')})`)
  .option('--out <dir>', 'folder: the files go to <dir>/<study>/data', 'reports')
  .option('--at <points.csv>', 'print the values at these points instead (CSV with columns x, y, z, t, nx, ny, nz; one study)')
  .option('--values <file>', 'with --at: write the values to this CSV file instead of standard output')
  .option('--quiet', 'do not print the formulas')
  .option('--study <patterns>', STUDY_HELP, studyPatterns)
  .action(async (paths: string[], o) => {
    warmStudyCompiler();
    const { dataCommand } = await import('./data-command.ts');
    process.exitCode = await dataCommand(paths, o);
  });

program
  .command('list')
  .description('list the studies found, with their ladders and expected orders')
  .argument('[paths...]', 'study files or folders', ['studies'])
  .option('--quiet', 'print only the study names')
  .option('--study <patterns>', STUDY_HELP, studyPatterns)
  .action(async (paths: string[], o) => {
    warmStudyCompiler();
    const { listCommand } = await import('./list-command.ts');
    process.exitCode = await listCommand(paths, o);
  });

// Inside a level's job (scheduler.errors: 'job'): measure the errors of the solution where it was written.
program
  .command('level-errors', { hidden: true })
  .argument('<study-file>')
  .requiredOption('--study <name>')
  .requiredOption('--level <k>', '1-based level', Number)
  .requiredOption('--out <dir>')
  .requiredOption('--folder <dir>')
  .option('--norms <names>', 'comma-separated', '')
  .requiredOption('--total <levels>', 'levels of the study', Number)
  .action(async (file: string, o) => {
    warmStudyCompiler();
    const { levelErrorsCommand } = await import('./level-errors-command.ts');
    process.exitCode = await levelErrorsCommand(file, o);
  });

program
  .command('init')
  .description('scaffold a project for rungs: a first study, a tsconfig.json if there is none, and a CI workflow running the gate nightly; nothing existing is overwritten')
  .argument('[dir]', 'the project folder', '.')
  .option('--quiet', 'print nothing but errors')
  .action(async (dir: string, o) => {
    const { initCommand } = await import('./init-command.ts');
    process.exitCode = await initCommand(dir, o);
  });

await program.parseAsync(process.argv);
