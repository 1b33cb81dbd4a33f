// Which process a local job is, so that a later rungs (`rungs run --resume`) finds the job again, and never another
// process that was given the same pid after the job ended: the pid (which leads the job's own process group, since
// the job is started detached), the process's start time since boot (/proc/<pid>/stat field 22, starttime, in clock
// ticks; Linux proc(5)) and the boot it belongs to (/proc/sys/kernel/random/boot_id, since start times restart with
// every boot). Written to job.pid in the job's folder when the job starts. Without /proc (not Linux) only the pid is
// known, and a pid reused after the job ended would pass for the job.
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeFileAtomic } from '../files/atomic-write.ts';

/** The file in a local job's folder that names its process. */
export const PID_FILE = 'job.pid';

export interface ProcessIdentity {
  /** The job's shell; also its process group's id. */
  pid: number;
  /** starttime from /proc/<pid>/stat (clock ticks since boot), null without /proc. */
  start: string | null;
  /** This boot's id, null without /proc. */
  boot: string | null;
}

const HAS_PROC = existsSync('/proc/self/stat');

/** State (field 3) and starttime (field 22) of /proc/<pid>/stat; null when there is no such process. The command name
 *  (field 2) is in parentheses and may hold spaces and parentheses itself, so the fields are counted after the last ')'. */
function procStat(pid: number): { state: string; start: string } | null {
  let text: string;
  try { text = readFileSync(`/proc/${pid}/stat`, 'utf8'); } catch { return null; }
  const rest = text.slice(text.lastIndexOf(')') + 2).split(' ');
  const state = rest[0];
  const start = rest[19];
  return state && start ? { state, start } : null;
}

/** The processes of a session (field 6 of /proc/<pid>/stat), other than zombies; empty without /proc. A local job is
 *  started detached, so its shell leads a session of its own, and everything it starts stays in that session even
 *  when it makes a process group of its own, as `timeout` does (GNU coreutils: the command runs in timeout's own
 *  group) — so a job is stopped by its session, not only by its shell's group. */
export function sessionMembers(sid: number): number[] {
  if (!HAS_PROC) return [];
  let entries: string[];
  try { entries = readdirSync('/proc'); } catch { return []; }
  const members: number[] = [];
  for (const e of entries) {
    if (!/^\d+$/.test(e)) continue;
    let text: string;
    try { text = readFileSync(`/proc/${e}/stat`, 'utf8'); } catch { continue; }
    const rest = text.slice(text.lastIndexOf(')') + 2).split(' ');
    if (rest[3] === String(sid) && rest[0] !== 'Z' && rest[0] !== 'X') members.push(Number(e));
  }
  return members;
}

function bootId(): string | null {
  try { return readFileSync('/proc/sys/kernel/random/boot_id', 'utf8').trim() || null; } catch { return null; }
}

/** The identity of a running process (the one just started). */
export function processIdentity(pid: number): ProcessIdentity {
  return { pid, start: HAS_PROC ? procStat(pid)?.start ?? null : null, boot: HAS_PROC ? bootId() : null };
}

/** Whether the process is still the one identified and still runs (a zombie, state Z or X, has ended). */
export function stillRunning(id: ProcessIdentity): boolean {
  if (!HAS_PROC) {
    try { process.kill(id.pid, 0); return true; } catch (err) { return (err as NodeJS.ErrnoException).code === 'EPERM'; }
  }
  const stat = procStat(id.pid);
  if (!stat || stat.state === 'Z' || stat.state === 'X') return false;
  if (id.start !== null && stat.start !== id.start) return false;
  const boot = bootId();
  return id.boot === null || boot === null || boot === id.boot;
}

/** Records the job's process in its folder. */
export function writeProcessIdentity(folder: string, id: ProcessIdentity): void {
  writeFileAtomic(join(folder, PID_FILE), JSON.stringify(id) + '\n');
}

/** The job's process as its folder records it; null when there is no readable job.pid. */
export function readProcessIdentity(folder: string): ProcessIdentity | null {
  try {
    const v = JSON.parse(readFileSync(join(folder, PID_FILE), 'utf8')) as Partial<ProcessIdentity>;
    const text = (x: unknown) => (typeof x === 'string' ? x : null);
    return Number.isInteger(v.pid) && v.pid! > 0 ? { pid: v.pid!, start: text(v.start), boot: text(v.boot) } : null;
  } catch {
    return null;
  }
}
