// Helpers for the tests that start `rungs run` as a user does (a process of its own) on a kiln rod whose solver is the
// stand-in test/fixtures/kiln/kiln-solver.mjs: study files in a temporary folder, the run as a child process, pids.
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

export const BIN = resolve('bin/rungs.mjs');
const SOLVER = resolve('test/fixtures/kiln/kiln-solver.mjs');
const LIB = pathToFileURL(resolve('src/index.ts')).href;

/** Writes a study file of the kiln rod with the stand-in solver; the ladder is the only thing the tests change. */
export function kilnStudy(dir: string, ladder: number[], name = 'kiln-rod-ext'): string {
  mkdirSync(dir, { recursive: true });
  // Outside a package tsx would read the study file as CommonJS; it is an ES module like the project's own.
  writeFileSync(join(dir, 'package.json'), '{ "type": "module" }\n');
  const file = join(dir, `${name}.study.ts`);
  writeFileSync(file, [
    `import { defineStudy, interval, external } from '${LIB}';`,
    'export default defineStudy({',
    `  name: '${name}', description: 'A kiln rod heated at one end (invented data), solved by a stand-in code.',`,
    `  domain: interval(0, 1), exact: 'sin(x) + x',`,
    `  discretization: external({ command: [${JSON.stringify(process.execPath)}, ${JSON.stringify(SOLVER)}], output: 'errors', degree: 1 }),`,
    `  ladder: { n: ${JSON.stringify(ladder)} }, norms: ['L2', 'H1semi'],`,
    '});',
    '',
  ].join('\n'));
  return file;
}

export interface Finished { code: number | null; signal: NodeJS.Signals | null; out: string; err: string }
export interface Started { child: ChildProcess; done: Promise<Finished>; output(): string }

/** Starts `rungs <args>` with extra environment variables (the stand-in solver inherits them). */
export function startRungs(args: string[], env: Record<string, string> = {}): Started {
  const child = spawn(process.execPath, [BIN, ...args], {
    env: { ...process.env, NO_COLOR: '1', CI: 'true', ...env }, stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  let err = '';
  child.stdout!.on('data', (c: Buffer) => { out += c.toString(); });
  child.stderr!.on('data', (c: Buffer) => { err += c.toString(); });
  const done = new Promise<Finished>((r) => child.on('close', (code, signal) => r({ code, signal, out, err })));
  return { child, done, output: () => out + err };
}

/** Whether a process runs: a killed process whose parent is gone may linger as a zombie until init reaps it
 *  (/proc/<pid>/stat state Z, Linux proc(5)); kill(pid, 0) elsewhere. */
export function isRunning(pid: number): boolean {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    return !/^\d+ \(.*\) [ZX]/.test(stat);
  } catch {
    if (existsSync('/proc/self')) return false;
    try { process.kill(pid, 0); return true; } catch { return false; }
  }
}

/** Polls until `cond` holds, or fails after `seconds` (a limit that only catches a hang). */
export async function waitFor(what: string, cond: () => boolean, seconds = 300): Promise<void> {
  const until = Date.now() + seconds * 1e3;
  while (!cond()) {
    if (Date.now() > until) throw new Error(`gave up waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** Polls until none of the pids runs (a stopped process may take a moment to go on a busy machine). */
export async function gone(pids: number[]): Promise<boolean> {
  try {
    await waitFor(`pids ${pids.join(', ')} to end`, () => pids.every((p) => !isRunning(p)), 60);
    return true;
  } catch {
    return false;
  }
}

export interface SolverPids { solver: number; child: number; level: number }

/** The pid lines the stand-in solver appended (whole lines only). */
export function solverPids(file: string): SolverPids[] {
  if (!existsSync(file)) return [];
  return readFileSync(file, 'utf8').split('\n').filter((l) => l.endsWith('}')).map((l) => JSON.parse(l) as SolverPids);
}

/** The n of every level the stand-in solver was started for, in order. */
export function computed(counter: string): number[] {
  return existsSync(counter) ? readFileSync(counter, 'utf8').split('\n').filter(Boolean).map(Number) : [];
}

/** Kills whatever a test started and may have left (the run, solvers, their children): every test ends with none. */
export function killAll(children: ChildProcess[], pids: number[]): void {
  for (const c of children) if (c.exitCode === null && c.signalCode === null) try { c.kill('SIGKILL'); } catch { /* gone */ }
  for (const p of pids) if (isRunning(p)) try { process.kill(p, 'SIGKILL'); } catch { /* gone */ }
}
