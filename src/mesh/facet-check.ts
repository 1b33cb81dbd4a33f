import { faceNormalOutward, sortSmall } from './boundary-faces.ts';
import { CELL_FACES } from './cell-faces.ts';
import type { Mesh } from './types.ts';

/** A description of the first boundary facet that is not a boundary edge/point of the cells, or null.
 *  1D: each facet must be an end point (a vertex of exactly one cell). 2D: each facet must be an edge of exactly one
 *  cell, run in the same direction as in that counter-clockwise cell (so the domain is on its left), and listed once.
 *  3D: each facet must be a face of exactly one cell (a quadrilateral in the cyclic order of that face), listed once,
 *  with its normal pointing out of the cell (see findBoundaryFaces). Vertex indices are range-checked by the caller
 *  first. */
export function findFacetProblem(mesh: Mesh): { facet: number; problem: string } | null {
  if (mesh.dim === 1) return findPointFacetProblem(mesh);
  if (mesh.dim === 2) return findEdgeFacetProblem(mesh);
  if (mesh.cellKind === 'tetrahedron' || mesh.cellKind === 'hexahedron') return findFaceFacetProblem(mesh, mesh.cellKind);
  return null;
}

function findFaceFacetProblem(mesh: Mesh, kind: 'tetrahedron' | 'hexahedron'): { facet: number; problem: string } | null {
  const { facets, nFacets, nVertices, cells, coords, verticesPerCell: vpc } = mesh;
  const faces = CELL_FACES[kind];
  const m = faces[0].length, nf = faces.length;
  // Only the facets are indexed (a few per boundary vertex), grouped by their smallest vertex; each cell face then
  // looks for itself in one short group: time linear in the cells, memory linear in vertices and facets.
  const keys = new Int32Array(nFacets * m);
  const start = new Int32Array(nVertices + 1);
  const key = new Int32Array(4);
  const faceAt = (o: number): string => `(${Array.from(facets.subarray(o, o + m)).join(', ')})`;
  for (let f = 0; f < nFacets; f++) {
    const o = f * m;
    for (let i = 0; i < m; i++) key[i] = facets[o + i]!;
    sortSmall(key, m);
    for (let i = 1; i < m; i++) if (key[i] === key[i - 1]) return { facet: f, problem: `face ${faceAt(o)} repeats vertex ${key[i]}` };
    keys.set(key.subarray(0, m), o);
    start[key[0]! + 1]!++;
  }
  for (let v = 0; v < nVertices; v++) start[v + 1]! += start[v]!;
  const byLowest = new Int32Array(nFacets);
  const fill = start.slice(0, nVertices);
  for (let f = 0; f < nFacets; f++) byLowest[fill[keys[f * m]!]!++] = f;
  /** Whether facet g's sorted vertices after the first equal from[fo + 1 ..] (the first is equal by grouping). */
  const sameKey = (g: number, from: Int32Array, fo: number): boolean => {
    for (let i = 1; i < m; i++) if (keys[g * m + i] !== from[fo + i]) return false;
    return true;
  };
  for (let v = 0; v < nVertices; v++) {
    for (let p = start[v]!; p < start[v + 1]!; p++) {
      for (let q = p + 1; q < start[v + 1]!; q++) {
        if (sameKey(byLowest[q]!, keys, byLowest[p]! * m)) {
          const [f, g] = byLowest[p]! < byLowest[q]! ? [byLowest[p]!, byLowest[q]!] : [byLowest[q]!, byLowest[p]!];
          return { facet: g, problem: `it repeats facet ${f}` };
        }
      }
    }
  }
  const count = new Int32Array(nFacets);
  const slot = new Int32Array(nFacets);
  for (let c = 0; c * vpc < cells.length; c++) {
    for (let lf = 0; lf < nf; lf++) {
      const fv = faces[lf]!;
      for (let i = 0; i < m; i++) key[i] = cells[c * vpc + fv[i]!]!;
      sortSmall(key, m);
      const lo = key[0]!;
      for (let p = start[lo]!; p < start[lo + 1]!; p++) {
        const f = byLowest[p]!;
        if (sameKey(f, key, 0) && count[f]++ === 0) slot[f] = c * nf + lf;
      }
    }
  }
  const cycle = new Int32Array(4);
  const at = (v: number): number => { for (let i = 0; i < m; i++) if (cycle[i] === v) return i; return -1; };
  for (let f = 0; f < nFacets; f++) {
    const o = f * m;
    if (count[f] === 0) return { facet: f, problem: `face ${faceAt(o)} is not a face of any cell` };
    if (count[f]! > 1) return { facet: f, problem: `face ${faceAt(o)} is shared by ${count[f]} cells, so it is not on the boundary` };
    const c = Math.floor(slot[f]! / nf), lf = slot[f]! - c * nf;
    const base = c * vpc;
    for (let i = 0; i < m; i++) cycle[i] = cells[base + faces[lf]![i]!]!;
    if (m === 4) {
      // Consecutive facet vertices must be neighbours on the cell's face (same cycle, either way round).
      for (let i = 0; i < 4; i++) {
        const p = at(facets[o + i]!), q = at(facets[o + ((i + 1) % 4)]!);
        if ((p - q + 4) % 4 !== 1 && (q - p + 4) % 4 !== 1) {
          return { facet: f, problem: `face ${faceAt(o)} crosses itself; list its vertices around the face, e.g. (${Array.from(cycle).join(', ')})` };
        }
      }
    }
    const a = facets[o]!, b = facets[o + 1]!, d = facets[o + 2]!, e = m === 4 ? facets[o + 3]! : -1;
    if (!faceNormalOutward(coords, cells, kind, base, lf, a, b, d, e)) {
      const turned = m === 3 ? [a, d, b] : [a, e, d, b];
      return { facet: f, problem: `face ${faceAt(o)} has its normal pointing into cell ${c}; list it as (${turned.join(', ')})` };
    }
  }
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
