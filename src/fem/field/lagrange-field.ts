import type { FunctionSpace } from '../dofmap/types.ts';
import { cellJacobian } from '../geometry/jacobian.ts';
import type { DiscreteField } from './types.ts';
import type { ScalarFn } from '../assemble/types.ts';
import { AFFINE_CELL } from '../../mesh/types.ts';
import { sharedFloat64, TEAM_MIN_CELLS } from '../team/shared.ts';

/** The space and coefficients behind each field lagrangeField made: a worker of the cell team (src/norms/errors.ts)
 *  rebuilds the same field from them, with the same evaluate, instead of calling a closure it cannot reach. */
const made = new WeakMap<DiscreteField, { space: FunctionSpace; coeffs: Float64Array }>();

/** The space and coefficients of a field made by lagrangeField, or undefined for any other field. */
export function lagrangeFieldData(field: DiscreteField): { space: FunctionSpace; coeffs: Float64Array } | undefined {
  return made.get(field);
}

/** The finite element function Σ U_i φ_i of a Lagrange space. */
export function lagrangeField(space: FunctionSpace, coeffs: Float64Array): DiscreteField {
  const field = makeField(space, coeffs);
  made.set(field, { space, coeffs });
  return field;
}

function makeField(space: FunctionSpace, coeffs: Float64Array): DiscreteField {
  // The space's cellDofs (and the mesh's arrays, which cellJacobian reads) are read at each call, not captured: the
  // cell team may move them into shared memory meanwhile (src/fem/team/mesh.ts), and a captured array would keep the
  // private copy alive.
  const { mesh, element: el } = space;
  const n = el.nDofs, dim = mesh.dim;
  let cachedPoints: Float64Array | null = null;
  let cachedN = -1;
  let tabV = new Float64Array(0), tabG = new Float64Array(0);
  const J = new Float64Array(9), invJ = new Float64Array(9);
  const gref = new Float64Array(3);
  const local = new Float64Array(n);
  const affine = AFFINE_CELL[mesh.cellKind];
  const linear = mesh.cellKind === 'triangle' && el.degree === 1 && n === 3;
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
      // Locals, not closure slots, in the hot loop.
      const tv = tabV, tg = tabG, u = local, cellDofs = space.cellDofs;
      const o = c * n;
      for (let i = 0; i < n; i++) u[i] = coeffs[cellDofs[o + i]];
      if (dim === 2 && affine) {
        cellJacobian(mesh, c, refPoints, 0, J, invJ);
        const i00 = invJ[0], i01 = invJ[1], i10 = invJ[2], i11 = invJ[3];
        if (linear) {
          // P1 on a triangle: the gradient is one vector per cell (the tabulated reference gradients are the
          // same at every point); only the value varies.
          const u0 = u[0], u1 = u[1], u2 = u[2];
          const g0 = u0 * tg[0] + u1 * tg[2] + u2 * tg[4], g1 = u0 * tg[1] + u1 * tg[3] + u2 * tg[5];
          const d0 = i00 * g0 + i10 * g1, d1 = i01 * g0 + i11 * g1;
          for (let p = 0; p < nPoints; p++) {
            const vo = 3 * p;
            values[p] = u0 * tv[vo] + u1 * tv[vo + 1] + u2 * tv[vo + 2];
            grads[2 * p] = d0;
            grads[2 * p + 1] = d1;
          }
          return;
        }
        for (let p = 0; p < nPoints; p++) {
          let v = 0, g0 = 0, g1 = 0;
          const vo = p * n, go = vo * 2;
          for (let i = 0; i < n; i++) {
            const ui = u[i];
            v += ui * tv[vo + i];
            g0 += ui * tg[go + 2 * i];
            g1 += ui * tg[go + 2 * i + 1];
          }
          values[p] = v;
          grads[2 * p] = i00 * g0 + i10 * g1;
          grads[2 * p + 1] = i01 * g0 + i11 * g1;
        }
        return;
      }
      for (let p = 0; p < nPoints; p++) {
        if (p === 0 || !affine) cellJacobian(mesh, c, refPoints, p * dim, J, invJ);
        let v = 0;
        gref[0] = 0; gref[1] = 0; gref[2] = 0;
        for (let i = 0; i < n; i++) {
          const ui = u[i];
          v += ui * tv[p * n + i];
          for (let r = 0; r < dim; r++) gref[r] += ui * tg[(p * n + i) * dim + r];
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

/** Nodal interpolant I_h u: the coefficient of each dof is u at its node. On meshes the cell team shares, in shared
 *  memory, where the team's workers read it as it is (no copy per error integration; src/fem/team/shared.ts). */
export function interpolate(space: FunctionSpace, u: ScalarFn): Float64Array {
  const dim = space.mesh.dim;
  const X = space.dofCoords;
  const out = space.mesh.nCells >= TEAM_MIN_CELLS ? sharedFloat64(space.nDofs) : new Float64Array(space.nDofs);
  for (let g = 0; g < space.nDofs; g++) out[g] = u(X[g * dim], dim > 1 ? X[g * dim + 1] : 0, dim > 2 ? X[g * dim + 2] : 0);
  return out;
}
