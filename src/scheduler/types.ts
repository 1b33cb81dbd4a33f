// Levels of an external study as jobs of a batch scheduler: what a study declares (SchedulerSettings), what one level's
// job asks for (JobSpec), what a scheduler says about it (JobState), and the small interface every scheduler
// implements (Scheduler: submit, states, cancel). Slurm (slurm.ts) and local processes (local.ts) implement it.

/** A per-level value: one for every level, a list with one per level of the ladder, or the finest level's value
 *  scaled down to the coarser levels with their estimated unknowns ((n / n_finest)^dim, 'dofs') or with n ('n'). */
export type PerLevel<T> = T | T[] | { finest: T; scale: 'dofs' | 'n'; min?: T };

/** `scheduler` of an external discretization: where its levels run and what each level's job asks for. */
export interface SchedulerSettings {
  /** 'slurm': each level a Slurm job (sbatch, scontrol, scancel on PATH); 'local': each level a process of this machine. */
  kind: 'slurm' | 'local';
  /** The partition (queue) the jobs go to (default: the cluster's default partition). */
  partition?: string;
  /** Tasks of each level's job (MPI ranks; {tasks} in the command template; default 1). */
  tasks?: PerLevel<number>;
  /** Memory of each level's job: megabytes, or text such as '512M', '4G' (default: the partition's). */
  memory?: PerLevel<number | string>;
  /** Slurm's time limit of each level's job in whole minutes (default: the level's timeoutSeconds rounded up to
   *  minutes, plus one minute for starting and measuring). The level's own timeout runs inside the job. */
  minutes?: PerLevel<number>;
  /** More sbatch options for every job, such as ['--account=kiln', '--qos=short']. */
  sbatch?: string[];
  /** A VTK study: 'job' integrates the errors in the level's job too (rungs runs there after the solver), so that the
   *  solution files stay on the cluster; 'here' (default) reads them back into this rungs. */
  errors?: 'here' | 'job';
  /** When rungs is stopped by a signal: 'keep' (default) leaves the jobs running for `rungs run --resume` to collect;
   *  'cancel' cancels them. */
  onStop?: 'keep' | 'cancel';
}

/** What one level's job gets. */
export interface JobResources {
  tasks: number;
  /** Megabytes; undefined: the partition's default. */
  memoryMB?: number;
  minutes: number;
  partition?: string;
  /** More sbatch options. */
  extra: readonly string[];
}

/** One level's job, ready to submit: its script is written, its folder exists. */
export interface JobSpec {
  /** The 1-based level number: a job array's task id. */
  level: number;
  /** The job's folder (the solver's {out}); the scheduler writes job.out and job.err into it. */
  folder: string;
  /** The shell script that runs the level (script.ts). */
  script: string;
  /** The job's name as the scheduler shows it. */
  name: string;
  resources: JobResources;
}

/** A group of jobs with the same resources, submitted together (Slurm: one job array). `token` names the group's
 *  folders: every job's folder is `<dir>/.level-<level>.job-<token>`. */
export interface JobGroup {
  dir: string;
  token: string;
  jobs: JobSpec[];
}

export type JobPhase = 'pending' | 'running' | 'completed' | 'failed' | 'timeout' | 'cancelled';

/** What a scheduler says about one job. */
export interface JobState {
  id: string;
  phase: JobPhase;
  /** The scheduler's own word for it (Slurm: JobState, e.g. OUT_OF_MEMORY, NODE_FAIL). */
  word: string;
  /** Whether the job has ended (completed, failed, timed out or cancelled). */
  final: boolean;
  exitCode: number | null;
  /** The signal that ended the job's script, if one did. */
  signal: number | null;
  /** Why a pending job waits, or why a job ended (Slurm: Reason). */
  reason: string | null;
}

/** The one interface of every scheduler. `states` reports null for a job it does not know (any more). */
export interface Scheduler {
  /** For messages: "Slurm", "local". */
  readonly name: string;
  /** Whether a job still waiting to start outlives the rungs that submitted it (Slurm: yes; local: its queue is in
   *  rungs, so a stopped rungs cancels what has not started). */
  readonly queueOutlivesRungs: boolean;
  /** Submits a group; resolves with the job ids in the group's order. Throws RungsInputError when the scheduler
   *  refuses (no such partition, resources it cannot grant, the command not found). */
  submit(group: JobGroup): Promise<string[]>;
  states(ids: readonly string[]): Promise<Map<string, JobState | null>>;
  cancel(ids: readonly string[]): Promise<void>;
  /** Takes over jobs that an earlier rungs submitted and `rungs run --resume` re-attaches to, before their states are
   *  asked for. Slurm knows them already and has none; the local scheduler finds each job's process from the
   *  job.pid in its folder (local.ts). */
  adopt?(jobs: readonly { id: string; folder: string }[]): void;
  /** Pending reasons that never clear by waiting (Slurm: PartitionConfig, …): such a job is cancelled and its level failed. */
  hopeless(state: JobState): string | null;
}
