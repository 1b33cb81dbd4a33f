import { RungsInputError } from '../errors.ts';
import { CELL_EDGES } from './cell-edges.ts';
import { findDefectiveCell } from './cell-validity.ts';
import { computeH } from './diameter.ts';
import { mulberry32 } from './random.ts';
import type { Mesh } from './types.ts';

export interface PerturbOptions {
  /** Largest displacement as a fraction of each vertex's local h; 0 ≤ fraction < 0.5 (at 0.5 the two ends of a
   *  shortest edge could meet). */
  fraction: number;
  /** Integer seed of the mulberry32 generator: the same seed gives the same mesh. */
  seed: number;
}

/** A copy of the mesh with every interior vertex moved by a random displacement, uniform in the ball (disc in 2D,
 *  segment in 1D) of radius fraction × h_v, where h_v is the shortest edge at that vertex. Vertices on boundary
 *  facets stay put, so the domain is unchanged. h is recomputed.
 *
 *  Safe fractions: if the vertices of a triangle move by at most δ_a, δ_b, δ_c and every pair sum is below its
 *  smallest altitude, the moving points never become collinear, so the orientation is kept (were they on a line,
 *  the original triangle would fit in a strip of width δ_i + δ_j about it, but a triangle's narrowest strip is its
 *  smallest altitude; common practice, no source). On the structured meshes of this folder every interior vertex
 *  has an edge of length min(dx, dy), which gives fraction < 1/(2√2) ≈ 0.354 (so 0.3 is safe) for rectangleMesh
 *  with 'right', 'left' or 'alternating' triangles or with quadrilaterals (apply it to each corner triangle) for
 *  any dx/dy, and for 'crossed' triangles and lShapeMesh when cells are square. For 'crossed' with dx ≠ dy the
 *  bound is smaller: fraction < (m/2) / (d/2 + min(m, d/2)) with m = min(dx, dy), d = √(dx² + dy²), e.g. ≈ 0.099
 *  for dx = 8 dy. Beyond a bound an inversion is possible but not certain; the result is checked, and an inverted
 *  or degenerate cell throws RungsInputError. */
export function perturbMesh(mesh: Mesh, options: PerturbOptions): Mesh {
  const { fraction, seed } = options;
  if (typeof fraction !== 'number' || !(fraction >= 0 && fraction < 0.5)) {
    throw new RungsInputError(
      `perturbation fraction must be a number in [0, 0.5) (0.3 keeps square-celled meshes valid), got ${String(fraction)}`,
      'perturb fraction',
    );
  }
  if (typeof seed !== 'number' || !Number.isInteger(seed)) {
    throw new RungsInputError(`perturbation seed must be an integer, got ${String(seed)}`, 'perturb seed');
  }
  const { dim, nVertices } = mesh;
  const localH = shortestIncidentEdge(mesh);
  const onBoundary = new Uint8Array(nVertices);
  for (let k = 0; k < mesh.facets.length; k++) onBoundary[mesh.facets[k]!] = 1;

  const random = mulberry32(seed);
  const coords = mesh.coords.slice();
  for (let v = 0; v < nVertices; v++) {
    if (onBoundary[v] || !Number.isFinite(localH[v]!)) continue;
    const radius = fraction * localH[v]!;
    if (dim === 1) {
      coords[v] = coords[v]! + radius * (2 * random() - 1);
    } else if (dim === 2) {
      // Uniform in the disc: angle uniform, radius with density ∝ r, hence the square root.
      const angle = 2 * Math.PI * random();
      const r = radius * Math.sqrt(random());
      coords[2 * v] = coords[2 * v]! + r * Math.cos(angle);
      coords[2 * v + 1] = coords[2 * v + 1]! + r * Math.sin(angle);
    } else {
      // Uniform in the ball by rejection from the cube (accepts π/6 ≈ 52% of draws).
      let x: number, y: number, z: number;
      do {
        x = 2 * random() - 1;
        y = 2 * random() - 1;
        z = 2 * random() - 1;
      } while (x * x + y * y + z * z > 1);
      coords[3 * v] = coords[3 * v]! + radius * x;
      coords[3 * v + 1] = coords[3 * v + 1]! + radius * y;
      coords[3 * v + 2] = coords[3 * v + 2]! + radius * z;
    }
  }

  const moved: Mesh = {
    ...mesh,
    coords,
    cells: mesh.cells.slice(),
    facets: mesh.facets.slice(),
    facetTags: mesh.facetTags.slice(),
    tagNames: [...mesh.tagNames],
  };
  const defect = findDefectiveCell(moved);
  if (defect !== null) {
    throw new RungsInputError(
      `perturbation with fraction ${fraction} and seed ${seed} made cell ${defect.cell} ${defect.problem} ` +
        `(Jacobian determinant ${defect.jacobian}); use a smaller fraction (below 0.35 is safe on generated meshes ` +
        `except 'crossed' ones with unequal cell sides, where the bound is smaller)`,
      'perturb fraction',
    );
  }
  moved.h = computeH(moved);
  return moved;
}

/** Length of the shortest cell edge at each vertex (Infinity for a vertex on no cell). */
export function shortestIncidentEdge(mesh: Mesh): Float64Array {
  const { coords, cells, dim } = mesh;
  const n = mesh.verticesPerCell;
  const edges = CELL_EDGES[mesh.cellKind];
  const shortest = new Float64Array(mesh.nVertices).fill(Infinity);
  for (let c = 0; c < mesh.nCells; c++) {
    const base = c * n;
    for (const [p, q] of edges) {
      const a = cells[base + p]!;
      const b = cells[base + q]!;
      let d2 = 0;
      for (let k = 0; k < dim; k++) {
        const t = coords[a * dim + k]! - coords[b * dim + k]!;
        d2 += t * t;
      }
      const d = Math.sqrt(d2);
      if (d < shortest[a]!) shortest[a] = d;
      if (d < shortest[b]!) shortest[b] = d;
    }
  }
  return shortest;
}
