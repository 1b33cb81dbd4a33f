// How large a solver's output file rungs reads: a file above the limit is refused before a byte of it is read, naming
// the file, its size and the limit. The default follows the memory this machine has free, divided by what reading
// costs per byte of file.
import { freemem, totalmem } from 'node:os';
import { getHeapStatistics } from 'node:v8';
import { RungsInputError } from '../../errors.ts';
import { placeOf, type LevelRef } from '../where.ts';

/**
 * Peak memory per byte of a VTK file, for reading it and turning it into a rungs mesh, space and field
 * (readVtkFile + gridToField), measured with test/bench/external-file.bench.ts on this 2-core, 24 GB machine: a
 * legacy P1 file of 1000² squares (85.7 MB, 1 002 001 points, 2M cells) raised the peak RSS of a fresh process by
 * 587 MiB, 7.2 bytes per byte of file; the same grid as .vtu (97.3 MB) by 702 MiB, 7.6 (the reading alone, streamed:
 * 170 and 150 MiB; the mesh, its checks and the space take the rest). Rounded up: a file written with fewer digits
 * holds more values per byte.
 */
export const READ_BYTES_PER_FILE_BYTE = 8;

/** What the machine offers, in bytes. */
export interface MachineMemory {
  /** Physical memory (os.totalmem). */
  total: number;
  /** Memory available to new allocations now (os.freemem: MemAvailable on Linux), capped by a cgroup limit. */
  available: number;
  /** V8's heap limit (v8.getHeapStatistics().heap_size_limit): bounds JavaScript objects, not typed arrays. */
  heapLimit: number;
}

/** The machine's memory as rungs counts it (see MachineMemory). */
export function machineMemory(): MachineMemory {
  const total = totalmem();
  // process.constrainedMemory (Node 20, experimental) gives a cgroup limit, or 0 / a huge value when there is none.
  const constrained = (process as { constrainedMemory?: () => number | undefined }).constrainedMemory?.() ?? 0;
  const cap = constrained > 0 && constrained < total ? constrained - process.memoryUsage.rss() : Infinity;
  return { total, available: Math.max(0, Math.min(freemem(), cap)), heapLimit: getHeapStatistics().heap_size_limit };
}

/**
 * The default largest output file: what the machine has available, divided by READ_BYTES_PER_FILE_BYTE. The heap
 * limit does not enter: the reader keeps one chunk of text and its arrays are typed arrays, outside the heap.
 */
export function defaultMaxOutputBytes(mem: MachineMemory = machineMemory()): number {
  return Math.floor(mem.available / READ_BYTES_PER_FILE_BYTE);
}

/** "12.9 GB (12884901888 bytes)". */
export function showBytes(bytes: number): string {
  const units: [number, string][] = [[1e9, 'GB'], [1e6, 'MB'], [1e3, 'kB']];
  for (const [size, unit] of units) {
    if (bytes >= size) return `${Number((bytes / size).toPrecision(3))} ${unit} (${bytes} bytes)`;
  }
  return `${bytes} bytes`;
}

/** The limit on output files and where it comes from, for messages. */
export interface OutputLimit {
  bytes: number;
  /** "maxOutputBytes of the study's external({ … })", or how the default was found. */
  source: string;
}

/** The limit a level reads with: the study's own maxOutputBytes, or the machine's default. */
export function outputLimit(maxOutputBytes: number | undefined): OutputLimit {
  if (maxOutputBytes !== undefined) return { bytes: maxOutputBytes, source: 'maxOutputBytes in the study\'s external({ … })' };
  const mem = machineMemory();
  return {
    bytes: defaultMaxOutputBytes(mem),
    source: `the default: ${showBytes(mem.available)} of memory available / ${READ_BYTES_PER_FILE_BYTE} bytes of memory per byte read`,
  };
}

/** Refuses a file of `size` bytes above the limit, before it is read. */
export function checkOutputSize(file: string, size: number, limit: OutputLimit | undefined, ref: LevelRef | undefined): void {
  if (!limit || size <= limit.bytes) return;
  throw new RungsInputError(
    `${placeOf(ref, file)}: the file is ${showBytes(size)}, more than the limit of ${showBytes(limit.bytes)} on a solver's output file ` +
      `(${limit.source}); it was not read. Write a smaller file (a coarser level, fewer arrays, fewer digits) or, on a machine ` +
      'with the memory, raise external({ maxOutputBytes })',
    file,
  );
}
