// The facet tables of src/external/vtk/facet-table.ts against two independent searches: src/mesh's findBoundaryFacets
// and src/mesh/boundary-faces.ts (faces bucketed by their smallest vertex), and a map-based loop over cells written here, on
// shuffled, relabelled and deliberately broken meshes. The rule compared (a facet of two cells is crossed in opposite
// directions by positively oriented cells; no facet has three cells) is common practice, no source.
import { describe, expect, it } from 'vitest';
import { edgeTable, faceTable, TET_FACES, type SharedFacetProblem } from '../../src/external/vtk/facet-table.ts';
import { tetrahedronBoundaryFacets } from '../../src/mesh/boundary-faces.ts';
import { findBoundaryFacets } from '../../src/mesh/boundary-facets.ts';
import { lShapeMesh } from '../../src/mesh/lshape.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { kuhnCubeMesh } from './cube-mesh.ts';

let seed = 2024;
const rnd = () => ((seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32);
const ri = (n: number) => Math.floor(rnd() * n);

/** Cells shuffled and vertices renumbered at random (the tables must not depend on any order). */
function scramble(cells: Int32Array, per: number, nVertices: number): Int32Array {
  const n = cells.length / per;
  const perm = Int32Array.from({ length: nVertices }, (_, v) => v);
  for (let k = nVertices - 1; k > 0; k--) { const j = ri(k + 1); [perm[k], perm[j]] = [perm[j]!, perm[k]!]; }
  const order = Int32Array.from({ length: n }, (_, c) => c);
  for (let k = n - 1; k > 0; k--) { const j = ri(k + 1); [order[k], order[j]] = [order[j]!, order[k]!]; }
  const out = new Int32Array(cells.length);
  for (let c = 0; c < n; c++) for (let i = 0; i < per; i++) out[c * per + i] = perm[cells[order[c]! * per + i]!]!;
  return out;
}

/** The first same-side or third occurrence a loop over cells and their facets meets, with a map of sorted keys. */
function referenceProblem(cells: Int32Array, facets: readonly (readonly number[])[], per: number): SharedFacetProblem | null {
  const seen = new Map<string, { cell: number; parity: number; count: number }>();
  for (let c = 0; c * per < cells.length; c++) {
    for (let f = 0; f < facets.length; f++) {
      const v = facets[f]!.map((i) => cells[c * per + i]!);
      let parity = 0;
      for (let i = 0; i < v.length; i++) for (let j = i + 1; j < v.length; j++) parity ^= v[i]! > v[j]! ? 1 : 0;
      const key = v.slice().sort((a, b) => a - b).join(',');
      const slot = c * facets.length + f;
      const had = seen.get(key);
      if (had === undefined) { seen.set(key, { cell: c, parity, count: 1 }); continue; }
      had.count++;
      if (had.count === 3) return { kind: 'third', slot, cell: c, other: had.cell };
      if (had.parity === parity) return { kind: 'same-side', slot, cell: c, other: had.cell };
    }
  }
  return null;
}

/** Vertices renumbered at random, coordinates moved with them. */
function relabel(cells: Int32Array, coords: Float64Array, dim: number): { cells: Int32Array; coords: Float64Array } {
  const nVertices = coords.length / dim;
  const perm = Int32Array.from({ length: nVertices }, (_, v) => v);
  for (let k = nVertices - 1; k > 0; k--) { const j = ri(k + 1); [perm[k], perm[j]] = [perm[j]!, perm[k]!]; }
  const x = new Float64Array(coords.length);
  for (let v = 0; v < nVertices; v++) for (let d = 0; d < dim; d++) x[perm[v]! * dim + d] = coords[v * dim + d]!;
  return { cells: cells.map((v) => perm[v]!), coords: x };
}

const EDGES = (nc: number) => Array.from({ length: nc }, (_, k) => [k, (k + 1) % nc]);

describe('edge table of triangles and quadrilaterals', () => {
  const meshes = [
    rectangleMesh({ x: [0, 1], y: [0, 1], nx: 7, ny: 5, cells: 'triangles', diagonal: 'crossed' }),
    rectangleMesh({ x: [0, 1], y: [0, 1], nx: 6, ny: 4, cells: 'quadrilaterals' }),
    lShapeMesh(4),
  ];
  it('finds the boundary edges src/mesh finds, in the same order and direction, on scrambled meshes', () => {
    for (const mesh of meshes) {
      for (let trial = 0; trial < 20; trial++) {
        const cells = scramble(mesh.cells, mesh.verticesPerCell, mesh.nVertices);
        const table = edgeTable(mesh.verticesPerCell, mesh.nVertices, cells);
        expect(table.maxShare).toBe(2);
        expect(table.problem).toBeNull();
        expect(Array.from(table.boundary)).toEqual(Array.from(findBoundaryFacets(mesh.cellKind, mesh.nVertices, cells, 'test')));
        for (let m = 0; m < table.boundaryCell.length; m++) {
          const c = table.boundaryCell[m]!;
          expect(Array.from(cells.subarray(c * mesh.verticesPerCell, (c + 1) * mesh.verticesPerCell))).toContain(table.boundary[2 * m]);
        }
      }
    }
  });
  it('reports the first fold or third cell a loop over the cells meets, as a map-based loop does', () => {
    let problems = 0;
    for (const mesh of meshes) {
      const nc = mesh.verticesPerCell;
      for (let trial = 0; trial < 60; trial++) {
        const base = scramble(mesh.cells, nc, mesh.nVertices);
        const extra: number[] = [];
        for (let k = 0; k < 1 + ri(3); k++) {
          const c = ri(base.length / nc);
          const cell = Array.from(base.subarray(c * nc, c * nc + nc));
          if (rnd() < 0.5) cell.reverse(); // the same cell the other way round, or repeated
          extra.push(...cell);
        }
        const cells = Int32Array.from([...base, ...extra]);
        const at = ri(cells.length / nc) * nc; // move the extra cells' positions around
        const mixed = Int32Array.from([...cells.subarray(0, at), ...cells.subarray(cells.length - extra.length), ...cells.subarray(at, cells.length - extra.length)]);
        const table = edgeTable(nc, mesh.nVertices, mixed);
        const expected = referenceProblem(mixed, EDGES(nc), nc);
        if (expected) problems++;
        expect(table.problem).toEqual(expected);
      }
    }
    expect(problems).toBeGreaterThan(100);
  });
});

describe('face table of tetrahedra', () => {
  const mesh = kuhnCubeMesh(3);
  it('finds the boundary faces src/mesh/boundary-faces.ts finds, in the same order and orientation, on scrambled meshes', () => {
    for (let trial = 0; trial < 10; trial++) {
      const { cells, coords } = relabel(scrambleCellsOnly(mesh.cells), mesh.coords, 3);
      const table = faceTable(mesh.nVertices, coords, cells);
      expect(Array.from(table.boundary)).toEqual(Array.from(tetrahedronBoundaryFacets(mesh.nVertices, coords, cells)));
      expect(table.boundary.length).toBe(3 * 12 * 3 ** 2);
      expect(table.problem).toBeNull();
      expect(table.maxShare).toBe(2);
    }
  });
  it('reports the first fold or third cell a loop over the cells meets, as a map-based loop does', () => {
    let problems = 0;
    for (let trial = 0; trial < 60; trial++) {
      const base = scrambleCellsOnly(mesh.cells);
      const cells = Array.from(base);
      for (let k = 0; k < 1 + ri(3); k++) {
        const c = ri(base.length / 4);
        const cell = Array.from(base.subarray(4 * c, 4 * c + 4));
        if (rnd() < 0.5) [cell[1], cell[2]] = [cell[2]!, cell[1]!];
        cells.splice(4 * ri(cells.length / 4), 0, ...cell);
      }
      const all = Int32Array.from(cells);
      const expected = referenceProblem(all, TET_FACES, 4);
      if (expected) problems++;
      expect(faceTable(mesh.nVertices, mesh.coords, all).problem).toEqual(expected);
    }
    expect(problems).toBeGreaterThan(50);
  });
});

function scrambleCellsOnly(cells: Int32Array): Int32Array {
  const n = cells.length / 4;
  const order = Int32Array.from({ length: n }, (_, c) => c);
  for (let k = n - 1; k > 0; k--) { const j = ri(k + 1); [order[k], order[j]] = [order[j]!, order[k]!]; }
  const out = new Int32Array(cells.length);
  for (let c = 0; c < n; c++) out.set(cells.subarray(order[c]! * 4, order[c]! * 4 + 4), 4 * c);
  return out;
}
