// The load worker thread: rebuilds the source function from its text and the load assembler from the shared
// geometry; for each request of the main thread (load-ahead.ts) it computes the cell vectors of F(t) chunk by chunk
// (the main thread takes chunks too once it is free), then adds them up in cell order into the requested vector.
import { workerData } from 'node:worker_threads';
import { cellLoads, scatterCells, type CellLoads, type SourceFn } from './load.ts';
import {
  DONE, FAILED, FINISHED, NEXT, READY, REQUEST, SLOT, STATE, STOP, timeView, type LoadWorkerData,
} from './load-protocol.ts';

const data = workerData as LoadWorkerData;
const control = new Int32Array(data.control);
const time = timeView(data.control);
const outputs = data.outputs.map((b) => new Float64Array(b));
const perCell = new Float64Array(data.perCell);
const g = data.geometry;
const CHUNK = data.chunk;
const nChunks = Math.ceil(g.nCells / CHUNK);

let cells: CellLoads | null = null;
try {
  // The text is a function expression closing over globals only (HeatProblem.fSource).
  const f = new Function(`"use strict";\nreturn (${data.source});`)() as SourceFn;
  if (typeof f !== 'function') throw new Error('the source text is not a function');
  cells = cellLoads(g, f);
  Atomics.store(control, STATE, READY);
} catch {
  Atomics.store(control, STATE, FAILED);
}
Atomics.notify(control, STATE);

// Blocking waits: this thread has nothing else to do, and the main thread never yields to an event loop while it steps.
let seen = 0;
while (cells) {
  Atomics.wait(control, REQUEST, seen);
  if (Atomics.load(control, STOP)) break;
  seen = Atomics.load(control, REQUEST);
  const t = time[0];
  try {
    for (let k = Atomics.add(control, NEXT, 1); k < nChunks; k = Atomics.add(control, NEXT, 1)) {
      cells(t, k * CHUNK, Math.min(g.nCells, (k + 1) * CHUNK), null, perCell);
      Atomics.add(control, FINISHED, 1);
    }
  } catch {
    // The main thread assembles this load itself and meets the same error there, with its message.
    Atomics.store(control, STATE, FAILED);
    cells = null;
  }
  if (cells) {
    // The chunks the main thread took: wait until they are done (or the main thread stops, after an error of its own).
    for (let d = Atomics.load(control, FINISHED); d < nChunks && !Atomics.load(control, STOP); d = Atomics.load(control, FINISHED)) {
      Atomics.wait(control, FINISHED, d, 100);
    }
    if (Atomics.load(control, STOP)) break;
    scatterCells(g, perCell, outputs[Atomics.load(control, SLOT)]);
  }
  Atomics.store(control, DONE, seen);
  Atomics.notify(control, DONE);
}
