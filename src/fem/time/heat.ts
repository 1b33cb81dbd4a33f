import type { Csr } from '../../linalg/types.ts';
import { createLinearSolver, type LinearSolver, type SolveSystemOptions } from '../../linalg/solve.ts';
import { spmv } from '../../linalg/csr.ts';
import { RungsInputError } from '../../errors.ts';
import type { MixedSpace } from '../space/types.ts';
import { assembleForm } from '../form/assemble.ts';
import { viscousTerm } from '../form/terms/viscous.ts';
import { massTerm } from '../form/terms/mass.ts';
import { sourceTerm } from '../form/terms/loads.ts';
import { fixBoundary, noConstraints, type Constraints } from '../constraints/dirichlet.ts';
import { alexander3, type TimeMethodName } from './methods.ts';

/** Data of the heat equation ∂u/∂t − ∇·(k∇u) = f(x, t), u = g on Dirichlet tags, u(·, 0) = u0. */
export interface HeatProblem {
  space: MixedSpace;
  k: (x: number, y: number, z: number, out: Float64Array) => void;
  f: (x: number, y: number, z: number, t: number, out: Float64Array) => void;
  g: (x: number, y: number, z: number, t: number, out: Float64Array) => void;
  u0: (x: number, y: number, z: number, out: Float64Array) => void;
  /** ∂g/∂t, when known: the DIRK then integrates the boundary values as the ODE u' = ∂g/∂t with its own stages (the
   *  method of lines applied consistently), instead of setting each stage to g at the stage time, which costs the
   *  method its order when the boundary data move (its stage order is 1). */
  gDot?: (x: number, y: number, z: number, t: number, out: Float64Array) => void;
  dirichletTags: readonly string[];
  /** Quadrature degrees of the stiffness, mass and load. */
  degrees: { stiffness: number; mass: number; load: number };
  solver?: Omit<SolveSystemOptions, 'symmetric'>;
}

/** The matrices of M U' + K U = F(t), assembled once (whole, no boundary condition), and the fixed unknowns. */
interface Operators { M: Csr; K: Csr; fixed: Uint8Array; free: Int32Array; nFree: number }

function operators(p: HeatProblem): Operators {
  const { A: K } = assembleForm(p.space, { matrix: [viscousTerm(0, 1, p.k, p.degrees.stiffness)], vector: [] });
  const { A: M } = assembleForm(p.space, { matrix: [massTerm(0, 1, p.degrees.mass)], vector: [] }, { pattern: undefined });
  const cons = noConstraints(p.space.nDofs);
  fixBoundary(p.space, cons, 0, p.dirichletTags, (x, y, z, out) => { out[0] = 0; });
  const free: number[] = [];
  for (let u = 0; u < cons.fixed.length; u++) if (!cons.fixed[u]) free.push(u);
  return { M, K, fixed: cons.fixed, free: Int32Array.from(free), nFree: free.length };
}

/** a·A + b·B for two matrices with the same pattern (both assembled on the same space). */
function combine(a: number, A: Csr, b: number, B: Csr): Csr {
  const values = new Float64Array(A.values.length);
  for (let i = 0; i < values.length; i++) values[i] = a * A.values[i] + b * B.values[i];
  return { ...A, values };
}

/** Rows and columns of the free unknowns of a whole matrix, and the free-row, fixed-column part (to move known
 *  boundary values to the right-hand side at every step). */
function splitFree(S: Csr, op: Operators): { Sff: Csr; Sfd: Csr } {
  const reduced = new Int32Array(S.nRows).fill(-1);
  op.free.forEach((u, r) => { reduced[u] = r; });
  const build = (keep: (col: number) => boolean, map: (col: number) => number, nCols: number): Csr => {
    const rowPtr = new Int32Array(op.nFree + 1);
    const cols: number[] = [], vals: number[] = [];
    for (let r = 0; r < op.nFree; r++) {
      const u = op.free[r];
      for (let s = S.rowPtr[u]; s < S.rowPtr[u + 1]; s++) if (keep(S.colIdx[s])) { cols.push(map(S.colIdx[s])); vals.push(S.values[s]); }
      rowPtr[r + 1] = cols.length;
    }
    return { nRows: op.nFree, nCols, rowPtr, colIdx: Int32Array.from(cols), values: Float64Array.from(vals) };
  };
  return { Sff: build((c) => reduced[c] >= 0, (c) => reduced[c], op.nFree), Sfd: build((c) => reduced[c] < 0, (c) => c, S.nCols) };
}

export interface HeatRun {
  /** The solution at the final time (all unknowns). */
  u: Float64Array;
  /** The solution at every time level t_0 … t_N (when kept). */
  history?: Float64Array[];
  steps: number;
  dt: number;
  /** Linear solves and their iterations. */
  solves: number;
  iterations: number;
}

/**
 * Advances the heat equation from 0 to T in `steps` equal steps with one of the methods. The matrix M + γΔt K of the
 * method (γ = 1 backward Euler, 1/2 Crank–Nicolson, 2/3 BDF2, the DIRK's diagonal) is formed, restricted to the free
 * unknowns and its solver (multigrid) set up once; every step is then right-hand sides only. Dirichlet values are
 * imposed at each new time level (and at each stage time of the DIRK, whose stages are solution values). BDF2
 * starts with one Crank–Nicolson step (second order, so the first step does not spoil the method's order; common
 * practice, no source).
 */
export function solveHeat(p: HeatProblem, method: TimeMethodName, T: number, steps: number, opts: { keepHistory?: boolean } = {}): HeatRun {
  if (!(Number.isInteger(steps) && steps >= 1)) throw new RungsInputError(`time steps must be a positive whole number, got ${steps}`);
  if (!(T > 0)) throw new RungsInputError(`the final time T must be positive, got ${T}`);
  const op = operators(p);
  const dt = T / steps;
  const n = p.space.nDofs;
  const X = p.space.fields[0].space.scalar.dofCoords;
  const dim = p.space.mesh.dim;
  const one = new Float64Array(1);
  const at = (fn: (x: number, y: number, z: number, out: Float64Array) => void, out: Float64Array) => {
    for (let u = 0; u < n; u++) { fn(X[u * dim], dim > 1 ? X[u * dim + 1] : 0, dim > 2 ? X[u * dim + 2] : 0, one); out[u] = one[0]; }
  };
  const load = (t: number): Float64Array => assembleForm(p.space, { matrix: [], vector: [sourceTerm(0, 1, (x, y, z, out) => p.f(x, y, z, t, out), p.degrees.load)] }, { matrix: false }).b;
  const boundary = (t: number, u: Float64Array) => {
    for (let i = 0; i < n; i++) if (op.fixed[i]) { p.g(X[i * dim], dim > 1 ? X[i * dim + 1] : 0, dim > 2 ? X[i * dim + 2] : 0, t, one); u[i] = one[0]; }
  };
  const solvers: LinearSolver[] = [];
  let solves = 0, iterations = 0;
  /** A solver for (M + γΔt K) on the free unknowns: solve(rhs whole, target whole with boundary values set). */
  const implicit = (gamma: number) => {
    const S = combine(1, op.M, gamma * dt, op.K);
    const { Sff, Sfd } = splitFree(S, op);
    const solver = createLinearSolver(Sff, { relTol: 1e-12, ...p.solver, symmetric: true });
    solvers.push(solver);
    const bf = new Float64Array(op.nFree), corr = new Float64Array(op.nFree);
    return (rhs: Float64Array, target: Float64Array) => {
      spmv(Sfd, target, corr);
      for (let r = 0; r < op.nFree; r++) bf[r] = rhs[op.free[r]] - corr[r];
      const x0 = new Float64Array(op.nFree);
      for (let r = 0; r < op.nFree; r++) x0[r] = target[op.free[r]];
      const { x, stats } = solver.solve(bf, { x0 });
      solves++; iterations += stats.iterations;
      for (let r = 0; r < op.nFree; r++) target[op.free[r]] = x[r];
    };
  };
  const u = new Float64Array(n);
  at(p.u0, u);
  const history = opts.keepHistory ? [u.slice()] : undefined;
  const Mu = new Float64Array(n), Ku = new Float64Array(n);
  try {
    if (method === 'backward-euler' || method === 'crank-nicolson' || method === 'bdf2') {
      const theta = method === 'backward-euler' ? 1 : 0.5;
      const thetaStep = implicit(theta);
      const bdf = method === 'bdf2' ? implicit(2 / 3) : null;
      let prev: Float64Array | null = null;
      let Fn = load(0);
      for (let s = 0; s < steps; s++) {
        const t1 = (s + 1) * dt;
        const F1 = load(t1);
        const next = u.slice();
        boundary(t1, next);
        const rhs = new Float64Array(n);
        if (bdf && prev) {
          // (M + (2/3)Δt K) U^{n+1} = (4/3) M U^n − (1/3) M U^{n−1} + (2/3) Δt F^{n+1}
          spmv(op.M, u, Mu); spmv(op.M, prev, Ku);
          for (let i = 0; i < n; i++) rhs[i] = (4 / 3) * Mu[i] - (1 / 3) * Ku[i] + (2 / 3) * dt * F1[i];
          bdf(rhs, next);
        } else {
          // (M + θΔt K) U^{n+1} = (M − (1−θ)Δt K) U^n + Δt (θ F^{n+1} + (1−θ) F^n)
          spmv(op.M, u, Mu); spmv(op.K, u, Ku);
          for (let i = 0; i < n; i++) rhs[i] = Mu[i] - (1 - theta) * dt * Ku[i] + dt * (theta * F1[i] + (1 - theta) * Fn[i]);
          thetaStep(rhs, next);
        }
        prev = u.slice();
        u.set(next);
        Fn = F1;
        history?.push(u.slice());
      }
    } else {
      const tab = alexander3();
      const stage = implicit(tab.gamma);
      const nStages = tab.c.length;
      // slopes[j] = F(t_j) − K U_j = M U_j' at stage j.
      const slopes = Array.from({ length: nStages }, () => new Float64Array(n));
      for (let s = 0; s < steps; s++) {
        const t0 = s * dt;
        spmv(op.M, u, Mu);
        const Ui = new Float64Array(n);
        for (let i = 0; i < nStages; i++) {
          const ti = t0 + tab.c[i] * dt;
          const Fi = load(ti);
          // (M + γΔt K) U_i = M U^n + Δt Σ_{j<i} a_ij (F_j − K U_j) + γΔt F_i
          const rhs = new Float64Array(n);
          for (let k = 0; k < n; k++) rhs[k] = Mu[k] + tab.gamma * dt * Fi[k];
          for (let j = 0; j < i; j++) { const a = tab.a[i][j] * dt; const sl = slopes[j]; for (let k = 0; k < n; k++) rhs[k] += a * sl[k]; }
          Ui.set(u);
          if (p.gDot) {
            // Boundary stage values from the same Runge–Kutta stages applied to u_d' = ∂g/∂t.
            for (let k = 0; k < n; k++) {
              if (!op.fixed[k]) continue;
              let v = u[k];
              for (let j = 0; j <= i; j++) {
                p.gDot(X[k * dim], dim > 1 ? X[k * dim + 1] : 0, dim > 2 ? X[k * dim + 2] : 0, t0 + tab.c[j] * dt, one);
                v += dt * tab.a[i][j] * one[0];
              }
              Ui[k] = v;
            }
          } else boundary(ti, Ui);
          stage(rhs, Ui);
          spmv(op.K, Ui, Ku);
          for (let k = 0; k < n; k++) slopes[i][k] = Fi[k] - Ku[k];
        }
        // Stiffly accurate: the last stage is the new value.
        u.set(Ui);
        history?.push(u.slice());
      }
    }
  } finally {
    for (const s of solvers) s.dispose();
  }
  return { u, history, steps, dt, solves, iterations };
}

export type { Constraints };
