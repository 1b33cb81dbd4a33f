import type { FunctionSpace } from '../fem/dofmap/types.ts';
import { cellJacobian } from '../fem/geometry/jacobian.ts';
import type { DiscreteField } from './types.ts';
import type { ScalarFn } from '../fem/assemble/types.ts';

/** The finite element function Σ U_i φ_i of a Lagrange space. */
export function lagrangeField(space: FunctionSpace, coeffs: Float64Array): DiscreteField {
  const { mesh, element: el, cellDofs } = space;
  const n = el.nDofs, dim = mesh.dim;
  let cachedPoints: Float64Array | null = null;
  let cachedN = -1;
  let tabV = new Float64Array(0), tabG = new Float64Array(0);
  const J = new Float64Array(9), invJ = new Float64Array(9);
  const gref = new Float64Array(3);
  const affine = mesh.cellKind !== 'quadrilateral';
  return {
    mesh,
    nDofs: space.nDofs,
    degree: el.degree,
    nodes: { coords: space.dofCoords, values: coeffs },
    evaluate(c, refPoints, nPoints, values, grads) {
      if (refPoints !== cachedPoints || nPoints !== cachedN) {
        tabV = new Float64Array(nPoints * n);
        tabG = new Float64Array(nPoints * n * dim);
        el.tabulate(refPoints, nPoints, tabV, tabG);
        cachedPoints = refPoints; cachedN = nPoints;
      }
      const o = c * n;
      for (let p = 0; p < nPoints; p++) {
        if (p === 0 || !affine) cellJacobian(mesh, c, refPoints, p * dim, J, invJ);
        let v = 0;
        gref[0] = 0; gref[1] = 0; gref[2] = 0;
        for (let i = 0; i < n; i++) {
          const u = coeffs[cellDofs[o + i]];
          v += u * tabV[p * n + i];
          for (let r = 0; r < dim; r++) gref[r] += u * tabG[(p * n + i) * dim + r];
        }
        values[p] = v;
        for (let d = 0; d < dim; d++) {
          let s = 0;
          for (let r = 0; r < dim; r++) s += invJ[r * dim + d] * gref[r];
          grads[p * dim + d] = s;
        }
      }
    },
  };
}

/** Nodal interpolant I_h u: the coefficient of each dof is u at its node. */
export function interpolate(space: FunctionSpace, u: ScalarFn): Float64Array {
  const dim = space.mesh.dim;
  const X = space.dofCoords;
  const out = new Float64Array(space.nDofs);
  for (let g = 0; g < space.nDofs; g++) out[g] = u(X[g * dim], dim > 1 ? X[g * dim + 1] : 0, dim > 2 ? X[g * dim + 2] : 0);
  return out;
}
