// The package as a user gets it: `npm pack` of this checkout, installed into a separate temporary project, whose own
// ordinary tsconfig type-checks study files importing 'rungs' and whose `npx rungs` runs them. Everything is written
// under a temporary folder: the checkout is copied there before packing, since packing builds dist/.
import { describe, expect, it, beforeAll } from 'vitest';
import { spawnSync, type SpawnSyncReturns } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const REPO = resolve('.');
const TSC = join(REPO, 'node_modules', 'typescript', 'bin', 'tsc');
const NPM = process.platform === 'win32' ? 'npm.cmd' : 'npm';

function run(cmd: string, args: string[], cwd: string, env: Record<string, string> = {}): SpawnSyncReturns<string> {
  return spawnSync(cmd, args, { cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', CI: 'true', ...env } });
}

function ok(r: SpawnSyncReturns<string>, what: string): string {
  if (r.status !== 0) throw new Error(`${what} failed (status ${r.status}):\n${r.stdout}\n${r.stderr}`);
  return r.stdout;
}

/** Packs a copy of the checkout (the files `npm pack` reads, with this checkout's node_modules for the build). */
function pack(root: string): string {
  const copy = join(root, 'checkout');
  mkdirSync(copy);
  for (const f of ['package.json', 'README.md', 'tsconfig.json', 'tsconfig.build.json', 'bin', 'src', 'scripts']) {
    if (existsSync(join(REPO, f))) cpSync(join(REPO, f), join(copy, f), { recursive: true });
  }
  symlinkSync(join(REPO, 'node_modules'), join(copy, 'node_modules'), 'dir');
  const out = join(root, 'packed');
  mkdirSync(out);
  // `npm pack` runs the prepare script, which builds dist/ in the copy.
  ok(run(NPM, ['pack', '--pack-destination', out, '--silent'], copy), 'npm pack');
  const tgz = readdirSync(out).filter((f) => f.endsWith('.tgz'));
  expect(tgz).toHaveLength(1);
  return join(out, tgz[0]);
}

/**
 * Installs the tarball into the project with npm: from npm's cache only, else letting npm fetch what the cache lacks.
 * Where neither works (no registry, an empty cache) the tarball is unpacked into node_modules/rungs and its
 * dependencies linked from this checkout's node_modules, which puts the same files in the same places.
 */
function install(project: string, tgz: string): string {
  const args = ['install', tgz, '--no-audit', '--no-fund', '--loglevel=error'];
  for (const mode of ['--offline', '--prefer-offline']) {
    const r = run(NPM, [...args, mode], project);
    if (r.status === 0) return `npm install ${mode}`;
  }
  const target = join(project, 'node_modules', 'rungs');
  mkdirSync(target, { recursive: true });
  ok(run('tar', ['-xzf', tgz, '-C', target, '--strip-components=1'], project), 'tar');
  const deps = Object.keys((JSON.parse(readFileSync(join(target, 'package.json'), 'utf8')) as { dependencies: Record<string, string> }).dependencies);
  for (const d of deps) symlinkSync(join(REPO, 'node_modules', d), join(project, 'node_modules', d), 'dir');
  mkdirSync(join(project, 'node_modules', '.bin'), { recursive: true });
  symlinkSync(join(target, 'bin', 'rungs.mjs'), join(project, 'node_modules', '.bin', 'rungs'));
  return 'unpacked, dependencies linked (npm could not install without a registry)';
}

// A user's custom discretization, written against the public types only (LevelContext, the building blocks).
const CUSTOM_STUDY = `import { defineStudy, rectangle, custom, solveLagrange, type LevelContext, type StudyDeclaration } from 'rungs';

const study: StudyDeclaration = defineStudy({
  name: 'rod-section-own',
  description: 'Kiln rod cross-section, P1 through the building blocks.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(2*x) * exp(-y) + x*y',
  boundary: { dirichlet: ['left', 'right', 'bottom', 'top'] },
  discretization: custom({
    label: 'own P1',
    degree: 1,
    solve(level: LevelContext) {
      const sol = solveLagrange({ mesh: level.mesh, degree: 1, coefficients: level.coefficients, boundary: level.boundary, solver: level.solver });
      return { field: sol.field, solver: sol.solver };
    },
  }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
export default study;
`;

// Which copy of rungs a study gets for 'rungs', written where the test can read it: it must be the running CLI's own.
const WHERE_STUDY = `import { writeFileSync } from 'node:fs';
import { defineStudy, interval, lagrange } from 'rungs';

writeFileSync(process.env.RUNGS_WHERE_FILE!, import.meta.resolve('rungs'));
export default defineStudy({
  name: 'rod-where',
  description: 'Kiln rod, P1, reports which rungs it was given.',
  domain: interval(0, 1),
  exact: 'sin(3*x) + x',
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
});
`;

// A custom discretization that asks the library for an element it does not have: the library's RungsInputError must
// reach the command as one of its own (a clean message naming the study), which holds only when the study and the
// command share one copy of rungs.
const BAD_ELEMENT_STUDY = `import { defineStudy, rectangle, custom, solveLagrange, type LevelContext } from 'rungs';
export default defineStudy({
  name: 'rod-bad-element', description: 'Kiln rod section asking for a P9 element.',
  domain: rectangle([0, 1], [0, 1]), exact: 'x*y', boundary: { dirichlet: ['left', 'right', 'bottom', 'top'] },
  discretization: custom({
    label: 'P9', degree: 9,
    solve(level: LevelContext) {
      const sol = solveLagrange({ mesh: level.mesh, degree: 9, coefficients: level.coefficients, boundary: level.boundary, solver: level.solver });
      return { field: sol.field, solver: sol.solver };
    },
  }),
  ladder: { n: [2, 4] }, norms: ['L2'],
});
`;

// A study that must not type-check: the ladder's sizes are numbers.
const WRONG_STUDY = `import { defineStudy, interval, lagrange } from 'rungs';
export default defineStudy({
  name: 'rod-wrong', description: 'wrong on purpose', domain: interval(0, 1), exact: 'x',
  discretization: lagrange({ degree: 1 }), ladder: { n: ['eight', 'sixteen'] }, norms: ['L2'],
});
`;

// An external study whose levels run as cluster jobs, its scheduler settings written against the public types.
const JOBS_STUDY = `import { defineStudy, interval, external, type PerLevel, type SchedulerSettings } from 'rungs';

const tasks: PerLevel<number> = { finest: 64, scale: 'dofs', min: 1 };
const cluster: SchedulerSettings = {
  kind: 'slurm', partition: 'compute', tasks, memory: ['2G', '2G', '8G', 4096], minutes: [5, 5, 10, 30],
  sbatch: ['--account=kiln'], errors: 'job', onStop: 'keep',
};
export default defineStudy({
  name: 'rod-jobs', description: 'Kiln rod, levels as Slurm jobs.', domain: interval(0, 1), exact: 'sin(x) + x',
  discretization: external({ command: 'mpirun -n {tasks} ./rod-solver --n {n} --out {out}', output: 'errors', degree: 1, scheduler: cluster }),
  ladder: { n: [4, 8, 16, 32] }, norms: ['L2', 'H1semi'],
});
`;

// Scheduler settings that must not type-check: a scheduler rungs does not have, and a scale that is not one.
const WRONG_JOBS_STUDY = `import { defineStudy, interval, external, type SchedulerSettings } from 'rungs';
const cluster: SchedulerSettings = { kind: 'pbs' };
export default defineStudy({
  name: 'rod-jobs-wrong', description: 'wrong on purpose', domain: interval(0, 1), exact: 'x',
  discretization: external({ command: './rod', output: 'errors', scheduler: { kind: 'local', tasks: { finest: 4, scale: 'cells' } } }),
  ladder: { n: [4, 8] }, norms: ['L2'],
});
export { cluster };
`;

// The same study run serially and on two worker threads of the installed package (the compiled worker entry).
const PARALLEL_SCRIPT = `import { register } from 'tsx/esm/api';
const { executeStudies } = await import('./node_modules/rungs/dist/cli/execute.js');
register();
const [study, a, b] = process.argv.slice(2);
const serial = await executeStudies([study], { out: a, quiet: true, jobs: 1 });
const parallel = await executeStudies([study], { out: b, quiet: true, jobs: 2, parallelMinDofs: 0 });
const errors = (x) => x.results.map((r) => r.levels.map((l) => l.errors));
console.log(JSON.stringify({ serial: errors(serial), parallel: errors(parallel), problems: [...serial.problems, ...parallel.problems] }));
`;

/** The command runs as one file (dist/rungs-cli.mjs), which answers a study's 'rungs' with the library it holds
 *  (src/study/library.ts): a data: module re-exporting it, so the study shares the running rungs. */
function expectRunningLibrary(resolved: string): void {
  const prefix = 'data:text/javascript;base64,';
  expect(resolved.startsWith(prefix)).toBe(true);
  const text = Buffer.from(resolved.slice(prefix.length), 'base64').toString('utf8');
  expect(text).toContain('globalThis[Symbol.for("rungs.library")]');
  expect(text).toMatch(/export const \{[^}]*\bdefineStudy\b[^}]*\} = library;/);
}

// The cell team's worker as the package starts it (dist/rungs-worker.mjs), asked for a task whose module file is gone:
// only the copy the one-file worker holds can compute it. Prints whether a worker did, and whether its pixels are
// those located in this thread.
const TEAM_SCRIPT = `const dist = new URL('./node_modules/rungs/dist/', import.meta.url);
const { cellTeam, setWorkersFirst } = await import(new URL('fem/team/team.js', dist).href);
const { sharedMesh } = await import(new URL('fem/team/mesh.js', dist).href);
const { rectangleMesh } = await import(new URL('mesh/rectangle.js', dist).href);
const { pixelOwners, pixelCount } = await import(new URL('mesh/raster.js', dist).href);
setWorkersFirst(true);
const mesh = rectangleMesh({ x: [0, 2], y: [0, 1], nx: 60, ny: 30, cells: 'triangles' });
const owner = new Int32Array(new SharedArrayBuffer(4 * pixelCount(mesh)));
const job = cellTeam().background(new URL('study/pixel-task.js', dist).href, { mesh: sharedMesh(mesh), owner });
const byWorker = job.settle();
const here = pixelOwners(rectangleMesh({ x: [0, 2], y: [0, 1], nx: 60, ny: 30, cells: 'triangles' }));
console.log(JSON.stringify({ byWorker, same: here.length === owner.length && here.every((c, i) => c === owner[i]), located: here.some((c) => c >= 0) }));
cellTeam().close();
`;

describe('the packed package installed into another project', () => {
  let root: string;
  let project: string;
  let tgz: string;
  let how: string;

  beforeAll(() => {
    root = mkdtempSync(join(tmpdir(), 'rungs-package-'));
    tgz = pack(root);
    project = join(root, 'kiln-project');
    mkdirSync(project);
    writeFileSync(join(project, 'package.json'), JSON.stringify({ name: 'kiln-project', version: '1.0.0', private: true, type: 'module' }, null, 2));
    how = install(project, tgz);
  });

  it('holds the compiled library, its declarations and the launcher, and no sources, tests or fixtures', () => {
    const files = ok(run('tar', ['-tzf', tgz], root), 'tar -t').split('\n').filter(Boolean).map((f) => f.replace(/^package\//, ''));
    expect(files).toEqual(expect.arrayContaining(['package.json', 'bin/rungs.mjs', 'dist/index.js', 'dist/index.d.ts', 'dist/cli/main.js', 'dist/rungs-cli.mjs', 'dist/parallel/worker-entry.mjs']));
    const stray = files.filter((f) => !/^(package\.json|README\.md|LICENSE|bin\/[^/]+\.mjs|dist\/.+\.(js|mjs|d\.ts))$/.test(f) || /(^|\/)(test|fixtures?|studies)\//.test(f) || /\.test\./.test(f));
    expect(stray).toEqual([]);
  });

  it('prints its version through the installed command', () => {
    const version = (JSON.parse(readFileSync(join(REPO, 'package.json'), 'utf8')) as { version: string }).version;
    const out = ok(run(join(project, 'node_modules', '.bin', 'rungs'), ['--version'], project), 'rungs --version');
    expect(out.trim()).toBe(version);
  });

  it('type-checks study files under the project\'s own ordinary tsconfig, and rejects a wrong one', () => {
    const studies = join(project, 'studies');
    mkdirSync(studies);
    writeFileSync(join(studies, 'rod-section-own.study.ts'), CUSTOM_STUDY);
    writeFileSync(join(studies, 'rod-where.study.ts'), WHERE_STUDY);
    // Ordinary settings for a Node ES-module project: strict, declarations of libraries checked too, no settings
    // peculiar to rungs (no allowImportingTsExtensions, no custom conditions). @types/node is not installed here.
    const tsconfig = {
      compilerOptions: { target: 'ES2022', module: 'NodeNext', moduleResolution: 'NodeNext', strict: true, noEmit: true, types: [] },
      include: ['studies'],
    };
    writeFileSync(join(project, 'tsconfig.json'), JSON.stringify(tsconfig, null, 2));
    // process and node:fs in the where-study need Node's types: declared minimally instead of installing @types/node.
    writeFileSync(join(studies, 'node-shim.d.ts'), "declare const process: { env: Record<string, string | undefined> };\ndeclare module 'node:fs' { export function writeFileSync(file: string, data: string): void; }\ninterface ImportMeta { resolve(specifier: string): string }\n");
    const good = run(process.execPath, [TSC, '-p', project], project);
    expect(`${good.stdout}${good.stderr}`).toBe('');
    expect(good.status).toBe(0);

    const wrongDir = join(project, 'wrong');
    mkdirSync(wrongDir);
    writeFileSync(join(wrongDir, 'rod-wrong.study.ts'), WRONG_STUDY);
    writeFileSync(join(project, 'tsconfig.wrong.json'), JSON.stringify({ ...tsconfig, include: ['wrong'] }, null, 2));
    const bad = run(process.execPath, [TSC, '-p', join(project, 'tsconfig.wrong.json')], project);
    expect(bad.status).not.toBe(0);
    expect(bad.stdout).toMatch(/rod-wrong\.study\.ts\(\d+,\d+\): error TS2322/);

    // The scheduler field of an external study, through the exported SchedulerSettings and PerLevel types.
    const jobsDir = join(project, 'jobs');
    mkdirSync(jobsDir);
    writeFileSync(join(jobsDir, 'rod-jobs.study.ts'), JOBS_STUDY);
    writeFileSync(join(project, 'tsconfig.jobs.json'), JSON.stringify({ ...tsconfig, include: ['jobs'] }, null, 2));
    const jobs = run(process.execPath, [TSC, '-p', join(project, 'tsconfig.jobs.json')], project);
    expect(`${jobs.stdout}${jobs.stderr}`).toBe('');
    expect(jobs.status).toBe(0);
    const wrongJobsDir = join(project, 'wrong-jobs');
    mkdirSync(wrongJobsDir);
    writeFileSync(join(wrongJobsDir, 'rod-jobs-wrong.study.ts'), WRONG_JOBS_STUDY);
    writeFileSync(join(project, 'tsconfig.wrong-jobs.json'), JSON.stringify({ ...tsconfig, include: ['wrong-jobs'] }, null, 2));
    const wrongJobs = run(process.execPath, [TSC, '-p', join(project, 'tsconfig.wrong-jobs.json')], project);
    expect(wrongJobs.status).not.toBe(0);
    // One error per mistake: the kind on line 2, the scale on line 5.
    const lines = [...wrongJobs.stdout.matchAll(/rod-jobs-wrong\.study\.ts\((\d+),\d+\): error TS\d+/g)].map((m) => Number(m[1]));
    expect([...new Set(lines)].sort((a, b) => a - b)).toEqual([2, 5]);
  });

  it('runs the project\'s studies with `npx rungs run`, the study sharing the running rungs', () => {
    const whereFile = join(root, 'where.txt');
    const r = run(NPM, ['exec', '--offline', '--', 'rungs', 'run', 'studies', '--out', join(root, 'reports'), '--quiet', '--jobs', '1'], project, { RUNGS_WHERE_FILE: whereFile });
    const out = ok(r, `rungs run (installed by ${how})`);
    expect(out).toMatch(/rod-section-own/);
    expect(out).toMatch(/Summary: 2 studies, 2 as expected/);
    expectRunningLibrary(readFileSync(whereFile, 'utf8'));
    expect(existsSync(join(root, 'reports', 'rod-section-own'))).toBe(true);

    // A study in a folder with no rungs installed above it gets the installed command's own copy.
    const bare = join(root, 'bare');
    mkdirSync(bare);
    writeFileSync(join(bare, 'rod-where.study.ts'), WHERE_STUDY);
    const whereBare = join(root, 'where-bare.txt');
    ok(run(join(project, 'node_modules', '.bin', 'rungs'), ['run', 'rod-where.study.ts', '--out', join(root, 'reports-bare'), '--quiet', '--jobs', '1'], bare, { RUNGS_WHERE_FILE: whereBare }), 'rungs run in a bare folder');
    expectRunningLibrary(readFileSync(whereBare, 'utf8'));

    // The library's own errors, thrown for the study, are the command's: a clean message and status 2.
    const badDir = join(root, 'bad-element');
    mkdirSync(badDir);
    writeFileSync(join(badDir, 'rod-bad-element.study.ts'), BAD_ELEMENT_STUDY);
    const bad = run(join(project, 'node_modules', '.bin', 'rungs'), ['run', 'rod-bad-element.study.ts', '--out', join(root, 'reports-bad'), '--quiet', '--jobs', '1'], badDir);
    expect(bad.status).toBe(2);
    expect(bad.stdout + bad.stderr).toMatch(/rod-bad-element.*no Lagrange element of degree 9 on triangles; valid degrees: 1, 2, 3/);
    expect(bad.stdout + bad.stderr).not.toMatch(/unexpected failure/);
  });

  it('runs levels on worker threads of the compiled package with the same errors as in one thread', () => {
    writeFileSync(join(project, 'parallel.mjs'), PARALLEL_SCRIPT);
    const out = ok(run(process.execPath, ['parallel.mjs', join('studies', 'rod-section-own.study.ts'), join(root, 'serial'), join(root, 'parallel')], project), 'parallel run');
    const { serial, parallel, problems } = JSON.parse(out) as { serial: unknown[]; parallel: unknown[]; problems: unknown[] };
    expect(problems).toEqual([]);
    expect(serial).toHaveLength(1);
    expect(parallel).toEqual(serial);
  });

  it('scaffolds a project with `rungs init` whose study type-checks and runs, and keeps what exists', () => {
    const fresh = join(root, 'fresh');
    mkdirSync(fresh);
    writeFileSync(join(fresh, 'package.json'), JSON.stringify({ name: 'fresh', private: true }, null, 2));
    symlinkSync(join(project, 'node_modules'), join(fresh, 'node_modules'), 'dir');
    const bin = join(fresh, 'node_modules', '.bin', 'rungs');
    const first = ok(run(bin, ['init'], fresh), 'rungs init');
    for (const f of ['studies/tile-heat.study.ts', 'tsconfig.json', '.github/workflows/rungs-nightly.yml']) {
      expect(existsSync(join(fresh, f))).toBe(true);
      expect(first).toContain(`wrote    ${f}`);
    }
    const workflow = readFileSync(join(fresh, '.github/workflows/rungs-nightly.yml'), 'utf8');
    expect(workflow).toMatch(/npx rungs check studies --baseline rungs-baseline\.json --junit /);

    const tsc = run(process.execPath, [TSC, '-p', fresh], fresh);
    expect(`${tsc.stdout}${tsc.stderr}`).toBe('');
    // The gate as the workflow runs it, after recording the baseline as the printed next steps say.
    ok(run(bin, ['check', 'studies', '--baseline', 'rungs-baseline.json', '--update-baseline', '--out', join(root, 'fresh-reports'), '--quiet'], fresh), 'record the baseline');
    ok(run(bin, ['check', 'studies', '--baseline', 'rungs-baseline.json', '--junit', join(root, 'junit.xml'), '--out', join(root, 'fresh-reports'), '--quiet'], fresh), 'the nightly gate');
    expect(readFileSync(join(root, 'junit.xml'), 'utf8')).toMatch(/<testsuite[^>]*failures="0"/);

    writeFileSync(join(fresh, 'tsconfig.json'), '{ "include": ["elsewhere"] }\n');
    const again = ok(run(bin, ['init'], fresh), 'rungs init again');
    expect(again).toContain('kept     tsconfig.json');
    expect(readFileSync(join(fresh, 'tsconfig.json'), 'utf8')).toBe('{ "include": ["elsewhere"] }\n');
  });

  it('starts the cell team\'s worker from one file holding every task module (none needs its own file)', () => {
    const dist = join(project, 'node_modules', 'rungs', 'dist');
    expect(existsSync(join(dist, 'rungs-worker.mjs'))).toBe(true);
    // The task modules' own files removed (this test runs after the others of this file, which may use them).
    const tasks = (readdirSync(dist, { recursive: true }) as string[]).filter((f) => f.endsWith('-task.js'));
    expect(tasks.length).toBeGreaterThanOrEqual(8);
    for (const f of tasks) rmSync(join(dist, f));
    writeFileSync(join(project, 'team.mjs'), TEAM_SCRIPT);
    const out = ok(run(process.execPath, ['team.mjs'], project, { RUNGS_THREADS: '2' }), 'the team script');
    expect(JSON.parse(out.trim().split('\n').pop()!)).toEqual({ byWorker: true, same: true, located: true });
  });
});
