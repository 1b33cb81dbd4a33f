// The jobs a study has submitted, recorded in the output folder (<out>/.rungs/jobs/<study>.json, written atomically
// each time it changes), so that a rungs that was stopped can re-attach to them (`rungs run --resume`): a job still
// recorded as submitted, for a level whose inputs are unchanged (the same key as the record of finished levels), is
// waited for and collected instead of being submitted again.
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeFileAtomic } from '../files/atomic-write.ts';

const FORMAT = 'rungs jobs 1';

/** Where a level's job stands for rungs: submitted (not yet collected), collected, failed, cancelled. */
export type JobStatus = 'submitted' | 'collected' | 'failed' | 'cancelled';

export interface JobEntry {
  /** 0-based level index. */
  index: number;
  n: number;
  /** The level's key (src/cli/resume.ts levelKey): what the level computes from. */
  key: string;
  /** The scheduler's job id (Slurm: 123, or 123_4 for task 4 of an array). */
  id: string;
  scheduler: string;
  /** The job's folder (the solver's {out}). */
  folder: string;
  submitted: string;
  status: JobStatus;
  /** Why it failed, for a failed or cancelled job. */
  message?: string;
}

/** The folder of the job records in an output folder (beside the records of finished levels). */
export const jobRecordFolder = (out: string): string => join(out, '.rungs', 'jobs');

const fileOf = (out: string, stem: string) => join(jobRecordFolder(out), `${stem}.json`);

/** A study's recorded jobs by level index; a missing, unreadable or foreign file reads as none. */
export function readJobRecord(out: string, stem: string, study: string): Map<number, JobEntry> {
  const found = new Map<number, JobEntry>();
  let parsed: { format?: string; study?: string; jobs?: JobEntry[] };
  try {
    parsed = JSON.parse(readFileSync(fileOf(out, stem), 'utf8'));
  } catch {
    return found;
  }
  if (parsed.format !== FORMAT || parsed.study !== study || !Array.isArray(parsed.jobs)) return found;
  for (const e of parsed.jobs) {
    if (e && typeof e.index === 'number' && typeof e.id === 'string' && typeof e.key === 'string' && typeof e.folder === 'string') found.set(e.index, e);
  }
  return found;
}

/** Writes a study's job record (atomically). */
export function writeJobRecord(out: string, stem: string, study: string, jobs: Iterable<JobEntry>): void {
  mkdirSync(jobRecordFolder(out), { recursive: true });
  const list = [...jobs].sort((a, b) => a.index - b.index);
  writeFileAtomic(fileOf(out, stem), JSON.stringify({ format: FORMAT, study, jobs: list }, null, 1) + '\n');
}
