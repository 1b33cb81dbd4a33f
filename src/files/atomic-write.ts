import { closeSync, fsyncSync, openSync, readdirSync, renameSync, rmSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

// The one way rungs writes a file (reports, level records, error files): beside every layer that writes, so it
// lives at the bottom.

/** Temporary files of writeFileAtomic: `.<name>.<pid>.<count>.tmp` beside the file (hidden, same file system). */
const TEMP_NAME = /^\.(.+)\.(\d+)\.\d+\.tmp$/;
let tempCount = 0;

/** A fresh temporary path beside `path` (TEMP_NAME's form), for a write that ends in a rename over `path`. */
export function tempPathFor(path: string): string {
  return join(dirname(path), `.${basename(path)}.${process.pid}.${++tempCount}.tmp`);
}

/**
 * The one way rungs writes a file: the text goes to a temporary file in the same folder, is flushed to disk, and is
 * renamed over the target. rename(2) replaces the target in one step, so a reader (or a run killed at any moment)
 * sees the previous file or the new one, never a truncated one. Throws what the file system throws; the temporary
 * file is removed on failure.
 */
export function writeFileAtomic(path: string, text: string | Uint8Array): void {
  writeFileAtomicFrom(path, (write) => write(typeof text === 'string' ? Buffer.from(text, 'utf8') : text));
}

/** writeFileAtomic for a file produced in pieces, so that a large one (a .vtu of a fine mesh) is never held whole:
 *  `produce` hands each piece to `write`, in order (a piece may be a reused buffer: it is written before `write`
 *  returns). Same temporary file, flush and rename; on failure the temporary file is removed. */
export function writeFileAtomicFrom(path: string, produce: (write: (bytes: Uint8Array) => void) => void): void {
  const temp = tempPathFor(path);
  let fd: number | null = null;
  try {
    fd = openSync(temp, 'wx', 0o644);
    const out = fd;
    produce((bytes) => {
      for (let done = 0; done < bytes.length;) done += writeSync(out, bytes, done, bytes.length - done);
    });
    fsyncSync(fd);
    closeSync(fd);
    fd = null;
    renameSync(temp, path);
  } catch (err) {
    if (fd !== null) try { closeSync(fd); } catch { /* already closed */ }
    try { unlinkSync(temp); } catch { /* never made, or renamed */ }
    throw err;
  }
}

/** Removes temporary files that writeFileAtomic left in `dir` when its process was killed between write and rename
 *  (only those of processes other than this one: call it while holding the output folder's lock). Returns their names. */
export function removeStaleTempFiles(dir: string): string[] {
  let names: string[];
  try { names = readdirSync(dir); } catch { return []; }
  const removed: string[] = [];
  for (const name of names) {
    const m = TEMP_NAME.exec(name);
    if (!m || Number(m[2]) === process.pid) continue;
    try { rmSync(join(dir, name), { force: true }); removed.push(name); } catch { /* leave it */ }
  }
  return removed;
}

