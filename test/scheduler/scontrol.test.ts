import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { arrayTaskIds, HOPELESS_REASONS, parseScontrolJobs, scontrolFields } from '../../src/scheduler/scontrol.ts';
import { slurmScheduler } from '../../src/scheduler/slurm.ts';
import { outcomeProblem } from '../../src/scheduler/outcome.ts';

// Lines of `scontrol show job -o` recorded from a real cluster (scripts/slurm-local.sh: Slurm 22.05.8 on Debian 12):
// jobs 4 (completed), 5 (exit 3), 6 (cancelled while running), 7 (an array of tasks 1, 2, 4: first with tasks 2 and 4
// still pending together, later each finished), 1 (past its one-minute limit), 9 (64 tasks on a 2-CPU node) and 11
// (two nodes of a one-node partition). The states are those Slurm printed, read by eye from the same lines.
const text = readFileSync(resolve('test/scheduler/fixtures/scontrol-show-job.txt'), 'utf8');
const lines = text.split('\n').filter((l) => l.startsWith('JobId='));

describe('scontrol show job -o', () => {
  it('reads every field of a line, a value running to the next key', () => {
    const f = scontrolFields(lines[1]!);
    expect([f.get('JobId'), f.get('JobState'), f.get('Reason'), f.get('ExitCode'), f.get('StdErr')]).toEqual(['5', 'FAILED', 'NonZeroExitCode', '3:0', '/tmp/slx/bad.out']);
    expect(f.get('AllocNode:Sid')).toBe('localhost:7179');
    // A job name with blanks stays whole.
    expect(scontrolFields('JobId=3 JobName=kiln rod level 2 UserId=root(0)').get('JobName')).toBe('kiln rod level 2');
  });

  it('gives each recorded job its phase, exit code and signal', () => {
    const got = (line: string) => [...parseScontrolJobs(line).values()].map((s) => [s.id, s.phase, s.final, s.exitCode, s.signal, s.reason]);
    expect(got(lines[0]!)).toEqual([['4', 'completed', true, 0, null, null]]);
    expect(got(lines[1]!)).toEqual([['5', 'failed', true, 3, null, 'NonZeroExitCode']]);
    expect(got(lines[2]!)).toEqual([['6', 'cancelled', true, 0, 15, null]]);
    expect(got(lines[5]!)).toEqual([['1', 'timeout', true, 0, 15, 'TimeLimit']]);
  });

  it('names array tasks <array>_<task>, a pending group of tasks once per task', () => {
    const first = parseScontrolJobs(`${lines[3]}\n${lines[4]}`);
    expect([...first.keys()].sort()).toEqual(['7_1', '7_2', '7_4']);
    expect(first.get('7_2')!.phase).toBe('pending');
    expect(first.get('7_4')!.phase).toBe('pending');
    expect(first.get('7_1')!.phase).toBe('running');
    // Once finished, the array's own JobId (7) is its last task's line: the task id, not the JobId, names it.
    const later = parseScontrolJobs(lines.slice(8).join('\n'));
    expect([...later].map(([id, s]) => [id, s.phase]).sort()).toEqual([['7_1', 'completed'], ['7_2', 'completed'], ['7_4', 'completed']]);
  });

  it('reads the ArrayTaskId forms of sbatch(1) --array', () => {
    expect(arrayTaskIds('4')).toEqual([4]);
    expect(arrayTaskIds('2,4')).toEqual([2, 4]);
    expect(arrayTaskIds('1-3,7')).toEqual([1, 2, 3, 7]);
    expect(arrayTaskIds('1-9:4')).toEqual([1, 5, 9]);
    expect(arrayTaskIds('1-3%2')).toEqual([1, 2, 3]);
  });

  it('takes a job pending for a reason that never clears as hopeless, one pending for resources as not', () => {
    const states = parseScontrolJobs(lines.join('\n'));
    expect(slurmScheduler.hopeless(states.get('9')!)).toBe(HOPELESS_REASONS.PartitionConfig);
    expect(slurmScheduler.hopeless(states.get('11')!)).toBe(HOPELESS_REASONS.PartitionNodeLimit);
    expect(slurmScheduler.hopeless(parseScontrolJobs(lines[3]!).get('7_2')!)).toBeNull();
  });

  it('names a job Slurm stopped at its time limit so, whether or not its signalled script still wrote job.exit', () => {
    // The recorded job 1: a 1-minute limit, ended TIMEOUT after 1:26 (Reason=TimeLimit).
    const state = parseScontrolJobs(text).get('1')!;
    expect(state.word).toBe('TIMEOUT');
    const context = { scheduler: 'Slurm', folder: '/nonexistent/job', timeoutSeconds: 600, minutes: 1 };
    const limit = /^Slurm job 1 was stopped by Slurm at its time limit of 1 min \(state TIMEOUT\); raise scheduler\.minutes/;
    expect(outcomeProblem({ id: '1', state, exit: null }, context)).toMatch(limit);
    // sh killed by SIGTERM after its solver: 128 + 15 (POSIX sh exit status of a signalled command).
    expect(outcomeProblem({ id: '1', state, exit: { exit: 143, stage: 'solver', start: 0, end: 60 } }, context)).toMatch(limit);
    // A script that finished its level just as the limit struck: the level stands.
    expect(outcomeProblem({ id: '1', state, exit: { exit: 0, stage: 'solver', start: 0, end: 60 } }, context)).toBeNull();
  });

  it('skips what is not a job line (scontrol prints nothing else with -o, but a blank line or a message is not a job)', () => {
    expect(parseScontrolJobs('\nslurm_load_jobs error: Invalid job id specified\n').size).toBe(0);
  });
});
