/** Compressed sparse row matrix; column indices sorted within each row. */
export interface Csr {
  nRows: number;
  nCols: number;
  rowPtr: Int32Array;
  colIdx: Int32Array;
  values: Float64Array;
}

/** Threads that share the parts of a phase: `run` computes parts 0 … parts − 1, `here` taking a part on this thread
 *  and the other threads rebuilding the task from `task` (a module URL whose `prepare(input)` returns the function
 *  of one part) and `input` (numbers, arrays, shared memory). Parts write only into places they own, so the result
 *  is the same whichever thread took which part. `light`: the task allocates nothing and holds nothing of the
 *  caller's (the workers skip their collection after it). The cell team of src/fem/team/team.ts is one. */
export interface PartTeam {
  readonly workers: number;
  run(task: string, input: unknown, parts: number, here: (part: number) => void, options?: { light?: boolean }): number;
}

/** z = M^{-1} r for a preconditioner M. Must not allocate per call. */
export interface Preconditioner {
  name: string;
  apply(r: Float64Array, z: Float64Array): void;
  /** Optional fused form for CG: z = M^{-1} r and, in the same sweeps, Az = matrix·z; returns r·z.
   *  CG uses it (saving its own product with A) only when `matrix` is the very matrix it solves with. */
  withProduct?: { matrix: Csr; apply(r: Float64Array, z: Float64Array, Az: Float64Array): number };
  /** Optional: a vector of length n in the preconditioner's own memory (contents unspecified), which apply reads and writes without
   *  copying (the multigrid cycle's WebAssembly arena); a new Float64Array when it has none left. Solvers take the
   *  vectors they pass to apply from here. */
  vector?(n: number): Float64Array;
  /** Gives back a vector from `vector` once the solver is done with it (so the next solve can take it again). */
  release?(v: Float64Array): void;
  /** Optional: the preconditioner will not be used again; its memory may go to the next one (the multigrid arena).
   *  Whoever calls it must hold no vector from `vector`. */
  dispose?(): void;
  /** Optional: CG's vector updates for vectors in that memory (falling back to TypeScript for others). */
  cgSteps?: CgSteps;
  /** Optional: q = matrix·p (returning p·q) with a copy of `matrix` in that memory; CG uses it in place of its own
   *  product when `matrix` is the very matrix it solves with. */
  product?: {
    matrix: Csr;
    spmvDot(p: Float64Array, q: Float64Array): number;
    /** r = b − matrix·x (each row summed from b_i down, as cg.ts trueResidual does), returning r·r. */
    residual?(b: Float64Array, x: Float64Array, r: Float64Array): number;
  };
}

/** The fused vector updates of preconditioned CG. */
export interface CgSteps {
  /** x += α p, r −= α q; returns r·r. */
  update(alpha: number, p: Float64Array, q: Float64Array, x: Float64Array, r: Float64Array): number;
  /** p = z + β p, q = w + β q; returns p·q. */
  direction(beta: number, z: Float64Array, w: Float64Array, p: Float64Array, q: Float64Array): number;
}

export interface SolveOptions {
  /** Stop when ||b - A x|| / ||b|| <= relTol (default 1e-12). */
  relTol?: number;
  maxIter?: number;
  preconditioner?: Preconditioner;
  /** Optional extra stopping test called after each iteration with the current iterate;
   *  return true to stop (used to tie the algebraic error to the discretization error). */
  stopWhen?: (info: StopInfo) => boolean;
  /** CG only: skip the O(nnz) symmetry check when the caller has already checked A (default false). */
  skipSymmetryCheck?: boolean;
  /** GMRES only: Krylov dimension before a restart (default 30). */
  restart?: number;
}

/** What an extra stopping test sees after each iteration. */
export interface StopInfo {
  iteration: number;
  relativeResidual: number;
  /** The current iterate; valid only during the call (it may be the solver's own memory, reused afterwards). */
  x: Float64Array;
  /** CG only: estimate of the A-norm error ||x* − x||_A of the iterate (Hestenes–Stiefel sum over the last
   *  CG_ERROR_DELAY steps; Strakoš & Tichý 2002); Infinity until enough steps were taken. */
  energyErrorEstimate?: number;
}

export interface SolveStats {
  method: string;
  preconditioner: string;
  iterations: number;
  relativeResidual: number;
  converged: boolean;
  /** 'residual' when relTol was reached, 'stopWhen' when the extra test stopped it, 'maxIter', 'breakdown' or
   *  'stagnation' (the residual stopped decreasing) otherwise; 'direct' for the exact solver. */
  stoppedBy: 'residual' | 'stopWhen' | 'maxIter' | 'breakdown' | 'stagnation' | 'direct';
  /** CG: the last estimate of the A-norm of the algebraic error (see StopInfo). */
  energyErrorEstimate?: number;
  /** Seconds spent building the preconditioner, when known. */
  setupSeconds?: number;
  /** Seconds spent iterating (or factorising and solving, for the direct solver), when known. */
  solveSeconds?: number;
  /** Why the solve stopped short, in words the caller can print (e.g. a possibly singular system). */
  message?: string;
}
