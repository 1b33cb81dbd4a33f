import type { Mesh } from '../../mesh/types.ts';

/** Reference gradients of the Q1 geometry map at (s, t): d/ds and d/dt of the four bilinear weights. */
function q1Grads(s: number, t: number, g: Float64Array): void {
  g[0] = -(1 - t); g[1] = -(1 - s);
  g[2] = 1 - t; g[3] = -s;
  g[4] = t; g[5] = s;
  g[6] = -t; g[7] = 1 - s;
}

const q1g = new Float64Array(8);

/** Reference gradients of the trilinear (Q1) geometry map of a hexahedron at (s, t, u): g[3v + r] = ∂N_v/∂ξ_r of
 *  N_v = (s or 1 − s)(t or 1 − t)(u or 1 − u), vertices in the order of src/mesh/types.ts. */
export function hexahedronMapGradients(s: number, t: number, u: number, g: Float64Array): void {
  const s0 = 1 - s, t0 = 1 - t, u0 = 1 - u;
  g[0] = -t0 * u0; g[1] = -s0 * u0; g[2] = -s0 * t0;
  g[3] = t0 * u0; g[4] = -s * u0; g[5] = -s * t0;
  g[6] = t * u0; g[7] = s * u0; g[8] = -s * t;
  g[9] = -t * u0; g[10] = s0 * u0; g[11] = -s0 * t;
  g[12] = -t0 * u; g[13] = -s0 * u; g[14] = s0 * t0;
  g[15] = t0 * u; g[16] = -s * u; g[17] = s * t0;
  g[18] = t * u; g[19] = s * u; g[20] = s * t;
  g[21] = -t * u; g[22] = s0 * u; g[23] = s0 * t;
}

const h1g = new Float64Array(24);

/** Jacobian J[d*dim + r] = ∂x_d/∂ξ_r of cell c at reference point ref[off..] (ignored for simplices; bilinear map
 *  for quadrilaterals, trilinear for hexahedra),
 *  its inverse invJ[r*dim + d] = ∂ξ_r/∂x_d, and the determinant (returned). */
export function cellJacobian(
  mesh: Mesh, c: number, ref: ArrayLike<number>, off: number, J: Float64Array, invJ: Float64Array,
): number {
  const { coords, cells, verticesPerCell: vpc, dim } = mesh;
  const base = c * vpc;
  if (mesh.cellKind === 'quadrilateral') {
    q1Grads(ref[off], ref[off + 1], q1g);
    let a = 0, b = 0, cc = 0, d = 0;
    for (let v = 0; v < 4; v++) {
      const p = cells[base + v] * 2;
      a += coords[p] * q1g[2 * v]; b += coords[p] * q1g[2 * v + 1];
      cc += coords[p + 1] * q1g[2 * v]; d += coords[p + 1] * q1g[2 * v + 1];
    }
    J[0] = a; J[1] = b; J[2] = cc; J[3] = d;
  } else if (mesh.cellKind === 'hexahedron') {
    // Trilinear map: J[d*3 + r] = Σ_v x_v,d ∂N_v/∂ξ_r, varying from point to point.
    hexahedronMapGradients(ref[off], ref[off + 1], ref[off + 2], h1g);
    for (let k = 0; k < 9; k++) J[k] = 0;
    for (let v = 0; v < 8; v++) {
      const p = cells[base + v] * 3;
      const g0 = h1g[3 * v], g1 = h1g[3 * v + 1], g2 = h1g[3 * v + 2];
      for (let d = 0; d < 3; d++) {
        const x = coords[p + d];
        J[3 * d] += x * g0; J[3 * d + 1] += x * g1; J[3 * d + 2] += x * g2;
      }
    }
  } else {
    const v0 = cells[base] * dim;
    for (let r = 0; r < dim; r++) {
      const vr = cells[base + r + 1] * dim;
      for (let d = 0; d < dim; d++) J[d * dim + r] = coords[vr + d] - coords[v0 + d];
    }
  }
  return invert(J, dim, invJ);
}

/** Inverse of a 1×1, 2×2 or 3×3 matrix (row-major); returns the determinant. */
export function invert(J: Float64Array, dim: number, inv: Float64Array): number {
  if (dim === 1) { inv[0] = 1 / J[0]; return J[0]; }
  if (dim === 2) {
    const det = J[0] * J[3] - J[1] * J[2];
    inv[0] = J[3] / det; inv[1] = -J[1] / det; inv[2] = -J[2] / det; inv[3] = J[0] / det;
    return det;
  }
  const [a, b, c, d, e, f, g, h, i] = J as unknown as number[];
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g;
  const det = a * A + b * B + c * C;
  inv[0] = A / det; inv[1] = -(b * i - c * h) / det; inv[2] = (b * f - c * e) / det;
  inv[3] = B / det; inv[4] = (a * i - c * g) / det; inv[5] = -(a * f - c * d) / det;
  inv[6] = C / det; inv[7] = -(a * h - b * g) / det; inv[8] = (a * e - b * d) / det;
  return det;
}
