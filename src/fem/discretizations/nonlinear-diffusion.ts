import type { Mesh } from '../../mesh/types.ts';
import type { SolveStats } from '../../linalg/types.ts';
import { RungsNumericalError } from '../../errors.ts';
import { solveSystem, AUTO_DIRECT_MAX_N, type SolveSystemOptions } from '../../linalg/index.ts';
import { spmv } from '../../linalg/csr.ts';
import { lagrangeSpace } from '../dofmap/dofmap.ts';
import { singleField } from '../space/space.ts';
import type { MixedSpace } from '../space/types.ts';
import { assembleForm } from '../form/assemble.ts';
import type { CellMatrixTerm, CellVectorTerm, FacetVectorTerm } from '../form/types.ts';
import { boundaryLoadTerm, sourceTerm } from '../form/terms/loads.ts';
import type { NormalData, PointData } from '../form/terms/types.ts';
import { eliminate, expand, fixBoundary, noConstraints } from '../constraints/dirichlet.ts';
import { systemDegrees } from './quadrature-degrees.ts';

/** A coefficient that depends on the solution: writes [value, derivative in u] into out. */
export type SolutionDependent = (u: number, x: number, y: number, z: number, out: Float64Array) => void;

export interface NonlinearDiffusionInput {
  mesh: Mesh;
  degree: number;
  /** κ(u) and κ'(u). */
  conductivity: SolutionDependent;
  /** r(u) and r'(u), when there is a reaction. */
  reaction?: SolutionDependent;
  source: PointData;
  dirichlet?: { tags: readonly string[]; value: PointData };
  /** F·n = κ(u)∇u·n given on these tags. */
  neumann?: { tags: readonly string[]; value: NormalData };
  hints?: { source?: number | null };
  /** Newton stops when the update's size (the energy norm of the Jacobian's symmetric part, a stand-in for the
   *  nonlinear error left before the step) falls to this; default 1e-10 relative to the first update. */
  stopAt?: number;
  maxSteps?: number;
  solver?: Omit<SolveSystemOptions, 'symmetric'>;
}

export interface NewtonStep {
  /** Size of the update of this step. */
  update: number;
  /** Euclidean norm of the residual on the free unknowns before the step. */
  residual: number;
  linear: SolveStats;
}

export interface NonlinearDiffusionSolution {
  space: MixedSpace;
  coefficients: Float64Array;
  steps: NewtonStep[];
  /** The last update's size: the nonlinear error the solution may still carry (a floor, like the algebraic one). */
  nonlinearError: number;
  seconds: { space: number; assemble: number; solve: number };
}

/** The Newton terms at the current iterate U: the Jacobian (κ(u)∇δ + κ'(u)δ∇u, ∇v) + (r'(u)δ, v) and the residual
 *  (κ(u)∇u, ∇v) + (r(u), v) (minus source and boundary data, added by their own terms). */
function newtonTerms(space: MixedSpace, U: { current: Float64Array }, input: NonlinearDiffusionInput, degree: number): { jacobian: CellMatrixTerm; residual: CellVectorTerm } {
  const { cellDofs } = space.fields[0].space.scalar;
  const kv = new Float64Array(2), rv = new Float64Array(2);
  const gu = new Float64Array(3);
  const local = new Float64Array(space.nLocal);
  const gather = (c: number, n: number): void => { for (let a = 0; a < n; a++) local[a] = U.current[cellDofs[c * n + a]]; };
  const atPoint = (cv: { n: number; dim: number; values: Float64Array; grads: Float64Array }, q: number): number => {
    const { n, dim, values, grads } = cv;
    let u = 0;
    gu[0] = 0; gu[1] = 0; gu[2] = 0;
    for (let a = 0; a < n; a++) {
      u += local[a] * values[q * n + a];
      for (let d = 0; d < dim; d++) gu[d] += local[a] * grads[(q * n + a) * dim + d];
    }
    return u;
  };
  const jacobian: CellMatrixTerm = {
    name: 'newton-jacobian', test: 0, trial: 0, degree,
    add(c, cv, _t, out, stride, rowOff, colOff) {
      const { nq, n, dim, values, grads, wdet, x } = cv;
      gather(c, n);
      for (let q = 0; q < nq; q++) {
        const u = atPoint(cv, q);
        input.conductivity(u, x[3 * q], x[3 * q + 1], x[3 * q + 2], kv);
        let dr = 0;
        if (input.reaction) { input.reaction(u, x[3 * q], x[3 * q + 1], x[3 * q + 2], rv); dr = rv[1]; }
        const w = wdet[q];
        for (let a = 0; a < n; a++) {
          const ga = (q * n + a) * dim;
          let guga = 0;
          for (let d = 0; d < dim; d++) guga += gu[d] * grads[ga + d];
          const row = (rowOff + a) * stride + colOff;
          for (let b = 0; b < n; b++) {
            const gb = (q * n + b) * dim;
            let dot = 0;
            for (let d = 0; d < dim; d++) dot += grads[ga + d] * grads[gb + d];
            const vb = values[q * n + b];
            out[row + b] += w * (kv[0] * dot + kv[1] * vb * guga + dr * values[q * n + a] * vb);
          }
        }
      }
    },
  };
  const residual: CellVectorTerm = {
    name: 'newton-residual', test: 0, degree,
    add(c, cv, out, off) {
      const { nq, n, dim, values, grads, wdet, x } = cv;
      gather(c, n);
      for (let q = 0; q < nq; q++) {
        const u = atPoint(cv, q);
        input.conductivity(u, x[3 * q], x[3 * q + 1], x[3 * q + 2], kv);
        let r = 0;
        if (input.reaction) { input.reaction(u, x[3 * q], x[3 * q + 1], x[3 * q + 2], rv); r = rv[0]; }
        const w = wdet[q];
        for (let a = 0; a < n; a++) {
          let guga = 0;
          for (let d = 0; d < dim; d++) guga += gu[d] * grads[(q * n + a) * dim + d];
          out[off + a] += w * (kv[0] * guga + r * values[q * n + a]);
        }
      }
    },
  };
  return { jacobian, residual };
}

/** Continuous Lagrange elements for −∇·(κ(u)∇u) + r(u) = f by Newton's method (quadratic convergence near the
 *  solution; e.g. Deuflhard 2011, Newton Methods for Nonlinear Problems, ch. 2). Each step assembles the Jacobian
 *  and the residual with one generic loop and solves the linear system with multigrid-preconditioned GMRES. */
export function solveNonlinearDiffusion(input: NonlinearDiffusionInput): NonlinearDiffusionSolution {
  const t0 = performance.now();
  const { mesh, degree: k } = input;
  const scalar = lagrangeSpace(mesh, k);
  const space = singleField('u', scalar);
  const t1 = performance.now();
  // The integrands hold κ(u_h) ∇u_h·∇φ: a degree-k polynomial inside κ; over-integrate like a non-polynomial.
  const d = systemDegrees(mesh.cellKind, k, null, input.hints?.source ?? null);
  const U = { current: new Float64Array(space.nDofs) };
  const cons = noConstraints(space.nDofs);
  if (input.dirichlet) fixBoundary(space, cons, 0, input.dirichlet.tags, input.dirichlet.value);
  // The first iterate carries the Dirichlet values; the updates then vanish there.
  U.current.set(cons.values);
  const zeroOnBoundary = { fixed: cons.fixed, values: new Float64Array(space.nDofs) };
  const { jacobian, residual } = newtonTerms(space, U, input, d.gradGrad);
  const minusSource: PointData = (x, y, z, out) => { input.source(x, y, z, out); out[0] = -out[0]; };
  const loads: FacetVectorTerm[] = input.neumann && input.neumann.tags.length
    ? [boundaryLoadTerm(0, 1, input.neumann.tags, (x, y, z, nx, ny, nz, out) => { input.neumann!.value(x, y, z, nx, ny, nz, out); out[0] = -out[0]; }, d.source)]
    : [];
  const form = { matrix: [jacobian], vector: [residual, sourceTerm(0, 1, minusSource, d.source)], facetVector: loads };
  const steps: NewtonStep[] = [];
  const maxSteps = input.maxSteps ?? 30;
  let pattern = undefined as undefined | ReturnType<typeof assembleForm>['A'];
  let tAssemble = 0, tSolve = 0;
  let stopAt = input.stopAt;
  for (let s = 0; s < maxSteps; s++) {
    const ta = performance.now();
    const { A, b } = assembleForm(space, form, { pattern });
    pattern = A;
    for (let i = 0; i < b.length; i++) b[i] = -b[i];
    const sys = eliminate(A, b, zeroOnBoundary);
    tAssemble += (performance.now() - ta) / 1e3;
    let res = 0;
    for (let i = 0; i < sys.b.length; i++) res += sys.b[i] * sys.b[i];
    const ts = performance.now();
    // GMRES with multigrid from a few hundred unknowns on (with ILU(0), as 'auto' picks below 5000 unknowns, the
    // Jacobians took 280–360 GMRES iterations per Newton step at 4225 P2 unknowns; measured).
    const preconditioner = input.solver?.preconditioner ?? (sys.A.nRows > AUTO_DIRECT_MAX_N ? 'amg' : undefined);
    // Every Newton step solves again: the multigrid's memory is kept from one to the next (the level gives it back).
    const { x, stats } = solveSystem(sys.A, sys.b, { relTol: 1e-12, ...input.solver, keepMemory: true, preconditioner, symmetric: false });
    tSolve += (performance.now() - ts) / 1e3;
    const delta = expand(sys, x);
    for (let i = 0; i < delta.length; i++) U.current[i] += delta[i];
    // Size of the update in the Jacobian's energy: |δᵀ J δ|^(1/2) on the free unknowns.
    const Jx = new Float64Array(x.length);
    spmv(sys.A, x, Jx);
    let e = 0;
    for (let i = 0; i < x.length; i++) e += x[i] * Jx[i];
    const update = Math.sqrt(Math.abs(e));
    steps.push({ update, residual: Math.sqrt(res), linear: stats });
    if (stopAt === undefined) stopAt = 1e-10 * update;
    if (update <= stopAt) break;
    if (!Number.isFinite(update)) break;
  }
  const last = steps[steps.length - 1];
  if (!(last.update <= (stopAt ?? 0))) {
    throw new RungsNumericalError(`Newton's method did not converge in ${steps.length} steps: update sizes ${steps.map((s) => s.update.toExponential(2)).join(', ')}`);
  }
  return {
    space, coefficients: U.current, steps, nonlinearError: last.update,
    seconds: { space: (t1 - t0) / 1e3, assemble: tAssemble, solve: tSolve },
  };
}
