import { spawn, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export interface Ran { code: number | null; stdout: string; stderr: string; command: string }

/** Run a program (no shell), feeding `input` to its standard input. The timeout only guards against a hang. */
export function run(cmd: string, args: readonly string[], cwd: string, input = ''): Promise<Ran> {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd, stdio: ['pipe', 'pipe', 'pipe'], timeout: 120_000 });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => { stdout += d.toString(); });
    child.stderr.on('data', (d: Buffer) => { stderr += d.toString(); });
    child.on('error', (err) => resolve({ code: -1, stdout, stderr: stderr + String(err), command: [cmd, ...args].join(' ') }));
    child.on('close', (code) => resolve({ code, stdout, stderr, command: [cmd, ...args].join(' ') }));
    child.stdin.on('error', () => undefined);
    child.stdin.end(input);
  });
}

/** Run steps one after another, stopping at the first that fails. */
export async function steps(list: ReadonlyArray<readonly [string, readonly string[], string?]>, cwd: string): Promise<Ran> {
  let last: Ran = { code: 0, stdout: '', stderr: '', command: '' };
  for (const [cmd, args, input] of list) {
    last = await run(cmd, args, cwd, input ?? '');
    if (last.code !== 0) return last;
  }
  return last;
}

/** Why a tool is missing (naming the Debian package to install), or undefined when it is there. */
export function missing(path: string, debianPackage: string, probe?: readonly string[]): string | undefined {
  if (!existsSync(path)) return `${path} not found; install the Debian package ${debianPackage}`;
  if (probe && spawnSync(path, probe, { stdio: 'ignore' }).status !== 0) {
    return `${path} ${probe.join(' ')} failed; install the Debian package ${debianPackage}`;
  }
  return undefined;
}
