/** One entry point for A x = b: picks the method and preconditioner, builds the preconditioner, solves.
 *  Non-convergence is reported in stats (converged = false, message), never thrown; bad input and singular matrices
 *  met by the direct solver throw RungsInputError. */
import { RungsInputError } from '../errors.ts';
import { amgSetup } from './amg/setup.ts';
import { collectGarbage } from './kernels/collect.ts';
import type { AmgOptions, AmgStats } from './amg/types.ts';
import { bicgstab } from './bicgstab.ts';
import { CG_SYMMETRY_TOL, cg } from './cg.ts';
import { assertFiniteMatrix, isSymmetric } from './csr.ts';
import { directSolve } from './direct/direct-solve.ts';
import { gmres } from './gmres.ts';
import { identityPreconditioner } from './iteration-control.ts';
import { ic0Preconditioner } from './precond/ic0.ts';
import { ilu0Preconditioner } from './precond/ilu0.ts';
import { jacobiPreconditioner } from './precond/jacobi.ts';
import { ssorPreconditioner } from './precond/ssor.ts';
import { assertNotSaddlePoint } from './saddle/zero-diagonal-block.ts';
import type { Csr, PartTeam, Preconditioner, SolveOptions, SolveStats } from './types.ts';

export const METHODS = ['auto', 'cg', 'gmres', 'bicgstab', 'direct'] as const;
export const PRECONDITIONERS = ['auto', 'none', 'jacobi', 'ssor', 'ic0', 'ilu0', 'amg'] as const;
export type MethodName = (typeof METHODS)[number];
export type PreconditionerName = (typeof PRECONDITIONERS)[number];

/** 'auto' solves systems up to this size with the exact direct solver. */
export const AUTO_DIRECT_MAX_N = 200;
/** 'auto' uses algebraic multigrid above this size, an incomplete factorisation below (where its setup is cheaper
 *  and its iteration growth still harmless). */
export const AUTO_AMG_MIN_N = 5000;

export interface SolveSystemOptions {
  /** Whether A is symmetric (from the bilinear form); CG checks it again unless told otherwise. */
  symmetric: boolean;
  method?: MethodName;
  preconditioner?: PreconditionerName;
  relTol?: number;
  maxIter?: number;
  stopWhen?: SolveOptions['stopWhen'];
  /** Initial guess (not modified); zero when absent. */
  x0?: Float64Array;
  /** GMRES restart length (default 30). */
  restart?: number;
  /** Settings of the multigrid preconditioner. */
  amg?: AmgOptions;
  /** The caller's word that A comes from a symmetric bilinear form (e.g. linear elasticity's (σ(u), ε(v))): the
   *  O(nnz) symmetry check before CG is skipped (on 1M P2 elasticity unknowns it took 0.3 s of a 5.5 s setup). An
   *  assembled matrix of such a form may differ from its transpose by round-off, which CG tolerates. */
  symmetricByConstruction?: boolean;
  /** Threads that may share the multigrid cycle's sweeps (AmgOptions.team). */
  team?: PartTeam;
  /** false for the last solve of a run: the multigrid's memory is given back when the solver is disposed, not kept
   *  for a next setup (AmgOptions.keepMemory). */
  keepMemory?: boolean;
}

export interface SolveSystemResult {
  x: Float64Array;
  stats: SolveStats;
  /** Hierarchy figures when the multigrid preconditioner was used. */
  amg?: AmgStats;
}

const WHERE = 'linalg/solveSystem';

/** The method and preconditioner 'auto' resolves to for a system of size n. */
export function autoChoice(n: number, symmetric: boolean): { method: Exclude<MethodName, 'auto'>; preconditioner: Exclude<PreconditionerName, 'auto'> } {
  if (n <= AUTO_DIRECT_MAX_N) return { method: 'direct', preconditioner: 'none' };
  if (symmetric) return { method: 'cg', preconditioner: n > AUTO_AMG_MIN_N ? 'amg' : 'ic0' };
  return { method: 'gmres', preconditioner: n > AUTO_AMG_MIN_N ? 'amg' : 'ilu0' };
}

/** A linear solver set up once for a matrix and used for many right-hand sides (Newton steps with a frozen
 *  Jacobian, time steps): the method and preconditioner are chosen and built once (the multigrid hierarchy lives
 *  until dispose). Each solve gives the same bits as solveSystem with the same options. */
export interface LinearSolver {
  method: Exclude<MethodName, 'auto'>;
  preconditioner: Exclude<PreconditionerName, 'auto'>;
  /** Hierarchy figures when the multigrid preconditioner was built. */
  amg?: AmgStats;
  /** Solves A x = b from x0 (zero when absent); stopWhen replaces the one given at setup for this solve. The
   *  solution is written into `out` when given (it may be x0 itself), else into a new vector. */
  solve(b: Float64Array, opts?: { x0?: Float64Array; stopWhen?: SolveOptions['stopWhen']; out?: Float64Array }): SolveSystemResult;
  /** Frees the preconditioner (the multigrid arena's memory goes to the next setup). */
  dispose(): void;
}

export function createLinearSolver(A: Csr, options: SolveSystemOptions): LinearSolver {
  const { symmetric } = options;
  if (typeof symmetric !== 'boolean') throw new RungsInputError('solveSystem: option symmetric (true/false) is required', WHERE);
  const methodOpt = options.method ?? 'auto';
  const precOpt = options.preconditioner ?? 'auto';
  if (!METHODS.includes(methodOpt)) {
    throw new RungsInputError(`solveSystem: unknown method '${methodOpt}'; valid: ${METHODS.join(', ')}`, WHERE);
  }
  if (!PRECONDITIONERS.includes(precOpt)) {
    throw new RungsInputError(`solveSystem: unknown preconditioner '${precOpt}'; valid: ${PRECONDITIONERS.join(', ')}`, WHERE);
  }
  // NaN or Inf entries first: otherwise they surface as a misleading symmetry or breakdown message.
  assertFiniteMatrix(A, WHERE);
  const n = A.nRows;
  const auto = autoChoice(n, symmetric);
  const method = methodOpt === 'auto' ? auto.method : methodOpt;
  if (method === 'cg' && !symmetric) {
    throw new RungsInputError("solveSystem: method 'cg' needs a symmetric matrix; use 'gmres' or 'bicgstab' for symmetric: false", WHERE);
  }
  const start = (b: Float64Array, x0: Float64Array | undefined, out?: Float64Array): Float64Array => {
    if (b.length !== n) throw new RungsInputError(`solveSystem: b has length ${b.length}, expected ${n}`, WHERE);
    if (out && out.length !== n) throw new RungsInputError(`solveSystem: out has length ${out.length}, expected ${n}`, WHERE);
    const x = out ?? new Float64Array(n);
    if (x0) {
      if (x0.length !== n) throw new RungsInputError(`solveSystem: x0 has length ${x0.length}, expected ${n}`, WHERE);
      if (x0 !== x) x.set(x0);
    } else if (out) x.fill(0);
    return x;
  };
  if (method === 'direct') {
    return {
      method, preconditioner: 'none',
      solve: (b, opts = {}) => { const x = start(b, opts.x0 ?? options.x0, opts.out); return { x, stats: directSolve(A, b, x) }; },
      dispose: () => {},
    };
  }

  let precName = precOpt;
  if (precName === 'auto') precName = n > AUTO_AMG_MIN_N ? 'amg' : symmetric ? 'ic0' : 'ilu0';
  if (precName === 'ic0' && !symmetric) {
    throw new RungsInputError("solveSystem: preconditioner 'ic0' needs a symmetric matrix; use 'ilu0' for symmetric: false", WHERE);
  }
  // CG's own check, done before an incomplete factorisation could fail on the asymmetric matrix for a less clear reason.
  if (method === 'cg' && !(symmetric && options.symmetricByConstruction) && !isSymmetric(A, CG_SYMMETRY_TOL)) {
    throw new RungsInputError(
      "solveSystem: symmetric: true, but the matrix is not symmetric, and method 'cg' needs a symmetric positive definite " +
        "matrix; use 'gmres' or 'bicgstab' (symmetric: false)", WHERE);
  }
  // A saddle-point matrix (a zero diagonal block) is refused before a preconditioner could fail on its zero diagonal.
  if (method === 'cg') assertNotSaddlePoint(A, "solveSystem: method 'cg'", WHERE);
  const t0 = performance.now();
  let M: Preconditioner;
  let amg: AmgStats | undefined;
  let fallback: string | undefined;
  let built: Exclude<PreconditionerName, 'auto'> = precName;
  switch (precName) {
    case 'none': M = identityPreconditioner; break;
    case 'jacobi': M = jacobiPreconditioner(A); break;
    case 'ssor': M = ssorPreconditioner(A); break;
    case 'ic0': M = ic0Preconditioner(A); break;
    case 'ilu0': M = ilu0Preconditioner(A); break;
    case 'amg': {
      try {
        const setup = amgSetup(A, {
          ...options.amg, symmetric, ...(options.team ? { team: options.team } : {}), ...(options.keepMemory === false ? { keepMemory: false } : {}),
        });
        M = setup.preconditioner;
        amg = setup.stats;
      } catch (e) {
        // Chosen automatically for a non-symmetric matrix that smoothed aggregation cannot take (a diagonal entry
        // ≤ 0): fall back to ILU(0) rather than fail. Asked for explicitly, or on bad data, the error stands.
        if (!(precOpt === 'auto' && !symmetric && e instanceof RungsInputError && /positive diagonal/.test(e.message))) throw e;
        M = ilu0Preconditioner(A);
        built = 'ilu0';
        fallback = `amg could not be built (${e.message}); ilu0 was used instead`;
      }
      break;
    }
  }
  let setupSeconds = (performance.now() - t0) / 1000;
  const run = method === 'cg' ? cg : method === 'gmres' ? gmres : bicgstab;
  let disposed = false;
  return {
    method, preconditioner: built, amg,
    solve(b, opts = {}) {
      if (disposed) throw new Error('internal: a linear solver was used after dispose()');
      const x = start(b, opts.x0 ?? options.x0, opts.out);
      const solveOpts: SolveOptions = {
        relTol: options.relTol, maxIter: options.maxIter, preconditioner: M, stopWhen: opts.stopWhen ?? options.stopWhen, restart: options.restart,
        skipSymmetryCheck: method === 'cg',
      };
      const stats = run(A, b, x, solveOpts);
      // The setup is paid once: the first solve reports it, later ones 0.
      stats.setupSeconds = setupSeconds;
      setupSeconds = 0;
      const notes = [stats.message, ...(amg?.notes ?? []), fallback].filter(Boolean);
      if (notes.length > 0) stats.message = notes.join('; ');
      return amg ? { x, stats, amg } : { x, stats };
    },
    dispose() {
      if (disposed) return;
      disposed = true;
      M.dispose?.();
      M = identityPreconditioner;
    },
  };
}

export function solveSystem(A: Csr, b: Float64Array | (() => Float64Array), options: SolveSystemOptions): SolveSystemResult {
  let solver: LinearSolver | null = createLinearSolver(A, options);
  let result: SolveSystemResult;
  try {
    // b may be a function: the right-hand side asked for only once the solver is set up (it may be being assembled
    // on another thread meanwhile: src/fem/discretizations/lagrange.ts).
    result = solver.solve(typeof b === 'function' ? b() : b);
  } finally {
    // The preconditioner lives only for this solve: the multigrid arena's memory (already resident) goes to the next.
    solver.dispose();
  }
  // Memory not kept for a next solve (keepMemory: false) is given back once this thread has collected it, with
  // nothing here holding the solver.
  solver = null;
  if (options.keepMemory === false) collectGarbage();
  return result;
}
