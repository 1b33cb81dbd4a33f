/** The shared control words of the load worker (load-ahead.ts on the main thread, load-worker.ts in the worker): one
 *  Int32Array over a SharedArrayBuffer, and the requested time as a Float64 after it. Every word is read and written
 *  with Atomics, so the plain writes before a store (the time, the slot, the vector) are seen after the matching load. */
export const STATE = 0, REQUEST = 1, DONE = 2, SLOT = 3, STOP = 4;
/** The next chunk of cells to take (Atomics.add by either thread) and the chunks finished, of the current request. */
export const NEXT = 5, FINISHED = 6;
/** Cells per chunk by default: both threads take chunks of the current load until none is left (about 256 chunks at
 *  a million unknowns; one atomic addition each). */
export const CHUNK = 8192;
/** STATE values: the worker is loading its modules, is waiting for requests, or failed (the main thread then
 *  assembles every load itself). */
export const STARTING = 0, READY = 1, FAILED = 2;
export const CONTROL_WORDS = 8;
/** Bytes of the control block: the Int32 words, then one Float64 (the time of the request). */
export const CONTROL_BYTES = CONTROL_WORDS * 4 + 8;
export const timeView = (buf: SharedArrayBuffer): Float64Array => new Float64Array(buf, CONTROL_WORDS * 4, 1);

/** What the worker is started with (workerData): the control block, the two output vectors, the cell vectors of the
 *  current load (nCells · L), the load geometry with its arrays in shared memory, and the source function's text. */
export interface LoadWorkerData {
  control: SharedArrayBuffer;
  outputs: [SharedArrayBuffer, SharedArrayBuffer];
  perCell: SharedArrayBuffer;
  chunk: number;
  geometry: import('./load.ts').LoadGeometry;
  source: string;
}
