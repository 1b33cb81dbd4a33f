import type { Csr } from '../../linalg/types.ts';
import { createLinearSolver, type LinearSolver, type SolveSystemOptions } from '../../linalg/solve.ts';
import { spmv } from '../../linalg/csr.ts';
import { RungsInputError, RungsNumericalError } from '../../errors.ts';
import type { SolveStats } from '../../linalg/types.ts';
import type { MixedSpace } from '../space/types.ts';
import { assembleForm } from '../form/assemble.ts';
import { viscousTerm } from '../form/terms/viscous.ts';
import { massTerm } from '../form/terms/mass.ts';
import { fixBoundary, noConstraints, type Constraints } from '../constraints/dirichlet.ts';
import { alexander3, type TimeMethodName } from './methods.ts';
import type { SourceFn } from './load.ts';
import { loadAhead, type LoadAhead } from './load-ahead.ts';
import { extrapolation } from './extrapolation.ts';
import { boundaryLoad, type NeumannInTime } from './boundary-load.ts';

/** Data of the heat equation ∂u/∂t − ∇·(k∇u) = f(x, t), u = g on Dirichlet tags, u(·, 0) = u0. */
export interface HeatProblem {
  space: MixedSpace;
  k: (x: number, y: number, z: number, out: Float64Array) => void;
  f: SourceFn;
  /** f again, as the source text of a JavaScript function expression (x, y, z, t, out) => void that uses nothing but
   *  its arguments and the globals (Math): a worker thread rebuilds f from it and assembles the next load vector
   *  while the main thread solves (load-ahead.ts). Without it every load is assembled on the main thread. */
  fSource?: string;
  g: (x: number, y: number, z: number, t: number, out: Float64Array) => void;
  u0: (x: number, y: number, z: number, out: Float64Array) => void;
  /** ∂g/∂t, when known: the DIRK then integrates the boundary values as the ODE u' = ∂g/∂t with its own stages (the
   *  method of lines applied consistently), instead of setting each stage to g at the stage time, which costs the
   *  method its order when the boundary data move (its stage order is 1). */
  gDot?: (x: number, y: number, z: number, t: number, out: Float64Array) => void;
  dirichletTags: readonly string[];
  /** Neumann data on the other tags: ∫ g(·, t) v ds is added to every F(t) (boundary-load.ts). */
  neumann?: NeumannInTime;
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

export interface HeatOptions {
  /** Keep a copy of the solution at every time level (HeatRun.history). */
  keepHistory?: boolean;
  /** Called with the solution at every time level t_0 = 0 … t_N = T (step 0 is the initial data), e.g. to measure
   *  norms over time without keeping the history; u is reused, copy it to keep it. */
  onTimeLevel?: (step: number, t: number, u: Float64Array) => void;
  /** Whether the load vectors are assembled ahead on a worker thread (load-ahead.ts): 'auto' (default) for large
   *  meshes when HeatProblem.fSource is given, true whenever possible (tests), false never. The results are the
   *  same bits either way. */
  loadWorker?: boolean | 'auto';
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
  /** Wall seconds: the matrices, their splits and solver setups; the load vectors F(t) (the main thread's time on
   *  them: assembling, or waiting for the worker that assembles them ahead); the linear solves; the whole run (the
   *  rest is right-hand sides, boundary values and copies). */
  seconds: { setup: number; load: number; solve: number; total: number };
  /** Load vectors assembled ahead with the worker thread (0 when all were assembled on the main thread alone), and
   *  the share of their cells the main thread computed itself when it asked for them (0 … 1). */
  loadsOnWorker: number;
  loadShareHere: number;
}

/**
 * Advances the heat equation from 0 to T in `steps` equal steps with one of the methods. The matrix M + γΔt K of the
 * method (γ = 1 backward Euler, 1/2 Crank–Nicolson, 2/3 BDF2, the DIRK's diagonal) is formed, restricted to the free
 * unknowns and its solver (multigrid) set up once; every step is then right-hand sides only. Dirichlet values are
 * imposed at each new time level (and at each stage time of the DIRK, whose stages are solution values). BDF2
 * starts with one Crank–Nicolson step (second order, so the first step does not spoil the method's order; common
 * practice, no source).
 *
 * Each solve starts from the parabola through the last three time levels (extrapolation.ts), and the next load
 * vector F(t) is assembled while the current one solves, on a worker thread for large meshes when f is also given as
 * text (load-ahead.ts): neither changes what is solved; the worker gives the same bits, the guess changes the answer
 * only within the solver's tolerance.
 */
export function solveHeat(p: HeatProblem, method: TimeMethodName, T: number, steps: number, opts: HeatOptions = {}): HeatRun {
  if (!(Number.isInteger(steps) && steps >= 1)) throw new RungsInputError(`time steps must be a positive whole number, got ${steps}`);
  if (!(T > 0)) throw new RungsInputError(`the final time T must be positive, got ${T}`);
  const tStart = performance.now();
  const seconds = { setup: 0, load: 0, solve: 0, total: 0 };
  // First, so that a worker thread starts (loads its modules) while this thread assembles and sets up.
  const loads = loadAhead({ space: p.space, loadDegree: p.degrees.load, f: p.f, fSource: p.fSource, worker: opts.loadWorker });
  const solvers: LinearSolver[] = [];
  try {
    const op = operators(p);
    seconds.setup = (performance.now() - tStart) / 1000;
    const run = steppers(p, method, T, steps, opts, op, loads, solvers, seconds);
    seconds.total = (performance.now() - tStart) / 1000;
    return { ...run, seconds, loadsOnWorker: loads.onWorker, loadShareHere: loads.onWorker ? loads.chunksHere / (loads.onWorker * loads.chunks) : 0 };
  } finally {
    for (const s of solvers) s.dispose();
    loads.close();
  }
}

/** The time loop of solveHeat, once the matrices are assembled and the loads are arranged. */
function steppers(
  p: HeatProblem, method: TimeMethodName, T: number, steps: number, opts: HeatOptions, op: Operators,
  loads: LoadAhead, solvers: LinearSolver[], seconds: HeatRun['seconds'],
): Omit<HeatRun, 'seconds' | 'loadsOnWorker' | 'loadShareHere'> {
  const dt = T / steps;
  const n = p.space.nDofs;
  const X = p.space.fields[0].space.scalar.dofCoords;
  const dim = p.space.mesh.dim;
  const one = new Float64Array(1);
  const at = (fn: (x: number, y: number, z: number, out: Float64Array) => void, out: Float64Array) => {
    for (let u = 0; u < n; u++) { fn(X[u * dim], dim > 1 ? X[u * dim + 1] : 0, dim > 2 ? X[u * dim + 2] : 0, one); out[u] = one[0]; }
  };
  /** The load vector asked for last, into `slot` (loads.request): assembled now, or waited for. */
  // The Neumann part of F(t), added on this thread when a load vector is taken, at the time it was asked for.
  const neumann = p.neumann ? boundaryLoad(p.space, p.neumann) : null;
  const askedAt = [0, 0];
  const request = (slot: 0 | 1, t: number): void => { askedAt[slot] = t; loads.request(slot, t); };
  const take = (slot: 0 | 1): Float64Array => {
    const t0 = performance.now();
    const F = loads.take(slot);
    if (neumann) neumann(askedAt[slot]!, F);
    seconds.load += (performance.now() - t0) / 1000;
    return F;
  };
  const { fixedList, free, nFree } = op;
  const boundary = (t: number, u: Float64Array) => {
    for (let k = 0; k < fixedList.length; k++) {
      const i = fixedList[k];
      p.g(X[i * dim], dim > 1 ? X[i * dim + 1] : 0, dim > 2 ? X[i * dim + 2] : 0, t, one);
      u[i] = one[0];
    }
  };
  let solves = 0, iterations = 0;
  let worst: SolveStats | null = null;
  // Every vector of the loop below is allocated once here and reused: at a million unknowns a fresh 8 MB vector per
  // step costs tens of milliseconds in first touches (DEVELOPERS.md, "Fresh memory is slow").
  const bf = new Float64Array(nFree), corr = new Float64Array(nFree), x0 = new Float64Array(nFree);
  /** A solver for (M + γΔt K) on the free unknowns: solve(rhs whole, target whole with boundary values set and the
   *  initial guess at the free unknowns). */
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
      // The solution comes back in x0 itself: no new vector per solve.
      const { x, stats } = solver.solve(bf, { x0, out: x0 });
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
  // The initial guesses: the parabola through the three latest time levels (extrapolation.ts). For the DIRK's stages
  // too: its stage values are first-order approximations of u at the stage times (stage order 1), and a polynomial
  // through them guessed worse than one through the time levels (CG iterations per solve at 65k unknowns, 8 and 32
  // steps: 9.0 and 9.3 for the line through the last two stage values, 8.8 and 6.5 for the parabola through the
  // time levels, 10.0 at 32 steps from the last time level as before; BDF2 11.0 and 10.0 from the last time level,
  // 7.9 and 5.4 from the parabola; measured on test/bench/heat.bench.ts's problem).
  const guesses = extrapolation(n, 2);
  guesses.record(0, u);
  const rhs = new Float64Array(n), next = new Float64Array(n);
  let Mu = new Float64Array(n);
  const Ku = new Float64Array(n);
  if (method === 'backward-euler' || method === 'crank-nicolson' || method === 'bdf2') {
    const theta = method === 'backward-euler' ? 1 : 0.5;
    const first = implicit(theta);
    // BDF2's own matrix is set up after its Crank–Nicolson start, whose solver is given back first: its multigrid
    // memory, already resident, then serves the second hierarchy (DEVELOPERS.md, WebAssembly kernels).
    let bdf: ((rhs: Float64Array, target: Float64Array) => void) | null = null;
    // M U^{n−1} for BDF2: the M U^n of the step before (the same product of the same vector, so the same bits).
    let MuPrev = method === 'bdf2' ? new Float64Array(n) : Mu;
    let started = false;
    // F(t_n) and F(t_{n+1}) are the two vectors of `loads`: F(t_{n+2}) is asked for into F(t_n)'s once the
    // right-hand side of step n is formed, and is assembled (on the worker) while step n solves.
    request(0, 0);
    let Fn = take(0);
    let cur: 0 | 1 = 1;
    request(cur, (0 + 1) * dt);
    const explicitPart = (1 - theta) * dt, twoThirdsDt = (2 / 3) * dt;
    for (let s = 0; s < steps; s++) {
      const t1 = (s + 1) * dt;
      const F1 = take(cur);
      if (method === 'bdf2' && started) {
        if (!bdf) { first.solver.dispose(); bdf = implicit(2 / 3).step; }
        // (M + (2/3)Δt K) U^{n+1} = (4/3) M U^n − (1/3) M U^{n−1} + (2/3) Δt F^{n+1}
        spmv(op.M, u, Mu);
        for (let i = 0; i < n; i++) rhs[i] = (4 / 3) * Mu[i] - (1 / 3) * MuPrev[i] + twoThirdsDt * F1[i];
      } else {
        // (M + θΔt K) U^{n+1} = (M − (1−θ)Δt K) U^n + Δt (θ F^{n+1} + (1−θ) F^n)
        spmv(op.M, u, Mu); spmv(op.K, u, Ku);
        for (let i = 0; i < n; i++) rhs[i] = Mu[i] - explicitPart * Ku[i] + dt * (theta * F1[i] + (1 - theta) * Fn[i]);
      }
      if (s + 1 < steps) request(cur === 0 ? 1 : 0, (s + 2) * dt);
      guesses.guess(t1, next);
      boundary(t1, next);
      if (method === 'bdf2' && started) bdf!(rhs, next); else first.step(rhs, next);
      started = true;
      if (method === 'bdf2') { const t = MuPrev; MuPrev = Mu; Mu = t; }
      u.set(next);
      guesses.record(t1, u);
      Fn = F1; cur = cur === 0 ? 1 : 0;
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
    const Ui = next;
    // ∂g/∂t at the boundary unknowns at each stage time of the step, each evaluated once per step.
    const gDotAt = p.gDot ? Array.from({ length: nStages }, () => new Float64Array(fixedList.length)) : [];
    // The stage loads in order, alternating between the two vectors of `loads`: the next stage's (or the next
    // step's first) is asked for once this stage's right-hand side is formed, and assembled while this stage solves.
    let slot: 0 | 1 = 0;
    request(slot, 0 * dt + tab.c[0] * dt);
    for (let s = 0; s < steps; s++) {
      const t0 = s * dt;
      spmv(op.M, u, Mu);
      for (let i = 0; i < nStages; i++) {
        const ti = t0 + tab.c[i] * dt;
        const Fi = take(slot);
        // (M + γΔt K) U_i = M U^n + Δt Σ_{j<i} a_ij (F_j − K U_j) + γΔt F_i
        for (let k = 0; k < n; k++) rhs[k] = Mu[k] + gammaDt * Fi[k];
        for (let j = 0; j < i; j++) { const a = tab.a[i][j] * dt; const sl = slopes[j]; for (let k = 0; k < n; k++) rhs[k] += a * sl[k]; }
        const after: 0 | 1 = slot === 0 ? 1 : 0;
        if (i + 1 < nStages) request(after, t0 + tab.c[i + 1] * dt);
        else if (s + 1 < steps) request(after, (s + 1) * dt + tab.c[0] * dt);
        guesses.guess(ti, Ui);
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
        slot = after;
      }
      // Stiffly accurate: the last stage is the new value.
      u.set(Ui);
      guesses.record((s + 1) * dt, u);
      history?.push(u.slice());
      opts.onTimeLevel?.(s + 1, (s + 1) * dt, u);
    }
  }
  return { u, history, steps, dt, solves, iterations, worst };
}

export type { Constraints };
