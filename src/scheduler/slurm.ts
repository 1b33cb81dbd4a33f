// Slurm through its own commands: sbatch to submit (a job array when a group has several levels), scontrol to read
// states (sacct needs slurmdbd), scancel to cancel. Never `sbatch --wait`: it polls the controller on its own schedule
// (2, 10, 42, 74 s apart, measured with Slurm 22.05) and holds one process per job; rungs waits for all of its jobs
// with one back-off (wait.ts).
import { execFile } from 'node:child_process';
import { join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { writeFileAtomic } from '../files/atomic-write.ts';
import { HOPELESS_REASONS, parseScontrolJobs } from './scontrol.ts';
import { shellQuote, STDERR_FILE, STDOUT_FILE } from './script.ts';
import type { JobGroup, JobState, Scheduler } from './types.ts';

/** A Slurm command that did not answer this fast is taken as not answering (the controller busy or down). */
const COMMAND_SECONDS = 120;

/** The controller could not be asked (not a statement about any job): waiting goes on. */
export class SchedulerUnreachable extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'SchedulerUnreachable';
  }
}

interface Ran { code: number; stdout: string; stderr: string; missing: boolean }

function run(program: string, args: readonly string[]): Promise<Ran> {
  return new Promise((resolve) => {
    execFile(program, args, { timeout: COMMAND_SECONDS * 1e3, maxBuffer: 64 * 1024 * 1024, encoding: 'utf8' }, (err, stdout, stderr) => {
      const e = err as (NodeJS.ErrnoException & { code?: number | string }) | null;
      resolve({
        code: e ? (typeof e.code === 'number' ? e.code : -1) : 0,
        stdout: stdout ?? '', stderr: (stderr ?? '') || (e && typeof e.code !== 'number' ? e.message : ''),
        missing: e?.code === 'ENOENT',
      });
    });
  });
}

/** "Batch job submission failed: Invalid partition name specified" from sbatch's error lines. */
function sbatchReason(stderr: string): string {
  const lines = stderr.split('\n').map((l) => l.replace(/^sbatch: error:\s*/, '').trim()).filter(Boolean);
  return lines.join('; ') || 'no message';
}

/** The sbatch options of a group (tested on their own: test/scheduler/slurm-args.test.ts). */
export function sbatchArgs(group: JobGroup): string[] {
  const first = group.jobs[0]!;
  const r = first.resources;
  const array = group.jobs.length > 1;
  const out = array ? join(group.dir, `.level-%a.job-${group.token}`) : first.folder;
  return [
    '--parsable',
    `--job-name=${first.name}`,
    `--ntasks=${r.tasks}`,
    ...(r.memoryMB !== undefined ? [`--mem=${r.memoryMB}M`] : []),
    `--time=${r.minutes}`,
    ...(r.partition ? [`--partition=${r.partition}`] : []),
    // A level that fails is rungs's to resubmit (with --resume), not Slurm's to rerun behind its back.
    '--no-requeue',
    `--output=${join(out, STDOUT_FILE)}`,
    `--error=${join(out, STDERR_FILE)}`,
    ...(array ? [`--array=${group.jobs.map((j) => j.level).join(',')}`] : []),
    ...r.extra,
  ];
}

export const slurmScheduler: Scheduler = {
  name: 'Slurm',
  queueOutlivesRungs: true,

  async submit(group) {
    const array = group.jobs.length > 1;
    let script = group.jobs[0]!.script;
    if (array) {
      // The array's one script hands each task to its level's own script (the task id is the level number).
      script = join(group.dir, `.array-${group.token}.sh`);
      writeFileAtomic(script, '#!/bin/sh\n# Written by rungs: task k of this job array runs level k.\n' +
        `exec sh ${shellQuote(group.dir)}/.level-"$SLURM_ARRAY_TASK_ID".job-${group.token}/job.sh\n`);
    }
    const args = [...sbatchArgs(group), script];
    const r = await run('sbatch', args);
    const levels = group.jobs.map((j) => j.level).join(', ');
    if (r.missing) {
      throw new RungsInputError(
        `scheduler 'slurm': sbatch is not on PATH, so level${array ? 's' : ''} ${levels} could not be submitted; run rungs where Slurm's ` +
          "commands are (a login node of the cluster), or leave the study's scheduler out (--scheduler local) to run the levels here", 'scheduler');
    }
    const id = /^(\d+)(?:;\S*)?\s*$/.exec(r.stdout.trim())?.[1];
    if (r.code !== 0 || !id) {
      const reason = sbatchReason(r.stderr);
      const hint = /partition/i.test(reason)
        ? `; scheduler.partition: give a partition the cluster has (sinfo lists them)${group.jobs[0]!.resources.partition ? `, not '${group.jobs[0]!.resources.partition}'` : ''}`
        : /node configuration|memory specification|cpu count|tasks|Invalid --?time|time limit/i.test(reason)
          ? '; ask for resources a node of the partition has (scheduler.tasks, .memory, .minutes; sinfo -N -l shows the nodes)'
          : '';
      throw new RungsInputError(
        `scheduler 'slurm': sbatch refused level${array ? 's' : ''} ${levels}: ${reason}${hint}; command: sbatch ${args.map(shellQuote).join(' ')}`, 'scheduler');
    }
    return array ? group.jobs.map((j) => `${id}_${j.level}`) : [id];
  },

  async states(ids) {
    const out = new Map<string, JobState | null>();
    const bases = [...new Set(ids.map((i) => i.split('_')[0]!))];
    for (const base of bases) {
      const r = await run('scontrol', ['show', 'job', '-o', base]);
      const mine = ids.filter((i) => i.split('_')[0] === base);
      if (r.code !== 0) {
        if (/invalid job id/i.test(r.stderr)) { for (const i of mine) out.set(i, null); continue; }
        throw new SchedulerUnreachable(`scontrol show job ${base}: ${r.missing ? 'scontrol is not on PATH' : r.stderr.trim() || `exit ${r.code}`}`);
      }
      const known = parseScontrolJobs(r.stdout);
      for (const i of mine) out.set(i, known.get(i) ?? null);
    }
    return out;
  },

  async cancel(ids) {
    if (ids.length) await run('scancel', [...ids]);
  },

  hopeless(state) {
    return state.phase === 'pending' && state.reason ? HOPELESS_REASONS[state.reason] ?? null : null;
  },
};
