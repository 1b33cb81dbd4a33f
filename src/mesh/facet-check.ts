import type { Mesh } from './types.ts';

/** A description of the first boundary facet that is not a boundary edge/point of the cells, or null.
 *  1D: each facet must be an end point (a vertex of exactly one cell). 2D: each facet must be an edge of exactly one
 *  cell, run in the same direction as in that counter-clockwise cell (so the domain is on its left), and listed once.
 *  3D facets are only range-checked by the caller. */
export function findFacetProblem(mesh: Mesh): { facet: number; problem: string } | null {
  if (mesh.dim === 1) return findPointFacetProblem(mesh);
  if (mesh.dim === 2) return findEdgeFacetProblem(mesh);
  return null;
}

function findPointFacetProblem(mesh: Mesh): { facet: number; problem: string } | null {
  const incidence = new Int32Array(mesh.nVertices);
  for (let k = 0; k < mesh.cells.length; k++) incidence[mesh.cells[k]!]!++;
  const seen = new Uint8Array(mesh.nVertices);
  for (let f = 0; f < mesh.nFacets; f++) {
    const v = mesh.facets[f]!;
    if (seen[v]) return { facet: f, problem: `vertex ${v} is listed as a boundary facet twice` };
    seen[v] = 1;
    if (incidence[v] !== 1) {
      return { facet: f, problem: `vertex ${v} belongs to ${incidence[v]} cells; a boundary point belongs to exactly one` };
    }
  }
  return null;
}

function findEdgeFacetProblem(mesh: Mesh): { facet: number; problem: string } | null {
  const { facets, nFacets, nVertices, cells, verticesPerCell: n } = mesh;
  // Facets grouped by their first vertex (compressed rows), so each cell edge finds its facet in O(1).
  const start = new Int32Array(nVertices + 1);
  for (let f = 0; f < nFacets; f++) start[facets[2 * f]! + 1]!++;
  for (let v = 0; v < nVertices; v++) start[v + 1]! += start[v]!;
  const byFirst = new Int32Array(nFacets);
  const fill = start.slice(0, nVertices);
  for (let f = 0; f < nFacets; f++) byFirst[fill[facets[2 * f]!]!++] = f;

  for (let v = 0; v < nVertices; v++) {
    for (let p = start[v]!; p < start[v + 1]!; p++) {
      for (let q = p + 1; q < start[v + 1]!; q++) {
        if (facets[2 * byFirst[p]! + 1] === facets[2 * byFirst[q]! + 1]) {
          return { facet: byFirst[q]!, problem: `it repeats facet ${byFirst[p]}` };
        }
      }
    }
  }

  const forward = new Int32Array(nFacets);
  const backward = new Int32Array(nFacets);
  for (let c = 0; c < mesh.nCells; c++) {
    const base = c * n;
    for (let k = 0; k < n; k++) {
      const a = cells[base + k]!;
      const b = cells[base + ((k + 1) % n)]!;
      for (let p = start[a]!; p < start[a + 1]!; p++) {
        const f = byFirst[p]!;
        if (facets[2 * f + 1] === b) forward[f]!++;
      }
      for (let p = start[b]!; p < start[b + 1]!; p++) {
        const f = byFirst[p]!;
        if (facets[2 * f + 1] === a) backward[f]!++;
      }
    }
  }

  for (let f = 0; f < nFacets; f++) {
    const edge = `(${facets[2 * f]}, ${facets[2 * f + 1]})`;
    if (forward[f] === 1 && backward[f] === 0) continue;
    if (forward[f]! + backward[f]! === 0) return { facet: f, problem: `edge ${edge} is not an edge of any cell` };
    if (forward[f]! + backward[f]! > 1) {
      return { facet: f, problem: `edge ${edge} is shared by ${forward[f]! + backward[f]!} cells, so it is not on the boundary` };
    }
    return {
      facet: f,
      problem: `edge ${edge} runs clockwise (domain on its right); list it as (${facets[2 * f + 1]}, ${facets[2 * f]})`,
    };
  }
  return null;
}
