import type { DenseCholesky } from '../dense/cholesky.ts';
import type { DenseLu } from '../dense/lu.ts';
import type { Csr, PartTeam, Preconditioner } from '../types.ts';
import type { SeamLayout } from './seams.ts';

export interface AmgOptions {
  /** Strength threshold θ on the finest level, halved on each coarser one (Vaněk, Mandel & Brezina 1996 use
   *  θ = 0.08·0.5^level). Default 0.08. */
  strengthThreshold?: number;
  /** Stop coarsening at or below this many unknowns and solve there directly. Default 400. */
  maxCoarseSize?: number;
  /** At most this many levels, finest included. Default 25. */
  maxLevels?: number;
  /** Gauss–Seidel sweeps before (forward) and after (backward) each coarse correction on the two finest levels.
   *  Default 1. */
  sweeps?: number;
  /** Sweeps on the levels below those two, where a sweep costs a few per cent of a finest one. Default 2 (with 1
   *  the iteration count of P2 rises from 17 to 22 between 16k and 1M unknowns; with 2 it stays within 17–18). */
  coarseSweeps?: number;
  /** W-cycle below the first coarse level (each level from 1 down cycles its coarser level twice); false gives a
   *  plain V-cycle. Default true. */
  wCycle?: boolean;
  /** 'wasm' (default): the hierarchy moves into a WebAssembly arena and the cycle runs the kernels of
   *  src/linalg/kernels/sparse.wat; 'javascript': the same cycle in plain TypeScript (the reference the kernels are
   *  tested against, and the fallback where no arena can be had). Both give the same bits. */
  kernels?: 'wasm' | 'javascript';
  /** Whether the arena may hold a copy of A for a CG solver's products with A (default true; it is made only when
   *  the finest operator cannot stand in for A: see pack.ts operatorCopyFor). False for solvers that multiply with
   *  another matrix (MINRES on a saddle-point system): the copy would cost memory and time for nothing. */
  operatorCopy?: boolean;
  /** Whether A is symmetric; decides the coarsest solver (Cholesky or LU). Checked from A when absent. */
  symmetric?: boolean;
  /** Unknowns per node for a system of PDEs, interleaved node-major (unknown = node·blockSize + component). Above 1
   *  the strength graph and the aggregates are built on nodes (system.ts). Default 1. */
  blockSize?: number;
  /** The near-null space: m vectors with one entry per unknown that A maps to (nearly) zero, carried exactly by the
   *  tentative prolongator; for elasticity the rigid-body modes (rigid-body-modes.ts). Default: the constant in each
   *  of the blockSize components. Given (or with blockSize > 1, or nodeOf), the system path of system.ts is used;
   *  without any of the three the scalar path is unchanged (the system path with blockSize 1 differs from it: its
   *  strength test counts |a_ij|, not only negative couplings). */
  nearNullSpace?: Float64Array[];
  /** The node of each unknown (any non-negative integers; equal values share a node), for reduced systems in which
   *  only some components of a node were eliminated, so that the unknowns are no longer whole blocks of blockSize.
   *  Takes the place of the interleaved numbering; blockSize, when given, bounds the unknowns of a node. Needs
   *  nearNullSpace. */
  nodeOf?: Int32Array;
  /** A coarse space the caller knows, taken as the first coarsening in place of aggregation on the finest level: its
   *  prolongator P (fine unknowns × coarse unknowns, used as given, not smoothed) and the system options of the
   *  coarse space for the aggregation below it (blockSize, nearNullSpace, nodeOf as above, on the coarse unknowns).
   *  For a Lagrange space of degree k > 1, the degree-1 space on the same mesh (fem/space/vertex-subspace.ts):
   *  multigrid in the polynomial degree first, then smoothed aggregation on a P1 operator (p-multigrid, Rønquist &
   *  Patera 1987, Int. J. Numer. Methods Eng. 24, 1795–1812, from memory). With it, the finest level's own system
   *  options are not used. */
  firstCoarseSpace?: FirstCoarseSpace;
  /** Seam-ordered Gauss–Seidel on the large levels of a symmetric hierarchy (seams.ts): the same bits on any number
   *  of threads, and swept by `team` where one is given. Default true; false keeps the natural order everywhere. */
  seamOrder?: boolean;
  /** Threads that sweep the interiors of seam-ordered levels beside this one (WebAssembly cycle only). */
  team?: PartTeam;
  /** false: dispose() gives the arena's memory back (seam-task.ts releaseArenaMemory) instead of keeping it for the
   *  next setup, which would find its pages resident. Default true. */
  keepMemory?: boolean;
}

export interface FirstCoarseSpace {
  P: Csr;
  blockSize?: number;
  nearNullSpace?: Float64Array[];
  nodeOf?: Int32Array;
}

/** One level of the hierarchy: its operator, the data of its smoother, the prolongator that carries its unknowns to
 *  the next finer level, and its work vectors. */
export interface AmgLevel {
  /** The operator of this level (on the finest: the caller's matrix without negligible entries). */
  A: Csr;
  diagPos: Int32Array;
  invDiag: Float64Array;
  /** Gauss–Seidel sweeps before and after the coarse correction on this level. */
  sweeps: number;
  /** Cycles of the next coarser level per coarse correction (1: V-cycle, 2: W-cycle from here down). */
  coarseVisits: number;
  /** Prolongator from this level to the next finer one (nCols = this level's size, nRows = the finer size);
   *  null on the finest level. */
  P: Csr | null;
  /** Pᵀ, kept when the next finer level is seam-ordered and swept by a team (AmgOptions.team): the restriction to
   *  this level then runs in parts of its rows on the team's threads (wasm-cycle.ts), a row of R summing its terms in
   *  the order P's scatter adds them (the same bits). Absent otherwise: the cycle restricts with P's rows. */
  R?: Csr | null;
  /** Right-hand side and iterate of this level inside a cycle (empty on the finest, which works on the caller's
   *  arrays), and the residual this level hands to the next coarser one. */
  b: Float64Array;
  x: Float64Array;
  r: Float64Array;
  /** Coarse residual and correction of a second visit (empty unless the next finer level visits this one twice). */
  rc: Float64Array;
  dx: Float64Array;
  /** The seam order of this level's sweeps (seams.ts), or absent/null for the natural order. */
  seams?: SeamLayout | null;
}

export type CoarseSolver =
  | { kind: 'cholesky'; factor: DenseCholesky }
  | { kind: 'lu'; factor: DenseLu }
  | { kind: 'gauss-seidel'; sweeps: number };

export interface AmgHierarchy {
  /** The caller's matrix; the finest level smooths with a copy of it without negligible entries. */
  operator: Csr;
  /** Whether products with that copy equal those with the caller's matrix bit for bit (only exact zeros dropped),
   *  so that the last sweep can hand CG its A z. */
  exactProducts: boolean;
  levels: AmgLevel[];
  coarse: CoarseSolver;
  /** Symmetric A allows the fused pre-smoothing + residual sweep that reads only the lower triangle. */
  symmetric: boolean;
}

export interface AmgLevelInfo {
  rows: number;
  nnz: number;
}

export interface AmgStats {
  levels: number;
  /** Σ nnz(A_l) / nnz(A_0), A_0 being the caller's matrix without negligible entries (see negligible-entries.ts). */
  operatorComplexity: number;
  /** Σ n_l / n_0. */
  gridComplexity: number;
  setupSeconds: number;
  /** High-water mark of the WebAssembly arena after the setup, in bytes: an upper bound of the memory the hierarchy,
   *  its work vectors and the setup's intermediate products wrote (0 for the JavaScript cycle). */
  arenaBytes: number;
  /** Which kernels the cycle runs ('javascript' also when a WebAssembly arena was asked for but not available). */
  kernels: 'wasm' | 'javascript';
  perLevel: AmgLevelInfo[];
  /** How the coarsest level is solved, e.g. 'cholesky (n = 143)'. */
  coarseSolver: string;
  /** Size m of the near-null space on the system path (absent on the scalar path). */
  nearNullSpace?: number;
  /** Set when coarsening stalled or the coarsest operator was singular (and a pseudo-inverse was used). */
  notes: string[];
}

export interface AmgSetupResult {
  hierarchy: AmgHierarchy;
  preconditioner: Preconditioner;
  stats: AmgStats;
}
