/** The coordinates and cells of a large mesh in shared memory from the start. The cell team (src/fem/team/) hands a
 *  level's cells to worker threads through SharedArrayBuffers; a mesh built on the heap has its arrays copied there
 *  at the first job (sharedMesh), and until the heap arrays are collected the level holds both: at 1024² P1 squares
 *  17 MB of coordinates and 25 MB of cells more at the level's peak (measured with the P1 ladder of
 *  test/bench/study.bench.ts). The generators of this folder allocate large meshes here instead, so that the team
 *  takes their arrays as they are. A SharedArrayBuffer's views behave as any typed array's for every use in rungs. */

/** Meshes of at least this many cells: the cell team's threshold (src/fem/team/shared.ts, TEAM_MIN_CELLS, derives
 *  from it), below which no array of the mesh goes to another thread. */
export const SHARED_MIN_CELLS = 32768;

/** n zeros: in shared memory for a mesh of at least SHARED_MIN_CELLS cells, else on the heap. */
export function meshFloat64(n: number, nCells: number): Float64Array {
  return nCells >= SHARED_MIN_CELLS ? new Float64Array(new SharedArrayBuffer(8 * n)) : new Float64Array(n);
}

/** As meshFloat64, for indices. */
export function meshInt32(n: number, nCells: number): Int32Array {
  return nCells >= SHARED_MIN_CELLS ? new Int32Array(new SharedArrayBuffer(4 * n)) : new Int32Array(n);
}
