// Points on each boundary part with their outward unit normals, for the checks of the manufactured solution (is the
// Neumann data zero all along a Neumann edge?).
import { locateFacets } from '../fem/geometry/facets.ts';
import type { Mesh } from '../mesh/types.ts';

export interface TagSamples {
  /** Packed xyz of facet midpoints (unused coordinates 0). */
  points: Float64Array;
  /** Packed outward unit normals. */
  normals: Float64Array;
}

/** Up to `perTag` facet midpoints per tag, evenly spread over its facets, each with the outward unit normal: the
 *  facet's normal turned away from the centroid of the cell that owns it (cells are convex). */
export function boundarySamples(mesh: Mesh, tags: readonly string[], perTag = 16): Record<string, TagSamples> {
  const { dim, coords, cells, verticesPerCell: vpc, facets, verticesPerFacet: vpf, facetTags, tagNames } = mesh;
  const owner = locateFacets(mesh).cell;
  const out: Record<string, TagSamples> = {};
  const at = (v: number, d: number) => coords[v * dim + d]!;
  for (const tag of tags) {
    const t = tagNames.indexOf(tag);
    const list: number[] = [];
    for (let f = 0; f < mesh.nFacets; f++) if (facetTags[f] === t) list.push(f);
    const take = Math.min(perTag, list.length);
    const points = new Float64Array(3 * take);
    const normals = new Float64Array(3 * take);
    for (let s = 0; s < take; s++) {
      const f = list[Math.floor(((s + 0.5) * list.length) / take)]!;
      const m = [0, 0, 0];
      const c = [0, 0, 0];
      for (let a = 0; a < vpf; a++) for (let d = 0; d < dim; d++) m[d] += at(facets[f * vpf + a]!, d) / vpf;
      for (let a = 0; a < vpc; a++) for (let d = 0; d < dim; d++) c[d] += at(cells[owner[f]! * vpc + a]!, d) / vpc;
      const n = [0, 0, 0];
      if (dim === 1) n[0] = 1;
      else if (dim === 2) {
        const [p, q] = [facets[f * vpf]!, facets[f * vpf + 1]!];
        n[0] = at(q, 1) - at(p, 1); n[1] = at(p, 0) - at(q, 0);
      } else {
        const [p, q, r] = [facets[f * vpf]!, facets[f * vpf + 1]!, facets[f * vpf + 2]!];
        const u = [0, 1, 2].map((d) => at(q, d) - at(p, d));
        const w = [0, 1, 2].map((d) => at(r, d) - at(p, d));
        n[0] = u[1]! * w[2]! - u[2]! * w[1]!; n[1] = u[2]! * w[0]! - u[0]! * w[2]!; n[2] = u[0]! * w[1]! - u[1]! * w[0]!;
      }
      const away = (m[0] - c[0]) * n[0] + (m[1] - c[1]) * n[1] + (m[2] - c[2]) * n[2];
      const len = Math.hypot(n[0], n[1], n[2]) * (away < 0 ? -1 : 1);
      for (let d = 0; d < 3; d++) { points[3 * s + d] = m[d]!; normals[3 * s + d] = n[d]! / len; }
    }
    out[tag] = { points, normals };
  }
  return out;
}
