import { closeSync, fsync, openSync, writev } from 'node:fs';
import { rename, unlink } from 'node:fs/promises';
import { sep } from 'node:path';
import { tempPathFor } from './atomic-write.ts';

// Large files written while the computation goes on. Putting 128 MB into the page cache costs about 0.4 s of one
// core on the machines rungs is measured on (an error map of the 2M-cell level; the same for Python's plain write,
// so it is the kernel's copy, not rungs's), and nothing after the write needs the file: handed to libuv's threads
// (fs/promises), it overlaps what the main thread does next (the next level, the local orders, the report).
//
// Same guarantees as writeFileAtomic: a temporary file beside the target, flushed, renamed over it; a reader sees the
// old file or the new one. Whoever started writes must settle them (settleBackgroundWrites) before relying on the
// files or reporting success: a failure surfaces there, naming the file.

interface Pending { done: Promise<void>; error: unknown }

/** Writes not yet settled, by target path (a second write of the same path starts after the first). */
const pending = new Map<string, Pending>();

/**
 * Starts writing `pieces`, in order, to `path` (atomically: temporary file, flush, rename) and returns at once. The
 * pieces must not change until the write is settled (settleBackgroundWrites): they are handed to the file system as
 * they are, without a copy. Arrays in shared memory are fine.
 */
export function writeFileAtomicInBackground(path: string, pieces: readonly Uint8Array[]): void {
  const before = pending.get(path);
  const entry: Pending = { done: Promise.resolve(), error: undefined };
  entry.done = (async () => {
    if (before) {
      await before.done;
      if (before.error !== undefined) throw before.error; // reported with this write, which then does not start
    }
    const temp = tempPathFor(path);
    // Opened here and written by one request (writev: libuv writes every piece in its own thread, partial writes
    // included), so the bulk of the work goes on while this thread computes; the awaits after it (flush, close,
    // rename) need this thread's event loop, which may only turn when the caller settles.
    const fd = openSync(temp, 'wx', 0o644);
    try {
      await new Promise<void>((resolve, reject) => writev(fd, pieces as Uint8Array[], (err) => (err ? reject(err) : resolve())));
      await new Promise<void>((resolve, reject) => fsync(fd, (err) => (err ? reject(err) : resolve())));
    } catch (err) {
      try { closeSync(fd); } catch { /* already failing */ }
      await unlink(temp).catch(() => undefined);
      throw err;
    }
    closeSync(fd);
    await rename(temp, path).catch(async (err: unknown) => { await unlink(temp).catch(() => undefined); throw err; });
  })().catch((err: unknown) => { entry.error = err; });
  pending.set(path, entry);
}

/**
 * Waits for the background writes of files under `folder` (every one when it is omitted) and forgets them; throws
 * the first failure as an Error naming its file (the others are still waited for, so none is left running).
 */
export async function settleBackgroundWrites(folder?: string): Promise<void> {
  const prefix = folder === undefined ? '' : folder.endsWith(sep) ? folder : folder + sep;
  const mine = [...pending].filter(([path]) => path.startsWith(prefix));
  for (const [path, entry] of mine) if (pending.get(path) === entry) pending.delete(path);
  let first: Error | null = null;
  for (const [path, entry] of mine) {
    await entry.done;
    if (entry.error !== undefined && first === null) {
      const why = entry.error instanceof Error ? entry.error.message : String(entry.error);
      first = new Error(`${path} could not be written: ${why}`);
    }
  }
  if (first) throw first;
}

/** Paths whose background writes have not been settled yet. */
export function backgroundWritesPending(): string[] {
  return [...pending.keys()];
}
