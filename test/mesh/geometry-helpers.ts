// Independent geometry used by the mesh tests: written from the textbook formulas, not from src/mesh.
import type { Mesh } from '../../src/mesh/types.ts';

export function point(mesh: Mesh, v: number): number[] {
  return Array.from(mesh.coords.subarray(v * mesh.dim, (v + 1) * mesh.dim));
}

/** Signed polygon area by the shoelace formula (Gauss's area formula; common practice, no source). */
export function polygonArea(points: number[][]): number {
  let twice = 0;
  for (let k = 0; k < points.length; k++) {
    const [xa, ya] = points[k]!;
    const [xb, yb] = points[(k + 1) % points.length]!;
    twice += xa! * yb! - xb! * ya!;
  }
  return twice / 2;
}

export function cellPoints(mesh: Mesh, c: number): number[][] {
  const out: number[][] = [];
  for (let k = 0; k < mesh.verticesPerCell; k++) out.push(point(mesh, mesh.cells[c * mesh.verticesPerCell + k]!));
  return out;
}

export function cellAreas(mesh: Mesh): number[] {
  const areas: number[] = [];
  for (let c = 0; c < mesh.nCells; c++) areas.push(polygonArea(cellPoints(mesh, c)));
  return areas;
}

export function distance(p: number[], q: number[]): number {
  return Math.hypot(...p.map((x, k) => x - q[k]!));
}

/** Largest distance between two vertices of a cell. */
export function bruteDiameter(mesh: Mesh, c: number): number {
  const pts = cellPoints(mesh, c);
  let d = 0;
  for (const p of pts) for (const q of pts) d = Math.max(d, distance(p, q));
  return d;
}

/** Total length of the boundary facets carrying a tag name (2D). */
export function taggedLength(mesh: Mesh, name: string): number {
  const tag = mesh.tagNames.indexOf(name);
  let length = 0;
  for (let f = 0; f < mesh.nFacets; f++) {
    if (mesh.facetTags[f] !== tag) continue;
    length += distance(point(mesh, mesh.facets[2 * f]!), point(mesh, mesh.facets[2 * f + 1]!));
  }
  return length;
}

/** Edges of a 2D mesh between consecutive cell vertices, undirected key → list of directed uses. */
export function edgeUses(mesh: Mesh): Map<string, Array<[number, number]>> {
  const uses = new Map<string, Array<[number, number]>>();
  const n = mesh.verticesPerCell;
  for (let c = 0; c < mesh.nCells; c++) {
    for (let k = 0; k < n; k++) {
      const a = mesh.cells[c * n + k]!;
      const b = mesh.cells[c * n + ((k + 1) % n)]!;
      const key = `${Math.min(a, b)}-${Math.max(a, b)}`;
      const list = uses.get(key) ?? [];
      list.push([a, b]);
      uses.set(key, list);
    }
  }
  return uses;
}

/** Checks that the mesh is a conforming 2D tiling of a simply connected domain: Euler's formula V − E + F = 1
 *  for a planar disc (Euler 1758; common practice, no source), interior edges used twice in opposite directions,
 *  and the edges used once are exactly the boundary facets, in the same direction. Returns a list of problems. */
export function conformityProblems(mesh: Mesh): string[] {
  const problems: string[] = [];
  const uses = edgeUses(mesh);
  const euler = mesh.nVertices - uses.size + mesh.nCells;
  if (euler !== 1) problems.push(`V - E + F = ${euler}`);
  const boundary = new Set<string>();
  for (const list of uses.values()) {
    if (list.length === 1) boundary.add(`${list[0]![0]}>${list[0]![1]}`);
    else if (list.length !== 2 || list[0]![0] !== list[1]![1] || list[0]![1] !== list[1]![0]) {
      problems.push(`edge used as ${JSON.stringify(list)}`);
    }
  }
  const facets = new Set<string>();
  for (let f = 0; f < mesh.nFacets; f++) facets.add(`${mesh.facets[2 * f]}>${mesh.facets[2 * f + 1]}`);
  if (facets.size !== mesh.nFacets) problems.push('repeated facet');
  for (const key of boundary) if (!facets.has(key)) problems.push(`boundary edge ${key} is not a facet`);
  for (const key of facets) if (!boundary.has(key)) problems.push(`facet ${key} is not a boundary edge`);
  return problems;
}
