import type { Mesh } from '../../mesh/types.ts';

/** Numbers the distinct faces of a 3D mesh given each cell's local faces as vertex lists (3 for a triangle face,
 *  4 for a quadrilateral one). Two cells share a face when they share its vertex set; faces are bucketed by their
 *  smallest vertex and compared by their sorted vertices (O(n), no hashing, no per-face object).
 *  Returns cellFaces[c * nLocalFaces + f] = global face index. */
export function numberFaces(mesh: Mesh, localFaces: number[][]): { nFaces: number; cellFaces: Int32Array } {
  const { nCells, nVertices, cells, verticesPerCell: vpc } = mesh;
  const nf = localFaces.length;
  const cellFaces = new Int32Array(nCells * nf);
  if (nf === 0) return { nFaces: 0, cellFaces };
  const width = Math.max(...localFaces.map((f) => f.length));
  const sorted = new Int32Array(width);
  const sortFace = (c: number, f: number): number => {
    const fv = localFaces[f];
    const m = fv.length;
    for (let i = 0; i < m; i++) sorted[i] = cells[c * vpc + fv[i]];
    // Insertion sort of 3 or 4 vertices.
    for (let i = 1; i < m; i++) {
      const v = sorted[i];
      let j = i - 1;
      while (j >= 0 && sorted[j] > v) { sorted[j + 1] = sorted[j]; j--; }
      sorted[j + 1] = v;
    }
    return m;
  };
  const start = new Int32Array(nVertices + 1);
  for (let c = 0; c < nCells; c++) for (let f = 0; f < nf; f++) { sortFace(c, f); start[sorted[0] + 1]++; }
  for (let v = 0; v < nVertices; v++) start[v + 1] += start[v];
  const fill = start.slice(0, nVertices);
  // The other (width − 1) sorted vertices of each slot's face, and the face index of the slot.
  const rest = new Int32Array(nCells * nf * (width - 1)).fill(-1);
  const slotId = new Int32Array(nCells * nf);
  let nFaces = 0;
  for (let c = 0; c < nCells; c++) {
    for (let f = 0; f < nf; f++) {
      const m = sortFace(c, f);
      const lo = sorted[0];
      let id = -1;
      for (let s = start[lo]; s < fill[lo] && id < 0; s++) {
        let same = true;
        for (let i = 1; i < width; i++) if (rest[s * (width - 1) + i - 1] !== (i < m ? sorted[i] : -1)) { same = false; break; }
        if (same) id = slotId[s];
      }
      if (id < 0) {
        id = nFaces++;
        const s = fill[lo]++;
        for (let i = 1; i < width; i++) rest[s * (width - 1) + i - 1] = i < m ? sorted[i] : -1;
        slotId[s] = id;
      }
      cellFaces[c * nf + f] = id;
    }
  }
  return { nFaces, cellFaces };
}
