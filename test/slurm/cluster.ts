// The single-node Slurm cluster of the scheduler tests (scripts/slurm-local.sh): started once, by the first test file
// that needs it, and left running for the others (start is a no-op when it answers). Tests that need it are skipped
// with a message when Slurm is not installed (CI installs it: .ci/run) or the cluster cannot be started (not root).
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';

const SCRIPT = resolve('scripts/slurm-local.sh');
const DIR = process.env.RUNGS_SLURM_DIR ?? '/tmp/rungs-slurm';

export interface Cluster {
  ok: boolean;
  /** Why the tests are skipped, when they are. */
  reason: string;
  /** Environment for rungs and Slurm's commands: SLURM_CONF of the test cluster. */
  env: Record<string, string>;
}

const onPath = (cmd: string) => (process.env.PATH ?? '').split(':').some((d) => existsSync(`${d}/${cmd}`));

export function ensureCluster(): Cluster {
  const env = { SLURM_CONF: `${DIR}/slurm.conf` };
  for (const cmd of ['sbatch', 'scontrol', 'slurmctld', 'slurmd', 'munged']) {
    if (!onPath(cmd) && !existsSync(`/usr/sbin/${cmd}`)) {
      return { ok: false, reason: `${cmd} not found; install Debian's slurm-wlm and munge (.ci/run does) to run these tests`, env };
    }
  }
  try {
    execFileSync('bash', [SCRIPT, 'start'], { env: { ...process.env, PATH: `${process.env.PATH}:/usr/sbin`, RUNGS_SLURM_DIR: DIR }, stdio: 'pipe', timeout: 120_000 });
  } catch (err) {
    const e = err as { stderr?: Buffer; message: string };
    return { ok: false, reason: `the test cluster did not start (${(e.stderr?.toString() || e.message).trim().split('\n').pop()})`, env };
  }
  return { ok: true, reason: '', env };
}

/** Slurm's word on a job (JobState), or null when the controller does not know it. */
export function jobState(id: string, env: Record<string, string>): string | null {
  try {
    const out = execFileSync('scontrol', ['show', 'job', '-o', id], { env: { ...process.env, ...env }, stdio: 'pipe' }).toString();
    const base = id.split('_')[0];
    const task = id.split('_')[1];
    const line = out.split('\n').find((l) => (task ? l.includes(`ArrayJobId=${base} `) && new RegExp(`ArrayTaskId=${task}( |$)`).test(l) : l.startsWith(`JobId=${id} `)));
    return line ? /JobState=(\S+)/.exec(line)?.[1] ?? null : null;
  } catch {
    return null;
  }
}
