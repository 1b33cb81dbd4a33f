import type { Mesh } from '../../mesh/types.ts';

/** Maps a reference point of cell c to physical coordinates: affine for simplices, bilinear for quadrilaterals,
 *  trilinear for hexahedra (x = Σ_v N_v(ξ) x_v with N_v the products of s or 1 − s, t or 1 − t, u or 1 − u). */
export function mapReferencePoint(mesh: Mesh, c: number, ref: ArrayLike<number>, off: number, out: Float64Array): void {
  const { coords, cells, verticesPerCell: vpc, dim } = mesh;
  const base = c * vpc;
  if (mesh.cellKind === 'quadrilateral') {
    const s = ref[off], t = ref[off + 1];
    const w0 = (1 - s) * (1 - t), w1 = s * (1 - t), w2 = s * t, w3 = (1 - s) * t;
    const v0 = cells[base] * 2, v1 = cells[base + 1] * 2, v2 = cells[base + 2] * 2, v3 = cells[base + 3] * 2;
    out[0] = w0 * coords[v0] + w1 * coords[v1] + w2 * coords[v2] + w3 * coords[v3];
    out[1] = w0 * coords[v0 + 1] + w1 * coords[v1 + 1] + w2 * coords[v2 + 1] + w3 * coords[v3 + 1];
    return;
  }
  if (mesh.cellKind === 'hexahedron') {
    const s = ref[off], t = ref[off + 1], u = ref[off + 2];
    const s0 = 1 - s, t0 = 1 - t, u0 = 1 - u;
    const w0 = s0 * t0 * u0, w1 = s * t0 * u0, w2 = s * t * u0, w3 = s0 * t * u0;
    const w4 = s0 * t0 * u, w5 = s * t0 * u, w6 = s * t * u, w7 = s0 * t * u;
    const p0 = cells[base] * 3, p1 = cells[base + 1] * 3, p2 = cells[base + 2] * 3, p3 = cells[base + 3] * 3;
    const p4 = cells[base + 4] * 3, p5 = cells[base + 5] * 3, p6 = cells[base + 6] * 3, p7 = cells[base + 7] * 3;
    for (let d = 0; d < 3; d++) {
      out[d] = w0 * coords[p0 + d] + w1 * coords[p1 + d] + w2 * coords[p2 + d] + w3 * coords[p3 + d]
        + w4 * coords[p4 + d] + w5 * coords[p5 + d] + w6 * coords[p6 + d] + w7 * coords[p7 + d];
    }
    return;
  }
  // Simplex: x = x0 + Σ_d ξ_d (x_{d+1} − x0).
  const v0 = cells[base] * dim;
  for (let d = 0; d < dim; d++) out[d] = coords[v0 + d];
  for (let r = 0; r < dim; r++) {
    const vr = cells[base + r + 1] * dim;
    const xi = ref[off + r];
    for (let d = 0; d < dim; d++) out[d] += xi * (coords[vr + d] - coords[v0 + d]);
  }
}
