// The Neumann part of a time-dependent load vector, ∫_{Γ_N} g(x, t) v ds over the boundary facets with the given
// tags, with g = k∇u·n the flux of the exact solution at time t. The facets' quadrature points, outward normals,
// weighted basis values and dofs are computed once per level; each time level then only evaluates g at the stored
// points (no allocation per step; the facets are O(h^(1−d)) of the cells, so this stays on the main thread).
import { facetsWithTags } from '../../mesh/tags.ts';
import { locateFacets } from '../geometry/facets.ts';
import { makeFacetGeometry, reinitFacetGeometry } from '../geometry/facet-geometry.ts';
import type { MixedSpace } from '../space/types.ts';

/** g(x, y, z, t, nx, ny, nz) written to out[0]: the flux through the boundary at time t, n the outward unit normal. */
export type FluxInTime = (x: number, y: number, z: number, t: number, nx: number, ny: number, nz: number, out: Float64Array) => void;

export interface NeumannInTime {
  tags: readonly string[];
  flux: FluxInTime;
  /** Quadrature degree on the facets. */
  degree: number;
}

/** Adds ∫_{Γ_N} g(·, t) v ds to F; built once per level (boundaryLoad), called at every time F(t) is formed. */
export type BoundaryLoad = (t: number, F: Float64Array) => void;

/** The boundary load of a scalar field (field 0 of the space), or null when no facet carries the tags. */
export function boundaryLoad(space: MixedSpace, n: NeumannInTime): BoundaryLoad | null {
  const { mesh, nLocal: L, cellDofs } = space;
  const facets = facetsWithTags(mesh, n.tags);
  if (facets.length === 0) return null;
  const element = space.fields[0]!.space.scalar.element;
  const offset = space.fields[0]!.localOffset;
  const fg = makeFacetGeometry(element, n.degree);
  const fc = locateFacets(mesh);
  const nq = fg.nq, nb = fg.n, nf = facets.length;
  const points = new Float64Array(nf * nq * 6); // x, y, z, nx, ny, nz per point
  const weights = new Float64Array(nf * nq * nb); // w_q |ds| φ_a(x_q)
  const dofs = new Int32Array(nf * nb);
  for (let k = 0; k < nf; k++) {
    const f = facets[k]!, c = fc.cell[f]!, lf = fc.local[f]!;
    reinitFacetGeometry(fg, mesh, c, lf);
    const vals = fg.values[lf]!;
    for (let q = 0; q < nq; q++) {
      const o = (k * nq + q) * 6;
      for (let d = 0; d < 3; d++) { points[o + d] = fg.x[3 * q + d]!; points[o + 3 + d] = fg.normals[3 * q + d]!; }
      for (let a = 0; a < nb; a++) weights[(k * nq + q) * nb + a] = fg.wds[q]! * vals[q * nb + a]!;
    }
    for (let a = 0; a < nb; a++) dofs[k * nb + a] = cellDofs[c * L + offset + a]!;
  }
  const g = new Float64Array(1);
  return (t, F) => {
    for (let k = 0; k < nf; k++) {
      for (let q = 0; q < nq; q++) {
        const o = (k * nq + q) * 6;
        n.flux(points[o]!, points[o + 1]!, points[o + 2]!, t, points[o + 3]!, points[o + 4]!, points[o + 5]!, g);
        const w = (k * nq + q) * nb;
        for (let a = 0; a < nb; a++) F[dofs[k * nb + a]!]! += weights[w + a]! * g[0]!;
      }
    }
  };
}
