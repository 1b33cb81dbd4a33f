import { RungsInputError } from '../../errors.ts';
import { AFFINE_CELL } from '../../mesh/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { cellJacobian } from '../geometry/jacobian.ts';
import type { DiscreteField } from './types.ts';

/** Value of a field with several components at a point, written into out[0..components). */
export type ComponentsFn = (x: number, y: number, z: number, out: Float64Array) => void;

function checkComponents(components: number, where: string): void {
  if (!(Number.isInteger(components) && components >= 1)) {
    throw new RungsInputError(`${where}: components must be a whole number ≥ 1, got ${String(components)}`, where);
  }
}

/**
 * The finite element function Σ_g Σ_i U_{g,i} φ_g e_i of a vector Lagrange space: every component in the same
 * scalar space, unknowns interleaved node by node (component i at scalar dof g is coeffs[g·components + i], the
 * layout of src/fem/space). Fills values[p·nc + i] and grads[(p·nc + i)·dim + d], as DiscreteField asks.
 * The basis is tabulated once per points array (the same array comes for every cell of one integration) and
 * nothing is allocated per cell or per point: the hot loop of the error integrals runs through here
 * (DEVELOPERS.md, "Hot loops over Float64Array").
 */
export function vectorLagrangeField(space: FunctionSpace, components: number, coeffs: Float64Array): DiscreteField {
  checkComponents(components, 'vectorLagrangeField');
  const nc = components;
  if (coeffs.length !== space.nDofs * nc) {
    throw new RungsInputError(
      `vectorLagrangeField: coefficients must hold ${space.nDofs} dofs × ${nc} components = ${space.nDofs * nc} values, got ${coeffs.length}`,
      'vectorLagrangeField',
    );
  }
  const { mesh, element: el, cellDofs } = space;
  const n = el.nDofs, dim = mesh.dim;
  let cachedPoints: Float64Array | null = null;
  let cachedN = -1;
  let tabV = new Float64Array(0), tabG = new Float64Array(0);
  const J = new Float64Array(9), invJ = new Float64Array(9);
  const gref = new Float64Array(3 * nc);
  // Local coefficients of one cell, local-dof-major: local[a·nc + i].
  const local = new Float64Array(n * nc);
  // Simplices: one Jacobian per cell; quadrilaterals, hexahedra: one per point (generic geometry helpers).
  const affine = AFFINE_CELL[mesh.cellKind];
  const linear = mesh.cellKind === 'triangle' && el.degree === 1 && n === 3;
  return {
    mesh,
    nDofs: space.nDofs * nc,
    degree: el.degree,
    components: nc,
    nodes: { coords: space.dofCoords, values: coeffs },
    evaluate(c, refPoints, nPoints, values, grads) {
      if (refPoints !== cachedPoints || nPoints !== cachedN) {
        tabV = new Float64Array(nPoints * n);
        tabG = new Float64Array(nPoints * n * dim);
        el.tabulate(refPoints, nPoints, tabV, tabG);
        cachedPoints = refPoints; cachedN = nPoints;
      }
      // Locals, not closure slots, in the hot loop.
      const tv = tabV, tg = tabG, u = local;
      const o = c * n;
      for (let a = 0; a < n; a++) {
        const g = cellDofs[o + a] * nc;
        for (let i = 0; i < nc; i++) u[a * nc + i] = coeffs[g + i];
      }
      if (dim === 2 && affine) {
        // Affine 2D cells: one inverse Jacobian per cell, the physical gradient = J^{-T} times the reference one.
        cellJacobian(mesh, c, refPoints, 0, J, invJ);
        const i00 = invJ[0], i01 = invJ[1], i10 = invJ[2], i11 = invJ[3];
        if (linear) {
          // P1 on a triangle: each component's gradient is one vector per cell (the reference gradients are the
          // same at every point); only the values vary.
          for (let i = 0; i < nc; i++) {
            const u0 = u[i], u1 = u[nc + i], u2 = u[2 * nc + i];
            const g0 = u0 * tg[0] + u1 * tg[2] + u2 * tg[4], g1 = u0 * tg[1] + u1 * tg[3] + u2 * tg[5];
            const d0 = i00 * g0 + i10 * g1, d1 = i01 * g0 + i11 * g1;
            for (let p = 0; p < nPoints; p++) {
              const vo = 3 * p, k = p * nc + i;
              values[k] = u0 * tv[vo] + u1 * tv[vo + 1] + u2 * tv[vo + 2];
              grads[2 * k] = d0;
              grads[2 * k + 1] = d1;
            }
          }
          return;
        }
        for (let p = 0; p < nPoints; p++) {
          const vo = p * n, go = vo * 2;
          for (let i = 0; i < nc; i++) {
            let v = 0, g0 = 0, g1 = 0;
            for (let a = 0; a < n; a++) {
              const ua = u[a * nc + i];
              v += ua * tv[vo + a];
              g0 += ua * tg[go + 2 * a];
              g1 += ua * tg[go + 2 * a + 1];
            }
            const k = p * nc + i;
            values[k] = v;
            grads[2 * k] = i00 * g0 + i10 * g1;
            grads[2 * k + 1] = i01 * g0 + i11 * g1;
          }
        }
        return;
      }
      for (let p = 0; p < nPoints; p++) {
        if (p === 0 || !affine) cellJacobian(mesh, c, refPoints, p * dim, J, invJ);
        const vo = p * n;
        for (let i = 0; i < nc; i++) {
          let v = 0;
          for (let r = 0; r < dim; r++) gref[i * 3 + r] = 0;
          for (let a = 0; a < n; a++) {
            const ua = u[a * nc + i];
            v += ua * tv[vo + a];
            const go = (vo + a) * dim;
            for (let r = 0; r < dim; r++) gref[i * 3 + r] += ua * tg[go + r];
          }
          const k = p * nc + i;
          values[k] = v;
          for (let d = 0; d < dim; d++) {
            let s = 0;
            for (let r = 0; r < dim; r++) s += invJ[r * dim + d] * gref[i * 3 + r];
            grads[k * dim + d] = s;
          }
        }
      }
    },
  };
}

/** Nodal interpolant I_h u of a field with `components` components: coefficient g·components + i is u_i at the
 *  node of scalar dof g (the layout of vectorLagrangeField). */
export function interpolateVector(space: FunctionSpace, components: number, value: ComponentsFn): Float64Array {
  checkComponents(components, 'interpolateVector');
  const nc = components;
  const dim = space.mesh.dim;
  const X = space.dofCoords;
  const out = new Float64Array(space.nDofs * nc);
  // One buffer for every node (at least 3 long, for value functions written for a point in space).
  const buf = new Float64Array(Math.max(nc, 3));
  for (let g = 0; g < space.nDofs; g++) {
    value(X[g * dim], dim > 1 ? X[g * dim + 1] : 0, dim > 2 ? X[g * dim + 2] : 0, buf);
    for (let i = 0; i < nc; i++) out[g * nc + i] = buf[i];
  }
  return out;
}
