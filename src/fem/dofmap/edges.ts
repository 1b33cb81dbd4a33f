import type { Mesh } from '../../mesh/types.ts';

/** Numbers the distinct edges of a mesh given each cell's local edges as vertex pairs.
 *  Buckets by the smaller vertex (O(n), no hashing, no per-edge object).
 *  Returns cellEdges[c * nLocalEdges + e] = global edge index. */
export function numberEdges(mesh: Mesh, localEdges: number[][]): { nEdges: number; cellEdges: Int32Array } {
  const { nCells, nVertices, cells, verticesPerCell: vpc } = mesh;
  const ne = localEdges.length;
  const cellEdges = new Int32Array(nCells * ne);
  if (ne === 0) return { nEdges: 0, cellEdges };
  // Count cell-edges per smaller vertex.
  const start = new Int32Array(nVertices + 1);
  for (let c = 0; c < nCells; c++) {
    for (let e = 0; e < ne; e++) {
      const a = cells[c * vpc + localEdges[e][0]];
      const b = cells[c * vpc + localEdges[e][1]];
      start[(a < b ? a : b) + 1]++;
    }
  }
  for (let v = 0; v < nVertices; v++) start[v + 1] += start[v];
  const fill = start.slice(0, nVertices);
  const other = new Int32Array(nCells * ne); // larger vertex per slot
  const slotId = new Int32Array(nCells * ne); // edge index per slot
  let nEdges = 0;
  for (let c = 0; c < nCells; c++) {
    for (let e = 0; e < ne; e++) {
      const a = cells[c * vpc + localEdges[e][0]];
      const b = cells[c * vpc + localEdges[e][1]];
      const lo = a < b ? a : b;
      const hi = a < b ? b : a;
      let id = -1;
      for (let s = start[lo]; s < fill[lo]; s++) if (other[s] === hi) { id = slotId[s]; break; }
      if (id < 0) {
        id = nEdges++;
        other[fill[lo]] = hi;
        slotId[fill[lo]] = id;
        fill[lo]++;
      }
      cellEdges[c * ne + e] = id;
    }
  }
  return { nEdges, cellEdges };
}
