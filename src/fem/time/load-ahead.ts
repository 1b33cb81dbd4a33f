import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { cellLoads, loadGeometry, rebuildable, type LoadGeometry, type SourceFn } from './load.ts';
import {
  CHUNK, CONTROL_BYTES, CONTROL_WORDS, DONE, FAILED, FINISHED, NEXT, READY, REQUEST, SLOT, STARTING, STATE, STOP, timeView, type LoadWorkerData,
} from './load-protocol.ts';
import type { MixedSpace } from '../space/types.ts';
import { ruleFor } from '../quadrature/index.ts';

/** Below this many evaluations of f per load vector (cells × quadrature points) the loads stay on the main thread.
 *  A worker costs about 1 s of CPU to start (tsx compiling the load modules in the new thread; 0.9–1.6 s wall
 *  measured at load average 7) and a copy of the mesh; one evaluation costs about 50 ns (2D P1, 1024² squares: 12.6M
 *  points in 0.6 s, measured), so at 2^20 points a load takes about 0.05 s and the worker pays for itself within
 *  about twenty loads; it starts beside the setup (matrices and multigrid), which at that size takes about as long,
 *  so the main thread does not wait for it (it assembles the loads itself until the worker is ready). */
export const LOAD_WORKER_MIN_POINTS = 1 << 20;

/** Load vectors F(t) asked for one ahead: `request` starts F(t) into one of two vectors, `take` returns it. With a
 *  worker thread, the worker computes the cells' vectors chunk by chunk while the main thread solves; at `take` the
 *  main thread computes the chunks still left (so neither thread idles while the other has work: on 2 cores the load
 *  costs more than a step's solve), and the worker adds the cells' vectors up in cell order. Without a worker (or
 *  until it is ready, or after it failed) `take` assembles F(t) on the main thread. Either way every cell's vector
 *  comes from the same operations on the same values and the vectors are added in cell order, so F(t) is the same
 *  bits (assuming f and fSource are the same function). One request at a time. */
/** How long a forced worker (worker: true) is waited for to start: a guard against a hang only. */
const START_WAIT_MS = 120_000;

export interface LoadAhead {
  request(slot: 0 | 1, t: number): void;
  take(slot: 0 | 1): Float64Array;
  /** Load vectors the worker assembled (the main thread may have computed some of their chunks). */
  readonly onWorker: number;
  /** Chunks of cells of those vectors the main thread computed itself (of `chunks` each). */
  readonly chunksHere: number;
  readonly chunks: number;
  close(): void;
}

export interface LoadAheadOptions {
  space: MixedSpace;
  loadDegree: number;
  f: SourceFn;
  /** f as the text of a function expression (HeatProblem.fSource); without it no worker. */
  fSource?: string;
  /** 'auto' (default): a worker when fSource is given, the element can be rebuilt, there are at least two cores and
   *  the load has at least LOAD_WORKER_MIN_POINTS points; true: a worker whenever it can be built, waited for to start
   *  before the first load is asked of it (tests); false: none. */
  worker?: boolean | 'auto';
  /** Cells per chunk (default CHUNK; tests use small ones so that both threads take several). */
  chunkCells?: number;
}

export function loadAhead(o: LoadAheadOptions): LoadAhead {
  const g = loadGeometry(o.space, o.loadDegree);
  const field = o.space.fields[0];
  const cells = cellLoads(g, o.f, { mesh: o.space.mesh, element: field.space.scalar.element });
  const serial = (t: number, out: Float64Array): void => { out.fill(0); cells(t, 0, g.nCells, out, null); };
  const chunk = o.chunkCells ?? CHUNK;
  const nChunks = Math.ceil(g.nCells / chunk);
  const want = o.worker ?? 'auto';
  const points = g.nCells * quadraturePoints(g);
  const use = want !== false && o.fSource !== undefined && rebuildable(o.space) &&
    (want === true || (availableParallelism() >= 2 && points >= LOAD_WORKER_MIN_POINTS));
  let worker: Worker | null = null;
  let control: Int32Array | null = null, time: Float64Array | null = null;
  let slots: [Float64Array, Float64Array];
  let perCell: Float64Array | null = null;
  if (use) {
    const controlBuf = new SharedArrayBuffer(CONTROL_BYTES);
    const outputs: [SharedArrayBuffer, SharedArrayBuffer] = [
      new SharedArrayBuffer(g.nDofs * 8), new SharedArrayBuffer(g.nDofs * 8),
    ];
    const perCellBuf = new SharedArrayBuffer(g.nCells * g.L * 8);
    const data: LoadWorkerData = { control: controlBuf, outputs, perCell: perCellBuf, geometry: sharedGeometry(g), source: o.fSource!, chunk };
    try {
      worker = new Worker(new URL('./load-worker-entry.mjs', import.meta.url), { workerData: data });
      // Never keeps the process alive; an error in the thread shows as STATE = FAILED (the main thread does not
      // return to its event loop while it steps, so it could not hear the worker's events).
      worker.unref();
      worker.on('error', () => { Atomics.store(control!, STATE, FAILED); });
      control = new Int32Array(controlBuf, 0, CONTROL_WORDS);
      time = timeView(controlBuf);
      slots = [new Float64Array(outputs[0]), new Float64Array(outputs[1])];
      perCell = new Float64Array(perCellBuf);
    } catch {
      worker = null;
      slots = [new Float64Array(g.nDofs), new Float64Array(g.nDofs)];
    }
  } else slots = [new Float64Array(g.nDofs), new Float64Array(g.nDofs)];

  let pending: { slot: 0 | 1; t: number; remote: number } | null = null;
  let sequence = 0, onWorker = 0, chunksHere = 0;
  // With worker: true (tests), the first request waits for the worker to have started or failed (up to a bound
  // that only guards against a hang), so that the worker's part does not depend on the machine's speed.
  let waitForStart = want === true;
  const ready = (): boolean => {
    if (control === null) return false;
    if (waitForStart) {
      waitForStart = false;
      const until = performance.now() + START_WAIT_MS;
      while (Atomics.load(control, STATE) === STARTING && performance.now() < until) Atomics.wait(control, STATE, STARTING, 100);
    }
    return Atomics.load(control, STATE) === READY;
  };
  return {
    request(slot, t) {
      if (pending) throw new Error('internal: a load was requested before the last one was taken');
      if (ready()) {
        time![0] = t;
        Atomics.store(control!, SLOT, slot);
        Atomics.store(control!, NEXT, 0);
        Atomics.store(control!, FINISHED, 0);
        Atomics.store(control!, REQUEST, ++sequence);
        Atomics.notify(control!, REQUEST);
        pending = { slot, t, remote: sequence };
      } else pending = { slot, t, remote: 0 };
    },
    take(slot) {
      if (!pending || pending.slot !== slot) throw new Error('internal: a load was taken that was not requested');
      const { t, remote } = pending;
      pending = null;
      const out = slots[slot];
      if (remote) {
        // The chunks of cells the worker has not taken yet are computed here (their cell vectors, into the shared
        // ones), then the worker adds all up in cell order; this thread blocks until it is done (or has failed: it
        // then also moves DONE on).
        for (let k = Atomics.add(control!, NEXT, 1); k < nChunks && Atomics.load(control!, STATE) === READY; k = Atomics.add(control!, NEXT, 1)) {
          cells(t, k * chunk, Math.min(g.nCells, (k + 1) * chunk), null, perCell);
          chunksHere++;
          Atomics.add(control!, FINISHED, 1);
          Atomics.notify(control!, FINISHED);
        }
        while (Atomics.load(control!, DONE) !== remote && Atomics.load(control!, STATE) !== FAILED) {
          Atomics.wait(control!, DONE, Atomics.load(control!, DONE), 1000);
        }
        if (Atomics.load(control!, DONE) === remote && Atomics.load(control!, STATE) === READY) { onWorker++; return out; }
      }
      serial(t, out);
      return out;
    },
    get onWorker() { return onWorker; },
    get chunksHere() { return chunksHere; },
    chunks: nChunks,
    close() {
      if (!worker || !control) return;
      Atomics.store(control, STOP, 1);
      Atomics.store(control, REQUEST, ++sequence);
      Atomics.notify(control, REQUEST);
      void worker.terminate();
      worker = null;
    },
  };
}

/** Points of the load rule per cell (the rule loadAssembler uses). */
function quadraturePoints(g: LoadGeometry): number {
  return ruleFor(g.cellKind, Math.max(0, g.loadDegree)).nPoints;
}

/** A copy of the geometry with its arrays in shared memory (read by the worker without a copy of its own). The
 *  unknowns per cell of a P1 field alone are the cells' vertices: then one array serves both. */
function sharedGeometry(g: LoadGeometry): LoadGeometry {
  const share = <T extends Float64Array | Int32Array>(a: T): T => {
    const b = new (a.constructor as new (buf: SharedArrayBuffer) => T)(new SharedArrayBuffer(a.byteLength));
    b.set(a);
    return b;
  };
  const cells = share(g.cells);
  let same = g.cellDofs.length === g.cells.length;
  for (let i = 0; same && i < g.cells.length; i++) same = g.cellDofs[i] === g.cells[i];
  return { ...g, coords: share(g.coords), cells, cellDofs: same ? cells : share(g.cellDofs) };
}
