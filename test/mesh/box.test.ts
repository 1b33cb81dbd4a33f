import { describe, expect, it } from 'vitest';
import { boxMesh, BOX_TAGS } from '../../src/mesh/box.ts';
import { findBoundaryFaces } from '../../src/mesh/boundary-faces.ts';
import { meshFromArrays } from '../../src/mesh/from-arrays.ts';
import { checkMesh } from '../../src/mesh/quality.ts';
import { RungsInputError } from '../../src/errors.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { box } from '../../src/study/domain.ts';

// Independent geometry written here from the textbook formulas, not from src/mesh.
type V3 = [number, number, number];
const P = (m: Mesh, v: number): V3 => [m.coords[3 * v]!, m.coords[3 * v + 1]!, m.coords[3 * v + 2]!];
const sub = (a: V3, b: V3): V3 => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
const cross = (a: V3, b: V3): V3 => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
const dot = (a: V3, b: V3) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
const norm = (a: V3) => Math.hypot(...a);
const cellVertices = (m: Mesh, c: number) => Array.from(m.cells.subarray(c * m.verticesPerCell, (c + 1) * m.verticesPerCell));
const facetVertices = (m: Mesh, f: number) => Array.from(m.facets.subarray(f * m.verticesPerFacet, (f + 1) * m.verticesPerFacet));
const key = (vs: number[]) => [...vs].sort((a, b) => a - b).join(',');

/** Signed volume of a tetrahedron: (b − a) · ((c − a) × (d − a)) / 6 (common practice, no source). For an
 *  axis-aligned box cell (the hexahedra here): the triple product of its three edges at vertex 0, whose sign is the
 *  orientation and whose value is the volume. */
function cellVolume(m: Mesh, c: number): number {
  const v = cellVertices(m, c).map((i) => P(m, i));
  if (m.cellKind === 'tetrahedron') return dot(sub(v[1]!, v[0]!), cross(sub(v[2]!, v[0]!), sub(v[3]!, v[0]!))) / 6;
  return dot(sub(v[1]!, v[0]!), cross(sub(v[3]!, v[0]!), sub(v[4]!, v[0]!)));
}

/** Vector area of a facet: (b − a) × (c − a) / 2 for a triangle; (c − a) × (d − b) / 2 for a planar quadrilateral
 *  (half the cross product of the diagonals; common practice, no source). */
function vectorArea(m: Mesh, f: number): V3 {
  const v = facetVertices(m, f).map((i) => P(m, i));
  const n = v.length === 3 ? cross(sub(v[1]!, v[0]!), sub(v[2]!, v[0]!)) : cross(sub(v[2]!, v[0]!), sub(v[3]!, v[1]!));
  return [n[0] / 2, n[1] / 2, n[2] / 2];
}

/** The faces of a cell found from geometry: all vertex triples of a tetrahedron; for a box cell, the 4 vertices that
 *  share the smallest or the largest value of one coordinate. */
function cellFaces(m: Mesh, c: number): number[][] {
  const vs = cellVertices(m, c);
  if (m.cellKind === 'tetrahedron') return [0, 1, 2, 3].map((skip) => vs.filter((_, i) => i !== skip));
  const out: number[][] = [];
  for (let d = 0; d < 3; d++) {
    const xs = vs.map((v) => P(m, v)[d]);
    for (const x of [Math.min(...xs), Math.max(...xs)]) out.push(vs.filter((v) => P(m, v)[d] === x));
  }
  return out;
}

const BOX = { x: [0, 2], y: [-1, 0.5], z: [1, 1.75] } as const;
const SIZE = [2, 1.5, 0.75];
const cases = [
  { cells: 'tetrahedra' as const, nx: 4, ny: 3, nz: 2 },
  { cells: 'hexahedra' as const, nx: 4, ny: 3, nz: 2 },
  { cells: 'tetrahedra' as const, nx: 1, ny: 1, nz: 1 },
  { cells: 'hexahedra' as const, nx: 3, ny: 1, nz: 5 },
];

describe.each(cases)('boxMesh of $cells, $nx × $ny × $nz', ({ cells, nx, ny, nz }) => {
  const mesh = boxMesh({ ...BOX, nx, ny, nz, cells });
  const tets = cells === 'tetrahedra';

  it('has (nx+1)(ny+1)(nz+1) vertices, 6 tetrahedra or 1 hexahedron per box, and passes checkMesh', () => {
    expect([mesh.dim, mesh.cellKind, mesh.verticesPerCell, mesh.verticesPerFacet]).toEqual(tets ? [3, 'tetrahedron', 4, 3] : [3, 'hexahedron', 8, 4]);
    expect(mesh.nVertices).toBe((nx + 1) * (ny + 1) * (nz + 1));
    expect(mesh.nCells).toBe((tets ? 6 : 1) * nx * ny * nz);
    expect(mesh.tagNames).toEqual(['left', 'right', 'bottom', 'top', 'front', 'back']);
    expect(() => checkMesh(mesh)).not.toThrow();
    // Every cell holds a main diagonal of its box, the longest segment in it (common practice, no source).
    expect(mesh.h).toBeCloseTo(Math.hypot(SIZE[0]! / nx, SIZE[1]! / ny, SIZE[2]! / nz), 14);
  });

  it('has every cell positively oriented, of volume (box / cells), summing to the box volume', () => {
    // Kuhn's six tetrahedra of a cube have equal volume 1/6 of it (each has |det| = 1 in cube units; Kuhn 1960).
    const cellVol = (SIZE[0]! / nx) * (SIZE[1]! / ny) * (SIZE[2]! / nz) / (tets ? 6 : 1);
    let total = 0, worst = 0;
    for (let c = 0; c < mesh.nCells; c++) {
      const v = cellVolume(mesh, c);
      total += v;
      worst = Math.max(worst, Math.abs(v - cellVol) / cellVol);
    }
    expect(worst).toBeLessThan(1e-12);
    expect(Math.abs(total - SIZE[0]! * SIZE[1]! * SIZE[2]!)).toBeLessThan(1e-12);
  });

  it('tags each boundary facet by the side it lies on, its normal outward, areas per tag summing to the side areas', () => {
    // left/right: x = x0/x1, bottom/top: y = y0/y1, front/back: z = z0/z1.
    const planes = [[0, BOX.x[0]], [0, BOX.x[1]], [1, BOX.y[0]], [1, BOX.y[1]], [2, BOX.z[0]], [2, BOX.z[1]]] as const;
    const sideArea = [SIZE[1]! * SIZE[2]!, SIZE[1]! * SIZE[2]!, SIZE[2]! * SIZE[0]!, SIZE[2]! * SIZE[0]!, SIZE[0]! * SIZE[1]!, SIZE[0]! * SIZE[1]!];
    const area = new Array(6).fill(0);
    const problems: string[] = [];
    for (let f = 0; f < mesh.nFacets; f++) {
      const t = mesh.facetTags[f]!;
      const [axis, value] = planes[t]!;
      if (!facetVertices(mesh, f).every((v) => P(mesh, v)[axis] === value)) problems.push(`facet ${f} is off its side ${BOX_TAGS[t]}`);
      const n = vectorArea(mesh, f);
      const outward = t % 2 === 0 ? -1 : 1;
      if (!(n[axis] * outward > 0) || n[(axis + 1) % 3] !== 0 || n[(axis + 2) % 3] !== 0) problems.push(`facet ${f} normal ${n}`);
      area[t] += norm(n);
    }
    expect(problems).toEqual([]);
    for (let t = 0; t < 6; t++) expect(area[t]).toBeCloseTo(sideArea[t]!, 12);
    expect(mesh.nFacets).toBe((tets ? 2 : 1) * 2 * (nx * ny + ny * nz + nz * nx));
  });

  it('is conforming: every face is in one cell (then it is a boundary facet) or in two cells on opposite sides', () => {
    // Were the Kuhn cuts of two neighbouring cubes to disagree, their shared square would show four triangles each in
    // one cell and in no boundary facet.
    const uses = new Map<string, Array<{ cell: number; face: number[] }>>();
    for (let c = 0; c < mesh.nCells; c++) {
      for (const face of cellFaces(mesh, c)) {
        const list = uses.get(key(face)) ?? [];
        list.push({ cell: c, face });
        uses.set(key(face), list);
      }
    }
    const boundary = new Set<string>();
    for (let f = 0; f < mesh.nFacets; f++) boundary.add(key(facetVertices(mesh, f)));
    expect(boundary.size).toBe(mesh.nFacets);
    const centroid = (c: number) => cellVertices(mesh, c).map((v) => P(mesh, v)).reduce((s, p) => [s[0] + p[0] / mesh.verticesPerCell, s[1] + p[1] / mesh.verticesPerCell, s[2] + p[2] / mesh.verticesPerCell] as V3, [0, 0, 0] as V3);
    const problems: string[] = [];
    let interior = 0;
    for (const [k, list] of uses) {
      if (list.length === 1) { if (!boundary.has(k)) problems.push(`face ${k} is on one cell only but is no boundary facet`); continue; }
      if (list.length !== 2) { problems.push(`face ${k} is on ${list.length} cells`); continue; }
      if (boundary.has(k)) problems.push(`interior face ${k} is listed as a boundary facet`);
      interior++;
      // The two cells' centroids lie on opposite sides of the face's plane.
      const pts = list[0]!.face.map((v) => P(mesh, v));
      const n = cross(sub(pts[1]!, pts[0]!), sub(pts[2]!, pts[0]!));
      const side = (c: number) => dot(n, sub(centroid(c), pts[0]!));
      if (!(side(list[0]!.cell) * side(list[1]!.cell) < 0)) problems.push(`face ${k}: both cells on one side`);
    }
    expect(problems).toEqual([]);
    // Each cell has 4 (6) faces: 2 × interior + boundary = faces per cell × cells (common practice, no source).
    expect(2 * interior + mesh.nFacets).toBe((tets ? 4 : 6) * mesh.nCells);
  });

  it('has Euler characteristic V − E + F − C = 1, that of a ball (Euler–Poincaré formula; common practice, no source)', () => {
    const edges = new Set<string>(), faces = new Set<string>();
    for (let c = 0; c < mesh.nCells; c++) {
      for (const face of cellFaces(mesh, c)) {
        faces.add(key(face));
        // Edges of a face: every pair of a triangle; for a box face, pairs differing in one coordinate only.
        for (let i = 0; i < face.length; i++) for (let j = i + 1; j < face.length; j++) {
          const d = sub(P(mesh, face[i]!), P(mesh, face[j]!)).filter((x) => x !== 0).length;
          if (face.length === 3 || d === 1) edges.add(key([face[i]!, face[j]!]));
        }
      }
    }
    expect(mesh.nVertices - edges.size + faces.size - mesh.nCells).toBe(1);
  });

  it('findBoundaryFaces finds the same facets, turned the same way, and meshFromArrays builds the mesh without them', () => {
    const found = findBoundaryFaces(mesh.cellKind as 'tetrahedron' | 'hexahedron', mesh.nVertices, mesh.coords, mesh.cells);
    const m = mesh.verticesPerFacet;
    // A facet as a cycle: rotated to start at its smallest vertex (the direction is kept).
    const cyc = (vs: number[]) => { const i = vs.indexOf(Math.min(...vs)); return [...vs.slice(i), ...vs.slice(0, i)].join(','); };
    const ours = new Set<string>();
    for (let f = 0; f < mesh.nFacets; f++) ours.add(cyc(facetVertices(mesh, f)));
    const theirs = new Set<string>();
    for (let f = 0; f < found.length / m; f++) theirs.add(cyc(Array.from(found.subarray(f * m, (f + 1) * m))));
    expect(theirs).toEqual(ours);
    const rebuilt = meshFromArrays({ cellKind: mesh.cellKind, coords: mesh.coords, cells: mesh.cells }, 'rebuilt box');
    expect(rebuilt.nFacets).toBe(mesh.nFacets);
  });
});

describe('boxMesh input and the 3D facet checks', () => {
  it('rejects bad options with RungsInputError naming the field', () => {
    expect(() => boxMesh({ ...BOX, nx: 1, ny: 1, nz: 1, cells: 'prisms' as never })).toThrow(/box cells must be 'tetrahedra' or 'hexahedra'/);
    expect(() => boxMesh({ ...BOX, nx: 0, ny: 1, nz: 1, cells: 'hexahedra' })).toThrow(/box nx must be a positive integer/);
    expect(() => boxMesh({ ...BOX, z: [1, 1], nx: 1, ny: 1, nz: 1, cells: 'hexahedra' })).toThrow(RungsInputError);
  });

  const hex = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 2, ny: 1, nz: 1, cells: 'hexahedra' });
  const tet = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 2, ny: 1, nz: 1, cells: 'tetrahedra' });
  const withFacets = (m: Mesh, facets: number[]) => ({ cellKind: m.cellKind, coords: m.coords, cells: m.cells, facets });

  it('rejects a boundary face turned inward, naming the order that would do', () => {
    const [a, b, c] = facetVertices(tet, 0);
    expect(() => meshFromArrays(withFacets(tet, [a!, c!, b!]))).toThrow(new RegExp(`normal pointing into cell .*list it as \\(${a}, ${b}, ${c}\\)`));
    const q = facetVertices(hex, 0);
    expect(() => meshFromArrays(withFacets(hex, [q[0]!, q[3]!, q[2]!, q[1]!]))).toThrow(/normal pointing into cell/);
  });

  it('rejects a crossed quadrilateral, an interior face, a non-face and a repeated facet', () => {
    const q = facetVertices(hex, 0);
    expect(() => meshFromArrays(withFacets(hex, [q[0]!, q[2]!, q[1]!, q[3]!]))).toThrow(/crosses itself/);
    // The square x = 1/2 is shared by the two hexahedra: vertices 1, 4, 10, 7 of the 3 × 2 × 2 grid.
    expect(() => meshFromArrays(withFacets(hex, [1, 4, 10, 7]))).toThrow(/shared by 2 cells/);
    expect(() => meshFromArrays(withFacets(hex, [0, 1, 4, 6]))).toThrow(/not a face of any cell/);
    expect(() => meshFromArrays(withFacets(hex, [...q, ...q]))).toThrow(/repeats facet 0/);
  });

  it('rejects an inverted hexahedron (top and bottom faces swapped)', () => {
    const cells = Array.from(hex.cells);
    cells.splice(0, 8, ...cells.slice(4, 8), ...cells.slice(0, 4));
    expect(() => meshFromArrays({ cellKind: 'hexahedron', coords: hex.coords, cells }, 'flipped')).toThrow(/cell 0 .*inverted/);
  });
});

describe('the box study domain', () => {
  it('meshes [x0,x1]×[y0,y1]×[z0,z1] with round(n · side) cells per side, tetrahedra by default', () => {
    const d = box([0, 2], [0, 1], [0, 0.5]);
    expect([d.kind, d.dim, d.tags, d.bbox]).toEqual(['box', 3, [...BOX_TAGS], [[0, 2], [0, 1], [0, 0.5]]]);
    const m = d.mesh(4);
    expect([m.cellKind, m.nCells]).toEqual(['tetrahedron', 6 * 8 * 4 * 2]);
    const h = box([0, 1], [0, 1], [0, 1], { cells: 'hexahedra' }).mesh(3);
    expect([h.cellKind, h.nCells]).toEqual(['hexahedron', 27]);
  });
});
