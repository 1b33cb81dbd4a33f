import type { CellVectorTerm, FacetVectorTerm } from '../types.ts';
import type { NormalData, PointData } from './types.ts';

/** (f, v) for a field with nc components: f writes its nc components. */
export function sourceTerm(field: number, components: number, f: PointData, degree: number): CellVectorTerm {
  const fv = new Float64Array(components);
  return {
    name: 'source', test: field, degree,
    add(_c, cv, out, off) {
      const { nq, n, values, wdet, x } = cv;
      const nc = components;
      for (let q = 0; q < nq; q++) {
        f(x[3 * q], x[3 * q + 1], x[3 * q + 2], fv);
        const w = wdet[q];
        for (let a = 0; a < n; a++) {
          const wa = w * values[q * n + a];
          for (let i = 0; i < nc; i++) out[off + a * nc + i] += wa * fv[i];
        }
      }
    },
  };
}

/** ∫ g·v over boundary facets with the given tags: Neumann data F·n (a traction σn for elasticity, (ν∇u − pI)n
 *  for Stokes), g a function of the point and the outward unit normal. */
export function boundaryLoadTerm(field: number, components: number, tags: readonly string[], g: NormalData, degree: number): FacetVectorTerm {
  const gv = new Float64Array(components);
  return {
    name: 'boundary-load', test: field, degree, tags,
    add(_c, lf, fv, out, off) {
      const { nq, n, x, wds, normals } = fv;
      const vals = fv.values[lf];
      const nc = components;
      for (let q = 0; q < nq; q++) {
        g(x[3 * q], x[3 * q + 1], x[3 * q + 2], normals[3 * q], normals[3 * q + 1], normals[3 * q + 2], gv);
        const w = wds[q];
        for (let a = 0; a < n; a++) {
          const wa = w * vals[q * n + a];
          for (let i = 0; i < nc; i++) out[off + a * nc + i] += wa * gv[i];
        }
      }
    },
  };
}
