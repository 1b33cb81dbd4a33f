// The output folder's lock: one run at a time writes into a folder. The lock is a small JSON file created in one step
// (written under a temporary name, then hard-linked to the lock's name, which fails if it exists), so it is never seen
// half-written. A lock whose process is gone (or whose pid now belongs to a process started later) is stale and
// taken over, with a note.
import { randomBytes } from 'node:crypto';
import { linkSync, readFileSync, renameSync, unlinkSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';

/** The lock file in the output folder. */
export const LOCK_NAME = '.rungs.lock';

export interface LockInfo {
  pid: number;
  /** ISO 8601 time the run started. */
  startedAt: string;
  host: string;
  /** What the run was (e.g. "rungs run studies"). */
  command: string;
  /** The process's start time in clock ticks since boot (Linux /proc/<pid>/stat field 22), to tell a reused pid. */
  processStart: number | null;
  /** Unique per lock, so that a run can tell its own lock from another's. */
  token: string;
}

export type LockOutcome =
  | { ok: true; lock: OutputLock; notes: string[] }
  | { ok: false; message: string; holder: LockInfo | null };

export interface OutputLock {
  readonly path: string;
  readonly info: LockInfo;
  /** Removes the lock if it is still this run's. Safe to call more than once. */
  release(): void;
}

/** Field 22 of /proc/<pid>/stat (start time after boot), or null where there is no /proc. */
function processStart(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    // The command name (field 2) is in parentheses and may hold blanks: count fields after its closing parenthesis.
    const rest = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    const v = Number(rest[19]);
    return Number.isFinite(v) ? v : null;
  } catch {
    return null;
  }
}

/** Whether the run that wrote `info` may still be running: same host, its pid alive and (where /proc tells) the same
 *  process rather than a later one that was given the pid. A lock from another host is taken as held. */
export function holderAlive(info: LockInfo): boolean {
  if (info.host !== hostname()) return true;
  try {
    process.kill(info.pid, 0);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EPERM') return false;
  }
  const start = processStart(info.pid);
  return start === null || info.processStart === null || start === info.processStart;
}

function readLock(path: string): LockInfo | 'absent' | 'unreadable' {
  let text: string;
  try { text = readFileSync(path, 'utf8'); } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'ENOENT' ? 'absent' : 'unreadable';
  }
  try {
    const v = JSON.parse(text) as LockInfo;
    if (typeof v.pid === 'number' && typeof v.token === 'string') return v;
  } catch { /* below */ }
  return 'unreadable';
}

/** "pid 1234 (started 2025-01-01T10:00:00.000Z, rungs run studies)". */
export function describeHolder(info: LockInfo): string {
  return `pid ${info.pid}${info.host !== hostname() ? ` on ${info.host}` : ''} (started ${info.startedAt}${info.command ? `, ${info.command}` : ''})`;
}

/**
 * Takes the lock of `dir` (which must exist) for this process. Refuses while another live run holds it; takes over a
 * stale lock (its process gone) with a note. Errors of the file system other than "exists" are thrown.
 */
export function acquireOutputLock(dir: string, command: string): LockOutcome {
  const path = join(dir, LOCK_NAME);
  const info: LockInfo = {
    pid: process.pid, startedAt: new Date().toISOString(), host: hostname(), command,
    processStart: processStart(process.pid), token: randomBytes(8).toString('hex'),
  };
  const temp = join(dir, `${LOCK_NAME}.${process.pid}.${info.token}`);
  writeFileSync(temp, JSON.stringify(info) + '\n');
  const notes: string[] = [];
  try {
    for (let attempt = 0; attempt < 20; attempt++) {
      try {
        linkSync(temp, path);
        return { ok: true, lock: heldLock(path, info), notes };
      } catch (err) {
        if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
      }
      const holder = readLock(path);
      if (holder === 'absent') continue; // released meanwhile: try again
      if (holder !== 'unreadable' && holderAlive(holder)) {
        return {
          ok: false, holder,
          message: `the output folder ${dir} is in use by another rungs run: ${describeHolder(holder)}; wait for it to finish, ` +
            `or give another --out folder (if that process is not a rungs run, remove ${path})`,
        };
      }
      // Stale: move it aside under a name of our own, then make sure what we moved is the stale lock we read (another
      // run may have taken it over in between; then its fresh lock goes back).
      const aside = `${path}.stale-${process.pid}-${info.token}`;
      try { renameSync(path, aside); } catch { continue; }
      const moved = readLock(aside);
      const same = holder === 'unreadable' ? moved === 'unreadable' : moved !== 'absent' && moved !== 'unreadable' && moved.token === holder.token;
      if (!same) {
        try { linkSync(aside, path); } catch { /* someone else holds it now: the next attempt sees theirs */ }
        try { unlinkSync(aside); } catch { /* gone */ }
        continue;
      }
      try { unlinkSync(aside); } catch { /* gone */ }
      notes.push(holder === 'unreadable'
        ? `note: removed an unreadable lock file ${path} and took the output folder ${dir}`
        : `note: took over the lock of ${dir} from a run that is no longer running: ${describeHolder(holder)}`);
    }
    return { ok: false, holder: null, message: `cannot take the lock ${path}: other runs keep taking it; try again` };
  } finally {
    try { unlinkSync(temp); } catch { /* gone */ }
  }
}

function heldLock(path: string, info: LockInfo): OutputLock {
  let released = false;
  const release = (): void => {
    if (released) return;
    released = true;
    process.removeListener('exit', release);
    const now = readLock(path);
    if (now !== 'absent' && now !== 'unreadable' && now.token === info.token) try { unlinkSync(path); } catch { /* gone */ }
  };
  // A run that ends without releasing (an uncaught error, process.exit) still gives the folder back.
  process.on('exit', release);
  return { path, info, release };
}
