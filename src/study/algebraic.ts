import type { Mesh } from '../mesh/types.ts';
import type { NormValues } from '../norms/types.ts';
import type { ScalarFn } from '../fem/assemble/types.ts';

/** Stop the solver once its algebraic error is this fraction of the discretization error (default of
 *  `solver.errorFraction`); the residual test (1e-12) still applies, whichever comes first. */
export const DEFAULT_ERROR_FRACTION = 1e-3;

export interface AlgebraicTie {
  fraction: number;
  /** Required bound on the CG estimate of ||U* − U||_A (0: not tied, the residual test alone stops the solve). */
  target: number;
  /** Per norm, the error the algebraic error alone could account for, given the estimate. */
  floors(estimate: number): Record<string, number>;
}

/** Ties the solver tolerance to the discretization error of this level. The interpolation error stands in for the
 *  discretization error: by Céa's lemma the Galerkin error in the energy norm is at most ||u − I_h u||_E, and of the
 *  same order. The L2 part uses the Friedrichs inequality ||v||_L2 ≤ C_F |v|_H1 with C_F = 2·diam/π (a safe
 *  constant for functions vanishing on part of the boundary of a domain of that diameter; common practice, no
 *  source) and |v|_H1 ≤ ||v||_E / sqrt(k_min). The level's own interpolation error is used rather than the
 *  previous level's discretization error so that levels stay independent (parallel runs give identical results). */
export function algebraicTie(interp: NormValues | null, fraction: number, mesh: Mesh, dofCoords: Float64Array, k?: ScalarFn): AlgebraicTie {
  const dim = mesh.dim;
  let diam2 = 0;
  const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
  for (let v = 0; v < mesh.nVertices; v++) {
    for (let d = 0; d < dim; d++) {
      const c = mesh.coords[v * dim + d];
      if (c < lo[d]) lo[d] = c;
      if (c > hi[d]) hi[d] = c;
    }
  }
  for (let d = 0; d < dim; d++) diam2 += (hi[d] - lo[d]) ** 2;
  const cF = (2 * Math.sqrt(diam2)) / Math.PI;
  let kMin = 1;
  if (k) {
    kMin = Infinity;
    const n = dofCoords.length / dim;
    for (let i = 0; i < n; i++) {
      const v = k(dofCoords[i * dim], dim > 1 ? dofCoords[i * dim + 1] : 0, dim > 2 ? dofCoords[i * dim + 2] : 0);
      if (v < kMin) kMin = v;
    }
    if (!(kMin > 0)) kMin = 1;
  }
  const toH1 = 1 / Math.sqrt(kMin);
  const toL2 = cF * toH1;
  const candidates = interp ? [interp.energy, interp.L2 / toL2].filter((v) => v > 0 && Number.isFinite(v)) : [];
  const target = candidates.length && fraction > 0 ? fraction * Math.min(...candidates) : 0;
  return {
    fraction,
    target,
    floors: (e) => ({ energy: e, H1semi: e * toH1, H1: e * Math.hypot(toH1, toL2), L2: e * toL2 }),
  };
}
