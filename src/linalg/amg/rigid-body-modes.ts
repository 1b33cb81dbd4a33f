/** Rigid-body modes: the translations and infinitesimal rotations u(x) = t + ω × x, which linear elasticity without
 *  boundary conditions maps to zero strain, hence the kernel of its stiffness matrix (3 in 2D, 6 in 3D). They are
 *  the near-null space smoothed aggregation needs for elasticity (Vaněk, Mandel & Brezina 1996, Computing 56,
 *  179–196, from memory). Unknowns are interleaved node-major: component c of node g is unknown g·dim + c.
 *
 *  For a reduced system (Dirichlet unknowns eliminated) there are two ways, both accepted by AmgOptions:
 *  - whole nodes eliminated: pass the coordinates of the free nodes only to rigidBodyModes, and blockSize = dim;
 *  - single components eliminated (a roller, a symmetry plane): reducedRigidBodyModes takes every node's
 *    coordinates and the kept unknowns, and returns the modes on those unknowns together with `nodeOf`, the node
 *    of each kept unknown, which tells the multigrid which unknowns form a node. */
import { RungsInputError } from '../../errors.ts';

const WHERE = 'linalg/amg/rigidBodyModes';

function checkArguments(coords: Float64Array, dim: number, nNodes: number): void {
  if (dim !== 2 && dim !== 3) throw new RungsInputError(`rigidBodyModes: dim must be 2 or 3, got ${dim}`, WHERE);
  if (!(Number.isInteger(nNodes) && nNodes >= 0)) throw new RungsInputError(`rigidBodyModes: nNodes must be a non-negative integer, got ${nNodes}`, WHERE);
  if (coords.length !== dim * nNodes) {
    throw new RungsInputError(`rigidBodyModes: coords has length ${coords.length}; ${dim} coordinates per node of ${nNodes} nodes need ${dim * nNodes}`, WHERE);
  }
}

/** Value of rigid-body mode `mode` in component c at the point (x, y, z). Order: the dim translations, then the
 *  rotations: 2D about z, (−y, x); 3D about z, x and y: (−y, x, 0), (0, −z, y), (z, 0, −x). */
function modeValue(dim: 2 | 3, mode: number, c: number, x: number, y: number, z: number): number {
  if (mode < dim) return mode === c ? 1 : 0;
  switch (mode - dim) {
    case 0: return c === 0 ? -y : c === 1 ? x : 0;
    case 1: return c === 0 ? 0 : c === 1 ? -z : y;
    default: return c === 0 ? z : c === 1 ? 0 : -x;
  }
}

/** The dim (dim + 1)/2 rigid-body modes on nNodes nodes (coords: dim coordinates per node), each a vector of
 *  nNodes·dim interleaved unknowns. */
export function rigidBodyModes(coords: Float64Array, dim: 2 | 3, nNodes: number): Float64Array[] {
  checkArguments(coords, dim, nNodes);
  const nModes = dim === 2 ? 3 : 6;
  const modes = Array.from({ length: nModes }, () => new Float64Array(nNodes * dim));
  for (let g = 0; g < nNodes; g++) {
    const x = coords[dim * g], y = coords[dim * g + 1], z = dim === 3 ? coords[dim * g + 2] : 0;
    for (let mode = 0; mode < nModes; mode++) {
      for (let c = 0; c < dim; c++) modes[mode][dim * g + c] = modeValue(dim, mode, c, x, y, z);
    }
  }
  return modes;
}

/** The rigid-body modes on the kept unknowns of a reduced system: `kept` lists, in the reduced order, the
 *  interleaved index g·dim + c of each kept unknown among all nNodes·dim. Returns the modes (length kept.length)
 *  and nodeOf (node g of each kept unknown), ready for AmgOptions { blockSize: dim, nearNullSpace, nodeOf }. */
export function reducedRigidBodyModes(
  coords: Float64Array, dim: 2 | 3, nNodes: number, kept: Int32Array,
): { nearNullSpace: Float64Array[]; nodeOf: Int32Array } {
  checkArguments(coords, dim, nNodes);
  const nModes = dim === 2 ? 3 : 6;
  const m = kept.length;
  const modes = Array.from({ length: nModes }, () => new Float64Array(m));
  const nodeOf = new Int32Array(m);
  for (let r = 0; r < m; r++) {
    const u = kept[r];
    if (!(u >= 0 && u < nNodes * dim)) {
      throw new RungsInputError(`rigidBodyModes: kept[${r}] = ${u} is not an unknown of ${nNodes} nodes with ${dim} components`, WHERE);
    }
    const g = Math.floor(u / dim), c = u - g * dim;
    nodeOf[r] = g;
    const x = coords[dim * g], y = coords[dim * g + 1], z = dim === 3 ? coords[dim * g + 2] : 0;
    for (let mode = 0; mode < nModes; mode++) modes[mode][r] = modeValue(dim, mode, c, x, y, z);
  }
  return { nearNullSpace: modes, nodeOf };
}
