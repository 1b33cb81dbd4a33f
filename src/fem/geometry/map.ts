import type { Mesh } from '../../mesh/types.ts';

/** Maps a reference point of cell c to physical coordinates: affine for simplices, bilinear for quadrilaterals. */
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
  // Simplex: x = x0 + Σ_d ξ_d (x_{d+1} − x0).
  const v0 = cells[base] * dim;
  for (let d = 0; d < dim; d++) out[d] = coords[v0 + d];
  for (let r = 0; r < dim; r++) {
    const vr = cells[base + r + 1] * dim;
    const xi = ref[off + r];
    for (let d = 0; d < dim; d++) out[d] += xi * (coords[vr + d] - coords[v0 + d]);
  }
}
