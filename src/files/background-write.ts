import { closeSync, constants, fsync, fsyncSync, ftruncateSync, openSync, renameSync, unlinkSync, writev } from 'node:fs';
import { unlink } from 'node:fs/promises';
import { sep } from 'node:path';
import { tempPathFor } from './atomic-write.ts';

// Large files written while the computation goes on. Putting 128 MB into the page cache costs about 0.3–0.4 s of
// one core on the machines rungs is measured on (an error map of the 2M-cell level; the same for Python's plain write,
// so it is the kernel's, not rungs's), and nothing after the write needs the file: handed to libuv's threads, it
// overlaps what the main thread does next (the next level, the local orders, the report).
//
// Same guarantees as writeFileAtomic: a temporary file beside the target, flushed, renamed over it; a reader sees the
// old file or the new one. Whoever started writes must settle them (settleBackgroundWrites) before relying on the
// files or reporting success: a failure surfaces there, naming the file.

interface Pending { done: Promise<void>; error: unknown }

// The flush as part of the write: the temporary file is opened with O_DSYNC, so that libuv's thread returns from the
// write only once the data are on disk. The write is then the only step that needs this thread's event loop to go on
// (its callback closes and renames, synchronously): that loop turns only when the main thread waits, and with a write,
// then a flush, then a rename each waiting for a turn, the finest P1 level's error file (128 MB) kept the run waiting
// 105–115 ms at its end, for a write of 17 ms and a flush of 43 ms that could have run beside the analysis. Where the
// flag does not exist (Windows), the flush is a second step as before.
const DSYNC: number | undefined = constants.O_DSYNC;
/** Flags of a fresh temporary file, and of the reserved one opened again for the write. */
const CREATE = constants.O_WRONLY | constants.O_CREAT | constants.O_EXCL | (DSYNC ?? 0);
const REOPEN = constants.O_WRONLY | (DSYNC ?? 0);

/** Writes not yet settled, by target path (a second write of the same path starts after the first). */
const pending = new Map<string, Pending>();

// Space reserved ahead. On the virtual machines rungs is measured on, the first write of fresh pages into the page
// cache costs 2.3–2.8 ms per MB (128 MB: 0.30–0.37 s in one writev; the same writev over pages the file already holds:
// 17–18 ms; Node 20, AMD EPYC 2 cores, measured with a plain script): the guest's free memory is backed by the host
// only when first touched. The finest level's error file (128 MB at 1024² P1 squares) paid that at the run's end,
// where the main thread waited for it. Reserving it at the level's start (its size is known from the mesh) moves that
// cost into the level, where the libuv thread overlaps the meshing, the assembly and the multigrid's setup; its write
// then goes over pages already there.
interface Reservation { temp: string; fd: number; bytes: number; ready: Promise<void>; finished: boolean; failed: boolean }
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
  const r: Reservation = { temp, fd, bytes, ready: Promise.resolve(), finished: false, failed: false };
  r.ready = new Promise<void>((resolve) => writev(fd, pieces, 0, (err) => { if (err) r.failed = true; r.finished = true; resolve(); }));
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
  const reserved = reservations.get(path);
  reservations.delete(path);
  const entry: Pending = { done: Promise.resolve(), error: undefined };
  // Started at once when nothing is to be waited for, so that it runs beside this thread's next work: after an await
  // it would start only once that work pauses (the finest level's maps, 0.2 s; see level.ts).
  const now = !before && (!reserved || reserved.finished);
  entry.done = (now ? writeNow(path, pieces, reserved) : (async () => {
    if (before) {
      await before.done;
      if (before.error !== undefined) throw before.error; // reported with this write, which then does not start
    }
    if (reserved) await reserved.ready;
    return writeNow(path, pieces, reserved);
  })()).catch((err: unknown) => { entry.error = err; });
  pending.set(path, entry);
}

/** The write itself: the temporary file opened (the reserved one again, or a fresh one) and the pieces handed to
 *  libuv in one request before this returns; closed and renamed once written. */
function writeNow(path: string, pieces: readonly Uint8Array[], reserved: Reservation | undefined): Promise<void> {
  let r = reserved;
  if (r?.failed) { drop(r); r = undefined; }
  // The reservation's own descriptor (no O_DSYNC: the zeros need not reach the disk) is done with.
  if (r) try { closeSync(r.fd); } catch { /* closed */ }
  const temp = r?.temp ?? tempPathFor(path);
  let fd: number;
  try { fd = openSync(temp, r ? REOPEN : CREATE, 0o644); } catch (err) { return Promise.reject(err); }
  // One request (writev: libuv writes every piece in its own thread, partial writes included).
  return new Promise<number>((resolve, reject) => writev(fd, pieces as Uint8Array[], 0, (err, n) => (err ? reject(err) : resolve(n))))
    .then(async (written) => {
      // A reservation longer than the file is cut to it (reserveLevelVtu reserves no more than the file will hold).
      if (r && r.bytes > written) { ftruncateSync(fd, written); fsyncSync(fd); }
      if (DSYNC === undefined) await new Promise<void>((resolve, reject) => fsync(fd, (err) => (err ? reject(err) : resolve())));
      closeSync(fd);
      renameSync(temp, path);
    })
    .catch(async (err: unknown) => {
      try { closeSync(fd); } catch { /* already closed */ }
      await unlink(temp).catch(() => undefined);
      throw err;
    });
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
