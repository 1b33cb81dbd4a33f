import { closeSync, fsync, ftruncate, openSync, unlinkSync, writev } from 'node:fs';
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

// Space reserved ahead. On the virtual machines rungs is measured on, the first write of fresh pages into the page
// cache costs 2.3–2.8 ms per MB (128 MB: 0.30–0.37 s in one writev; the same writev over pages the file already holds:
// 17–18 ms; Node 20, AMD EPYC 2 cores, measured with a plain script): the guest's free memory is backed by the host
// only when first touched. The finest level's error file (128 MB at 1024² P1 squares) paid that at the run's end,
// where the main thread waited for it. Reserving it at the level's start (its size is known from the mesh) moves that
// cost into the level, where the libuv thread overlaps the meshing, the assembly and the multigrid's setup; its write
// then goes over pages already there.
interface Reservation { temp: string; fd: number; ready: Promise<void>; failed: boolean }
const reservations = new Map<string, Reservation>();
/** Zeros written per piece of a reservation (one buffer, handed to writev repeatedly). */
const ZERO_PIECE = 4 << 20;
let zeros: Uint8Array | null = null;
let dropsAtExit = false;

/**
 * Opens the temporary file of a later writeFileAtomicInBackground of `path` and fills it with `bytes` zero bytes in
 * libuv's threads, so that the write finds its pages in the page cache. A hint only: when the file cannot be opened
 * or filled, the write goes on as without it; a reservation never written is removed when the writes under its folder
 * are settled, or when the process exits.
 */
export function reserveBackgroundWrite(path: string, bytes: number): void {
  if (reservations.has(path) || !(bytes > 0)) return;
  const temp = tempPathFor(path);
  let fd: number;
  try { fd = openSync(temp, 'wx', 0o644); } catch { return; }
  zeros ??= new Uint8Array(ZERO_PIECE);
  const pieces: Uint8Array[] = [];
  for (let at = 0; at < bytes; at += ZERO_PIECE) pieces.push(bytes - at >= ZERO_PIECE ? zeros : zeros.subarray(0, bytes - at));
  const r: Reservation = { temp, fd, ready: Promise.resolve(), failed: false };
  r.ready = new Promise<void>((resolve) => writev(fd, pieces, 0, (err) => { if (err) r.failed = true; resolve(); }));
  if (!dropsAtExit) { dropsAtExit = true; process.once('exit', dropReservations); }
  reservations.set(path, r);
}

/** Closes and removes a reservation's file (never written, or its write did not start). */
function drop(r: Reservation): void {
  try { closeSync(r.fd); } catch { /* closed */ }
  try { unlinkSync(r.temp); } catch { /* gone */ }
}

/** At exit: the reservations no write took (a level that failed after reserving). */
function dropReservations(): void {
  for (const r of reservations.values()) drop(r);
  reservations.clear();
}

/**
 * Starts writing `pieces`, in order, to `path` (atomically: temporary file, flush, rename) and returns at once. The
 * pieces must not change until the write is settled (settleBackgroundWrites): they are handed to the file system as
 * they are, without a copy. Arrays in shared memory are fine.
 */
export function writeFileAtomicInBackground(path: string, pieces: readonly Uint8Array[]): void {
  const before = pending.get(path);
  const entry: Pending = { done: Promise.resolve(), error: undefined };
  const reserved = reservations.get(path);
  reservations.delete(path);
  entry.done = (async () => {
    if (before) {
      await before.done;
      if (before.error !== undefined) throw before.error; // reported with this write, which then does not start
    }
    let r = reserved;
    if (r) {
      await r.ready;
      if (r.failed) { drop(r); r = undefined; }
    }
    const temp = r?.temp ?? tempPathFor(path);
    // Opened here and written by one request (writev: libuv writes every piece in its own thread, partial writes
    // included), so the bulk of the work goes on while this thread computes; the awaits after it (flush, close,
    // rename) need this thread's event loop, which may only turn when the caller settles.
    const fd = r?.fd ?? openSync(temp, 'wx', 0o644);
    try {
      await new Promise<void>((resolve, reject) => writev(fd, pieces as Uint8Array[], 0, (err) => (err ? reject(err) : resolve())));
      // A reservation longer than the file is cut to it.
      if (r) await new Promise<void>((resolve, reject) => ftruncate(fd, pieces.reduce((n, p) => n + p.length, 0), (err) => (err ? reject(err) : resolve())));
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
 * Waits for the background writes of files under `folder` (every one when it is omitted) and forgets them, and removes
 * the reservations under it that no write took (reserveBackgroundWrite); throws
 * the first failure as an Error naming its file (the others are still waited for, so none is left running).
 */
export async function settleBackgroundWrites(folder?: string): Promise<void> {
  const prefix = folder === undefined ? '' : folder.endsWith(sep) ? folder : folder + sep;
  for (const [path, r] of [...reservations]) {
    if (!path.startsWith(prefix)) continue;
    reservations.delete(path);
    await r.ready;
    drop(r);
  }
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
