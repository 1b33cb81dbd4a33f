import type { Csr } from '../../linalg/types.ts';
import { createLinearSolver, type LinearSolver, type SolveSystemOptions } from '../../linalg/solve.ts';
import { spmv } from '../../linalg/csr.ts';
import { RungsInputError, RungsNumericalError } from '../../errors.ts';
import type { SolveStats } from '../../linalg/types.ts';
import type { MixedSpace } from '../space/types.ts';
import { assembleForm } from '../form/assemble.ts';
import { makeCellValues, reinitCell, type CellValues } from '../geometry/cellvalues.ts';
import { AFFINE_CELL, type Mesh } from '../../mesh/types.ts';
import { ruleFor } from '../quadrature/index.ts';
import { viscousTerm } from '../form/terms/viscous.ts';
import { massTerm } from '../form/terms/mass.ts';
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
interface Operators { M: Csr; K: Csr; free: Int32Array; nFree: number; fixedList: Int32Array }

function operators(p: HeatProblem): Operators {
  const { A: K } = assembleForm(p.space, { matrix: [viscousTerm(0, 1, p.k, p.degrees.stiffness)], vector: [] }, { vector: false });
  // The mass matrix on K's pattern (the same cells, so the same pattern a second sparsity pass would build;
  // splitFree needs it), with values of its own.
  const { A: M } = assembleForm(p.space, { matrix: [massTerm(0, 1, p.degrees.mass)], vector: [] }, {
    pattern: { ...K, values: new Float64Array(K.values.length) }, vector: false,
  });
  const cons = noConstraints(p.space.nDofs);
  fixBoundary(p.space, cons, 0, p.dirichletTags, (x, y, z, out) => { out[0] = 0; });
  let nFree = 0;
  for (let u = 0; u < cons.fixed.length; u++) if (!cons.fixed[u]) nFree++;
  const free = new Int32Array(nFree), fixedList = new Int32Array(cons.fixed.length - nFree);
  for (let u = 0, a = 0, b = 0; u < cons.fixed.length; u++) if (cons.fixed[u]) fixedList[b++] = u; else free[a++] = u;
  return { M, K, free, nFree, fixedList };
}

/** The matrix a·A + b·B (A, B on the same pattern, both assembled on the same space) split into the rows and
 *  columns of the free unknowns, Sff, and the free-row, fixed-column part Sfd (to move known boundary values to the
 *  right-hand side at every step). Each entry is a·A_ij + b·B_ij, written straight into the part it belongs to;
 *  two passes over the rows (count, then fill typed arrays): at a million unknowns a whole combined copy and
 *  growing plain arrays of 7M numbers cost seconds (measured). */
function splitFree(a: number, A: Csr, b: number, B: Csr, op: Operators): { Sff: Csr; Sfd: Csr } {
  const reduced = new Int32Array(A.nRows).fill(-1);
  for (let r = 0; r < op.nFree; r++) reduced[op.free[r]] = r;
  const { rowPtr: Sp, colIdx: Sc } = A;
  const Av = A.values, Bv = B.values;
  const ffPtr = new Int32Array(op.nFree + 1), fdPtr = new Int32Array(op.nFree + 1);
  for (let r = 0; r < op.nFree; r++) {
    const u = op.free[r];
    let ff = 0;
    for (let s = Sp[u]; s < Sp[u + 1]; s++) if (reduced[Sc[s]] >= 0) ff++;
    ffPtr[r + 1] = ffPtr[r] + ff;
    fdPtr[r + 1] = fdPtr[r] + (Sp[u + 1] - Sp[u] - ff);
  }
  const ffCol = new Int32Array(ffPtr[op.nFree]), ffVal = new Float64Array(ffPtr[op.nFree]);
  const fdCol = new Int32Array(fdPtr[op.nFree]), fdVal = new Float64Array(fdPtr[op.nFree]);
  for (let r = 0; r < op.nFree; r++) {
    const u = op.free[r];
    let i = ffPtr[r], j = fdPtr[r];
    for (let s = Sp[u]; s < Sp[u + 1]; s++) {
      const c = Sc[s], rc = reduced[c], v = a * Av[s] + b * Bv[s];
      if (rc >= 0) { ffCol[i] = rc; ffVal[i++] = v; } else { fdCol[j] = c; fdVal[j++] = v; }
    }
  }
  return {
    Sff: { nRows: op.nFree, nCols: op.nFree, rowPtr: ffPtr, colIdx: ffCol, values: ffVal },
    Sfd: { nRows: op.nFree, nCols: A.nCols, rowPtr: fdPtr, colIdx: fdCol, values: fdVal },
  };
}

/** The load vector F(t)_i = ∫ f(·, t) φ_i, written into `out`: the operations of assembleForm with the one term
 *  sourceTerm(0, 1, f(·, t), degree), in the same order (so the same bits), without what that generic loop does for
 *  forms in general and a source alone does not need (basis gradients per cell, the lookups of shared cell values,
 *  a new vector per call). Called once per step (per stage for the DIRK): through the generic loop it cost more
 *  than the step's solve at a million unknowns (measured). */
function loadAssembler(p: HeatProblem): (t: number, out: Float64Array) => void {
  const { mesh, nLocal: L, cellDofs } = p.space;
  const field = p.space.fields[0];
  const rule = ruleFor(mesh.cellKind, Math.max(0, p.degrees.load));
  const cv = makeCellValues(field.space.scalar.element, rule);
  const w: LoadWork = {
    L, off: field.localOffset, cellDofs, cv, J: new Float64Array(9), Fe: new Float64Array(L), fv: new Float64Array(1),
  };
  return AFFINE_CELL[mesh.cellKind] ? (t, out) => loadAffine(p.f, t, out, mesh, w) : (t, out) => loadMapped(p.f, t, out, mesh, w);
}

/** Buffers of one load assembler, allocated once (no allocation per cell or point). */
interface LoadWork { L: number; off: number; cellDofs: Int32Array; cv: CellValues; J: Float64Array; Fe: Float64Array; fv: Float64Array }

/** The load on affine cells (intervals, triangles, tetrahedra). The points and weights × |det J| are reinitCell's,
 *  written out: J and det J by the operations of cellJacobian and invert (src/fem/geometry/jacobian.ts) in the same
 *  order, x = x0 + J ξ summed in the same order; the cell's vector as sourceTerm adds it, scattered as assembleForm
 *  does. A plain function of its arguments, so that V8 keeps the loop's values in registers (about twice as fast at
 *  a million unknowns as the same loop in a closure, measured); no allocation. */
function loadAffine(f: HeatProblem['f'], t: number, out: Float64Array, mesh: Mesh, w: LoadWork): void {
  const { coords, cells, verticesPerCell: vpc, dim, nCells } = mesh;
  const { L, off, cellDofs, cv, J, Fe, fv } = w;
  const { nq, n, values } = cv;
  const { points: pts, weights } = cv.rule;
  out.fill(0);
  // Fe is zero at the start of every cell: the scatter at its end clears what it added.
  for (let c = 0; c < nCells; c++) {
    const base = c * vpc, v0 = cells[base] * dim;
    for (let r = 0; r < dim; r++) {
      const vr = cells[base + r + 1] * dim;
      for (let d = 0; d < dim; d++) J[d * dim + r] = coords[vr + d] - coords[v0 + d];
    }
    let det: number;
    if (dim === 2) det = J[0] * J[3] - J[1] * J[2];
    else if (dim === 1) det = J[0];
    else {
      const A = J[4] * J[8] - J[5] * J[7], B = -(J[3] * J[8] - J[5] * J[6]), C = J[3] * J[7] - J[4] * J[6];
      det = J[0] * A + J[1] * B + J[2] * C;
    }
    if (!(det > 0)) reinitCell(cv, mesh, c, false); // throws, naming the cell
    const x0 = coords[v0], y0 = dim > 1 ? coords[v0 + 1] : 0, z0 = dim > 2 ? coords[v0 + 2] : 0;
    for (let q = 0; q < nq; q++) {
      let x = x0, y = 0, z = 0;
      if (dim === 2) {
        const s = pts[2 * q], r = pts[2 * q + 1];
        x += J[0] * s; x += J[1] * r;
        y = y0; y += J[2] * s; y += J[3] * r;
      } else if (dim === 1) x += J[0] * pts[q];
      else {
        const s = pts[3 * q], r = pts[3 * q + 1], u = pts[3 * q + 2];
        x += J[0] * s; x += J[1] * r; x += J[2] * u;
        y = y0; y += J[3] * s; y += J[4] * r; y += J[5] * u;
        z = z0; z += J[6] * s; z += J[7] * r; z += J[8] * u;
      }
      f(x, y, z, t, fv);
      const wq = weights[q] * det, v = fv[0], qn = q * n;
      for (let a = 0; a < n; a++) Fe[off + a] += (wq * values[qn + a]) * v;
    }
    const o = c * L;
    for (let i = 0; i < L; i++) { out[cellDofs[o + i]] += Fe[i]; Fe[i] = 0; }
  }
}

/** The load on mapped cells (quadrilaterals, hexahedra): reinitCell's points and weights, without the gradients. */
function loadMapped(f: HeatProblem['f'], t: number, out: Float64Array, mesh: Mesh, w: LoadWork): void {
  const { L, off, cellDofs, cv, Fe, fv } = w;
  const { nq, n, values, x, wdet } = cv;
  out.fill(0);
  for (let c = 0; c < mesh.nCells; c++) {
    reinitCell(cv, mesh, c, false);
    for (let q = 0; q < nq; q++) {
      f(x[3 * q], x[3 * q + 1], x[3 * q + 2], t, fv);
      const wq = wdet[q], v = fv[0], qn = q * n;
      for (let a = 0; a < n; a++) Fe[off + a] += (wq * values[qn + a]) * v;
    }
    const o = c * L;
    for (let i = 0; i < L; i++) { out[cellDofs[o + i]] += Fe[i]; Fe[i] = 0; }
  }
}

export interface HeatOptions {
  /** Keep a copy of the solution at every time level (HeatRun.history). */
  keepHistory?: boolean;
  /** Called with the solution at every time level t_0 = 0 … t_N = T (step 0 is the initial data), e.g. to measure
   *  norms over time without keeping the history; u is reused, copy it to keep it. */
  onTimeLevel?: (step: number, t: number, u: Float64Array) => void;
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
  /** The statistics of the solve that reached the smallest relative reduction (the worst), to report and check. */
  worst: SolveStats | null;
  /** Wall seconds: the matrices, their splits and solver setups; the load vectors F(t); the linear solves; the whole
   *  run (the rest is right-hand sides, boundary values and copies). */
  seconds: { setup: number; load: number; solve: number; total: number };
}

/**
 * Advances the heat equation from 0 to T in `steps` equal steps with one of the methods. The matrix M + γΔt K of the
 * method (γ = 1 backward Euler, 1/2 Crank–Nicolson, 2/3 BDF2, the DIRK's diagonal) is formed, restricted to the free
 * unknowns and its solver (multigrid) set up once; every step is then right-hand sides only. Dirichlet values are
 * imposed at each new time level (and at each stage time of the DIRK, whose stages are solution values). BDF2
 * starts with one Crank–Nicolson step (second order, so the first step does not spoil the method's order; common
 * practice, no source).
 */
export function solveHeat(p: HeatProblem, method: TimeMethodName, T: number, steps: number, opts: HeatOptions = {}): HeatRun {
  if (!(Number.isInteger(steps) && steps >= 1)) throw new RungsInputError(`time steps must be a positive whole number, got ${steps}`);
  if (!(T > 0)) throw new RungsInputError(`the final time T must be positive, got ${T}`);
  const tStart = performance.now();
  const seconds = { setup: 0, load: 0, solve: 0, total: 0 };
  const op = operators(p);
  const dt = T / steps;
  const n = p.space.nDofs;
  const X = p.space.fields[0].space.scalar.dofCoords;
  const dim = p.space.mesh.dim;
  const one = new Float64Array(1);
  const at = (fn: (x: number, y: number, z: number, out: Float64Array) => void, out: Float64Array) => {
    for (let u = 0; u < n; u++) { fn(X[u * dim], dim > 1 ? X[u * dim + 1] : 0, dim > 2 ? X[u * dim + 2] : 0, one); out[u] = one[0]; }
  };
  const assembleLoad = loadAssembler(p);
  seconds.setup = (performance.now() - tStart) / 1000;
  const load = (t: number, out: Float64Array): void => {
    const t0 = performance.now();
    assembleLoad(t, out);
    seconds.load += (performance.now() - t0) / 1000;
  };
  const { fixedList, free, nFree } = op;
  const boundary = (t: number, u: Float64Array) => {
    for (let k = 0; k < fixedList.length; k++) {
      const i = fixedList[k];
      p.g(X[i * dim], dim > 1 ? X[i * dim + 1] : 0, dim > 2 ? X[i * dim + 2] : 0, t, one);
      u[i] = one[0];
    }
  };
  const solvers: LinearSolver[] = [];
  let solves = 0, iterations = 0;
  let worst: SolveStats | null = null;
  // Every vector of the loop below is allocated once here and reused: at a million unknowns a fresh 8 MB vector per
  // step costs tens of milliseconds in first touches (DEVELOPERS.md, "Fresh memory is slow").
  const bf = new Float64Array(nFree), corr = new Float64Array(nFree), x0 = new Float64Array(nFree);
  /** A solver for (M + γΔt K) on the free unknowns: solve(rhs whole, target whole with boundary values set). */
  const implicit = (gamma: number): { step: (rhs: Float64Array, target: Float64Array) => void; solver: LinearSolver } => {
    const t0 = performance.now();
    const { Sff, Sfd } = splitFree(1, op.M, gamma * dt, op.K, op);
    const solver = createLinearSolver(Sff, { relTol: 1e-12, ...p.solver, symmetric: true });
    solvers.push(solver);
    seconds.setup += (performance.now() - t0) / 1000;
    const step = (rhs: Float64Array, target: Float64Array) => {
      spmv(Sfd, target, corr);
      for (let r = 0; r < nFree; r++) bf[r] = rhs[free[r]] - corr[r];
      for (let r = 0; r < nFree; r++) x0[r] = target[free[r]];
      const t0 = performance.now();
      const { x, stats } = solver.solve(bf, { x0 });
      seconds.solve += (performance.now() - t0) / 1000;
      solves++; iterations += stats.iterations;
      if (!stats.converged) {
        throw new RungsNumericalError(
          `time step solve ${solves}: the ${stats.method} solver (preconditioner ${stats.preconditioner}) stopped by ${stats.stoppedBy} after ` +
          `${stats.iterations} iterations at relative residual ${stats.relativeResidual.toExponential(2)}`);
      }
      if (!worst || stats.relativeResidual > worst.relativeResidual) worst = stats;
      for (let r = 0; r < nFree; r++) target[free[r]] = x[r];
    };
    return { step, solver };
  };
  const u = new Float64Array(n);
  at(p.u0, u);
  const history = opts.keepHistory ? [u.slice()] : undefined;
  opts.onTimeLevel?.(0, 0, u);
  const rhs = new Float64Array(n), next = new Float64Array(n);
  let Mu = new Float64Array(n);
  const Ku = new Float64Array(n);
  try {
    if (method === 'backward-euler' || method === 'crank-nicolson' || method === 'bdf2') {
      const theta = method === 'backward-euler' ? 1 : 0.5;
      const first = implicit(theta);
      // BDF2's own matrix is set up after its Crank–Nicolson start, whose solver is given back first: its multigrid
      // memory, already resident, then serves the second hierarchy (DEVELOPERS.md, WebAssembly kernels).
      let bdf: ((rhs: Float64Array, target: Float64Array) => void) | null = null;
      // M U^{n−1} for BDF2: the M U^n of the step before (the same product of the same vector, so the same bits).
      let MuPrev = method === 'bdf2' ? new Float64Array(n) : Mu;
      let started = false;
      let Fn = new Float64Array(n), F1 = new Float64Array(n);
      load(0, Fn);
      const explicitPart = (1 - theta) * dt, twoThirdsDt = (2 / 3) * dt;
      for (let s = 0; s < steps; s++) {
        const t1 = (s + 1) * dt;
        load(t1, F1);
        next.set(u);
        boundary(t1, next);
        if (method === 'bdf2' && started) {
          if (!bdf) { first.solver.dispose(); bdf = implicit(2 / 3).step; }
          // (M + (2/3)Δt K) U^{n+1} = (4/3) M U^n − (1/3) M U^{n−1} + (2/3) Δt F^{n+1}
          spmv(op.M, u, Mu);
          for (let i = 0; i < n; i++) rhs[i] = (4 / 3) * Mu[i] - (1 / 3) * MuPrev[i] + twoThirdsDt * F1[i];
          bdf(rhs, next);
        } else {
          // (M + θΔt K) U^{n+1} = (M − (1−θ)Δt K) U^n + Δt (θ F^{n+1} + (1−θ) F^n)
          spmv(op.M, u, Mu); spmv(op.K, u, Ku);
          for (let i = 0; i < n; i++) rhs[i] = Mu[i] - explicitPart * Ku[i] + dt * (theta * F1[i] + (1 - theta) * Fn[i]);
          first.step(rhs, next);
        }
        started = true;
        if (method === 'bdf2') { const t = MuPrev; MuPrev = Mu; Mu = t; }
        u.set(next);
        { const t = Fn; Fn = F1; F1 = t; }
        history?.push(u.slice());
        opts.onTimeLevel?.(s + 1, t1, u);
      }
    } else {
      const tab = alexander3();
      const stage = implicit(tab.gamma).step;
      const nStages = tab.c.length;
      const gammaDt = tab.gamma * dt;
      // slopes[j] = F(t_j) − K U_j = M U_j' at stage j (the last stage's is never needed: it is the new value).
      const slopes = Array.from({ length: nStages - 1 }, () => new Float64Array(n));
      const Fi = new Float64Array(n), Ui = next;
      // ∂g/∂t at the boundary unknowns at each stage time of the step, each evaluated once per step.
      const gDotAt = p.gDot ? Array.from({ length: nStages }, () => new Float64Array(fixedList.length)) : [];
      for (let s = 0; s < steps; s++) {
        const t0 = s * dt;
        spmv(op.M, u, Mu);
        for (let i = 0; i < nStages; i++) {
          const ti = t0 + tab.c[i] * dt;
          load(ti, Fi);
          // (M + γΔt K) U_i = M U^n + Δt Σ_{j<i} a_ij (F_j − K U_j) + γΔt F_i
          for (let k = 0; k < n; k++) rhs[k] = Mu[k] + gammaDt * Fi[k];
          for (let j = 0; j < i; j++) { const a = tab.a[i][j] * dt; const sl = slopes[j]; for (let k = 0; k < n; k++) rhs[k] += a * sl[k]; }
          Ui.set(u);
          if (p.gDot) {
            // Boundary stage values from the same Runge–Kutta stages applied to u_d' = ∂g/∂t.
            const gd = gDotAt[i], tj = t0 + tab.c[i] * dt;
            for (let b = 0; b < fixedList.length; b++) {
              const k = fixedList[b];
              p.gDot(X[k * dim], dim > 1 ? X[k * dim + 1] : 0, dim > 2 ? X[k * dim + 2] : 0, tj, one);
              gd[b] = one[0];
            }
            for (let b = 0; b < fixedList.length; b++) {
              const k = fixedList[b];
              let v = u[k];
              for (let j = 0; j <= i; j++) v += dt * tab.a[i][j] * gDotAt[j][b];
              Ui[k] = v;
            }
          } else boundary(ti, Ui);
          stage(rhs, Ui);
          if (i < nStages - 1) {
            spmv(op.K, Ui, Ku);
            const sl = slopes[i];
            for (let k = 0; k < n; k++) sl[k] = Fi[k] - Ku[k];
          }
        }
        // Stiffly accurate: the last stage is the new value.
        u.set(Ui);
        history?.push(u.slice());
        opts.onTimeLevel?.(s + 1, (s + 1) * dt, u);
      }
    }
  } finally {
    for (const s of solvers) s.dispose();
  }
  seconds.total = (performance.now() - tStart) / 1000;
  return { u, history, steps, dt, solves, iterations, worst, seconds };
}

export type { Constraints };
