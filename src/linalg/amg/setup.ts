/** Smoothed-aggregation algebraic multigrid setup (Vaněk, Mandel & Brezina 1996, Computing 56, 179–196):
 *  strength graph → aggregates → Jacobi-smoothed prolongator → Galerkin operator Pᵀ A P, level after level,
 *  until the operator is small enough for a dense factorisation. The solve phase is vCyclePreconditioner.
 *  The finest level is first stripped of the entries finite element assembly stores without need (exact zeros
 *  and round-off, see negligible-entries.ts); smoother and hierarchy work with that copy. Below the first coarse
 *  level the cycle is a W-cycle, and from the second one down it sweeps twice: there a sweep costs a few per cent
 *  of a finest-level one, and together they keep the PCG iteration counts flat from 16k to 1M unknowns (P2: 17–18)
 *  and within 1.7× of the constant-coefficient ones for a 1000:1 checkerboard (measured, test/bench/fe-solve).
 *  Everything the setup creates comes from an allocator: by default a WebAssembly arena (pack.ts), so that the
 *  hierarchy is built where the kernels of wasm-cycle.ts read it; `kernels: 'javascript'` keeps it on the heap.
 *  Systems (options blockSize, nearNullSpace, nodeOf): aggregates of nodes and a tentative prolongator carrying the
 *  near-null space, e.g. the rigid-body modes of elasticity (system.ts); the rest of the setup and the cycle are
 *  shared. P1 plane-strain elasticity with the rigid-body modes: 15–17 PCG iterations from 8k to 1M unknowns,
 *  29–35 with the two constants only (measured, test/bench/elasticity-amg.bench.ts). */
import { RungsInputError } from '../../errors.ts';
import { isSymmetric, transpose } from '../csr.ts';
import type { Csr } from '../types.ts';
import { aggregate } from './aggregation.ts';
import { buildCoarseSolver } from './coarse-solver.ts';
import { galerkinProduct } from './galerkin.ts';
import { scanLevel } from './level-scan.ts';
import { finestOperator } from './negligible-entries.ts';
import { smoothedProlongator } from './prolongator.ts';
import { strengthGraph } from './strength.ts';
import { freeNodes, nodeAggregates, smoothTentative, systemOptions, tentativeProlongator } from './system.ts';
import { arenaEstimate, arenaVectorBytes, arenaVectors, operatorCopyFor, packHierarchy, spillingAllocator } from './pack.ts';
import { createArena } from '../kernels/arena.ts';
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import type { AmgHierarchy, AmgLevel, AmgOptions, AmgSetupResult } from './types.ts';
import { vCyclePreconditioner } from './vcycle.ts';
import { wasmCyclePreconditioner } from './wasm-cycle.ts';
import { SEAM_MIN_ROWS, seamLayout } from './seams.ts';
import { collectGarbage } from '../kernels/collect.ts';

const WHERE = 'linalg/amg';

/** A level that keeps more than this fraction of its unknowns is not worth coarsening further. */
const STALLED_COARSENING = 0.8;
/** Lanczos steps for ρ(D⁻¹A) in the prolongator damping; a handful suffice for the 4/(3ρ) rule. */
const LANCZOS_STEPS = 4;
/** Levels from this one down use options.coarseSweeps. */
const FIRST_CHEAP_LEVEL = 2;
/** Matrices from this many rows on get a garbage collection before their setup (20–30 ms at 1M rows). */
const COLLECT_BEFORE_ROWS = SEAM_MIN_ROWS;
/** Levels from this one down visit their next coarser level twice per cycle when options.wCycle is on. */
const FIRST_W_LEVEL = 1;

export function amgSetup(A: Csr, opts: AmgOptions = {}): AmgSetupResult {
  const t0 = performance.now();
  const theta0 = opts.strengthThreshold ?? 0.08;
  const maxCoarse = opts.maxCoarseSize ?? 400;
  const maxLevels = opts.maxLevels ?? 25;
  const sweeps = opts.sweeps ?? 1;
  const coarseSweeps = opts.coarseSweeps ?? Math.max(sweeps, 2);
  const wCycle = opts.wCycle ?? true;
  if (!(theta0 >= 0 && theta0 < 1)) throw new RungsInputError(`amg: strengthThreshold must lie in [0, 1), got ${theta0}`, WHERE);
  if (!(Number.isInteger(maxCoarse) && maxCoarse >= 1)) throw new RungsInputError(`amg: maxCoarseSize must be a positive integer, got ${maxCoarse}`, WHERE);
  if (!(Number.isInteger(maxLevels) && maxLevels >= 1)) throw new RungsInputError(`amg: maxLevels must be a positive integer, got ${maxLevels}`, WHERE);
  if (!(Number.isInteger(sweeps) && sweeps >= 1)) throw new RungsInputError(`amg: sweeps must be a positive integer, got ${sweeps}`, WHERE);
  if (!(Number.isInteger(coarseSweeps) && coarseSweeps >= 1)) throw new RungsInputError(`amg: coarseSweeps must be a positive integer, got ${coarseSweeps}`, WHERE);
  if (A.nRows !== A.nCols) throw new RungsInputError(`amg: matrix is ${A.nRows}×${A.nCols}; a square matrix is needed`, WHERE);
  if (A.nRows === 0) throw new RungsInputError('amg: the matrix is empty', WHERE);
  // Before a large hierarchy claims its memory, the garbage of whatever built A goes (collect.ts says why).
  if (A.nRows >= COLLECT_BEFORE_ROWS) collectGarbage();
  const symmetric = opts.symmetric ?? isSymmetric(A);
  // Systems (blockSize, nearNullSpace or nodeOf given): aggregates of nodes and a tentative prolongator that carries
  // the near-null space (system.ts). Checked before any arena is reserved; the finest nodes live on the heap.
  const given = opts.firstCoarseSpace;
  if (given) checkFirstCoarseSpace(A, given.P);
  const system = given ? null : systemOptions(A.nRows, opts);
  let nodes = system?.nodes;
  let nearNull = system?.nearNullSpace;
  /** Whether nodes and nearNull were made by this setup from its allocator (coarse levels), not the caller's. */
  let ownNodes = false;

  const notes: string[] = [];
  const levels: AmgLevel[] = [];
  // The hierarchy is built straight into the kernels' arena when one is asked for and can be had (see pack.ts).
  const arena = (opts.kernels ?? 'wasm') === 'wasm' ? createArena(arenaEstimate(A)) : null;
  const spill = arena ? spillingAllocator(arena) : null;
  const alloc: Allocator = spill ?? heapAllocator;
  let current = A;
  let P: Csr | null = null;
  let keptR: Csr | null = null;
  // The levels swept once per visit of a symmetric hierarchy may sweep in seam order (several threads at once), and
  // with a team to sweep them, the restriction from them runs in parts of Pᵀ's rows (AmgLevel.R).
  const seamOrder = symmetric && opts.seamOrder !== false;
  const teamSweeps = seamOrder && opts.team !== undefined && opts.team.workers > 0 && (opts.kernels ?? 'wasm') === 'wasm';
  let exactProducts = true;
  for (let l = 0; ; l++) {
    const n = current.nRows;
    let scan = scanLevel(current, l, alloc);
    if (l === 0) {
      // The operator the cycle smooths with: A without negligible entries, in the arena when there is one.
      const finest = finestOperator(current, scan.diag, alloc);
      exactProducts = finest.exactProducts;
      current = finest.operator;
      alloc.free(scan.diagPos);
      scan = { ...scan, diagPos: finest.diagPos };
    }
    const { diagPos, diag, invDiag } = scan;
    const onCoarsest = n <= maxCoarse || levels.length >= maxLevels;
    levels.push({
      A: current, diagPos, invDiag, sweeps: l < FIRST_CHEAP_LEVEL ? sweeps : coarseSweeps, coarseVisits: 1, P, R: keptR,
      // Work vectors: every cycle writes them before reading them, so they need no zeroing.
      b: alloc.f64(l === 0 ? 0 : n, false), x: alloc.f64(l === 0 ? 0 : n, false), r: alloc.f64(onCoarsest ? 0 : n, false),
      rc: alloc.f64(0), dx: alloc.f64(0),
    });
    if (onCoarsest) { alloc.free(diag); break; }

    if (l === 0 && given) {
      // The caller's coarse space: its prolongator as given (copied where the kernels read it), and the system
      // options of its unknowns for the aggregation below.
      const nc = given.P.nCols;
      if (nc === 0 || nc > STALLED_COARSENING * n) {
        throw new RungsInputError(`amg: firstCoarseSpace has ${nc} coarse unknowns for ${n} fine ones; a coarse space needs between 1 and ${Math.floor(STALLED_COARSENING * n)}`, WHERE);
      }
      alloc.free(diag);
      P = copyCsr(given.P, alloc);
      const coarseSystem = systemOptions(nc, given);
      nodes = coarseSystem?.nodes;
      nearNull = coarseSystem?.nearNullSpace;
    } else if (nodes && nearNull) {
      const agg = nodeAggregates(current, nodes, theta0 * Math.pow(0.5, l), l === 0, alloc);
      const tent = agg.count > 0 ? tentativeProlongator(nodes, agg, nearNull, alloc) : null;
      alloc.free(agg.aggregateOf);
      const nc = tent ? tent.P.nCols : 0;
      if (!tent || nc === 0 || nc > STALLED_COARSENING * n) {
        notes.push(`coarsening stalled on level ${l} (${n} → ${nc} coarse unknowns)`);
        if (tent) freeTentative(tent, alloc);
        alloc.free(levels[l].r);
        levels[l].r = alloc.f64(0);
        alloc.free(diag);
        break;
      }
      P = smoothTentative(current, tent.P, diag, symmetric, alloc);
      alloc.free(diag);
      alloc.free(tent.P.rowPtr); alloc.free(tent.P.colIdx); alloc.free(tent.P.values);
      // The finest level's nodes and near-null space are the caller's (or on the heap); coarser ones are ours.
      if (ownNodes) { freeNodes(nodes, alloc); for (const v of nearNull) alloc.free(v); }
      nodes = tent.nodes;
      nearNull = tent.B;
      ownNodes = true;
    } else {
      const graph = strengthGraph(current, diag, theta0 * Math.pow(0.5, l), alloc);
      const agg = aggregate(current, graph, diag, l === 0, alloc);
      alloc.free(diag);
      const freeGraph = (): void => {
        alloc.free(graph.strong); alloc.free(graph.rowKind); alloc.free(graph.filteredDiag); alloc.free(agg.aggregateOf);
      };
      if (agg.count === 0 || agg.count > STALLED_COARSENING * n) {
        notes.push(`coarsening stalled on level ${l} (${n} → ${agg.count} aggregates)`);
        alloc.free(levels[l].r);
        levels[l].r = alloc.f64(0);
        freeGraph();
        break;
      }
      // Gershgorin is close to ρ(D⁻¹A) on a diagonally dominant finest level (discretised diffusion as an M-matrix:
      // ρ → 2 as h → 0 for the five-point stencil; common practice, no source); elsewhere a Lanczos estimate.
      const lanczos = symmetric && (l > 0 || !graph.diagonallyDominant) ? LANCZOS_STEPS : 0;
      P = smoothedProlongator(current, graph, agg, lanczos, alloc);
      freeGraph();
    }
    // Pᵀ for the Galerkin product; its memory then goes to the next level, unless the restriction from a level that
    // may be seam-ordered runs in parts on the team (AmgLevel.R: 31 MB at 1M P1 unknowns, held through the solve).
    if (seamOrder && levels[l].sweeps === 1) levels[l].seams = seamLayout(current);
    const R = transpose(P, alloc);
    current = galerkinProduct(current, P, R, symmetric, alloc);
    keptR = teamSweeps && levels[l].seams ? R : null;
    if (!keptR) { alloc.free(R.rowPtr); alloc.free(R.colIdx); alloc.free(R.values); }
  }
  if (nodes && nearNull && ownNodes) { freeNodes(nodes, alloc); for (const v of nearNull) alloc.free(v); }
  // A second visit of the coarsest level would add nothing to its exact solve.
  for (let l = FIRST_W_LEVEL; wCycle && l + 2 < levels.length; l++) {
    levels[l].coarseVisits = 2;
    const m = levels[l + 1].A.nRows;
    alloc.free(levels[l + 1].rc); alloc.free(levels[l + 1].dx);
    levels[l + 1].rc = alloc.f64(m, false);
    levels[l + 1].dx = alloc.f64(m, false);
  }
  const coarse = buildCoarseSolver(levels[levels.length - 1].A, symmetric, notes);
  const built: AmgHierarchy = { operator: A, exactProducts, levels, coarse, symmetric };
  // Built in the arena: add the caller's vectors there. Spilled out of it (the estimate was short): copy the whole
  // hierarchy into an arena of the exact size. No arena at all: the JavaScript cycle.
  const packed = arena && spill && !spill.spilled() && arena.fits(arenaVectorBytes(A.nRows))
    ? { hierarchy: built, arena, ...arenaVectors(arena, A.nRows), ...operatorCopyFor(arena, A, symmetric && !exactProducts && opts.operatorCopy !== false) }
    : (opts.kernels ?? 'wasm') === 'wasm' ? packHierarchy(built) : null;
  if (spill?.spilled()) notes.push('the arena reserved for the setup was too small; the hierarchy was copied into a larger one');
  if (!packed && opts.kernels !== 'javascript') notes.push('no WebAssembly arena could hold the hierarchy; the cycle runs in JavaScript');
  const hierarchy = packed ? packed.hierarchy : built;
  // Complexities against the finest operator the cycle works with (the caller's matrix without negligible entries).
  const nnz0 = levels[0].A.rowPtr[A.nRows];
  let nnzSum = 0, rowSum = 0;
  for (const L of levels) { nnzSum += L.A.rowPtr[L.A.nRows]; rowSum += L.A.nRows; }
  const coarsest = levels[levels.length - 1].A.nRows;
  return {
    hierarchy,
    preconditioner: packed ? wasmCyclePreconditioner(packed, opts.team, opts.keepMemory ?? true) : vCyclePreconditioner(hierarchy),
    stats: {
      levels: levels.length,
      operatorComplexity: nnzSum / nnz0,
      gridComplexity: rowSum / A.nRows,
      setupSeconds: (performance.now() - t0) / 1000,
      kernels: packed ? 'wasm' : 'javascript',
      arenaBytes: packed ? packed.arena.touchedBytes() : 0,
      perLevel: levels.map((L) => ({ rows: L.A.nRows, nnz: L.A.rowPtr[L.A.nRows] })),
      ...(nearNull ? { nearNullSpace: nearNull.length } : {}),
      coarseSolver: coarse.kind === 'gauss-seidel' ? `gauss-seidel sweeps (n = ${coarsest})` : `${coarse.kind} (n = ${coarsest})`,
      notes,
    },
  };
}

function checkFirstCoarseSpace(A: Csr, P: Csr): void {
  if (P.nRows !== A.nRows) {
    throw new RungsInputError(`amg: firstCoarseSpace.P has ${P.nRows} rows; it must have one per unknown of the matrix (${A.nRows})`, WHERE);
  }
  const nnz = P.rowPtr[P.nRows];
  for (let k = 0; k < nnz; k++) {
    const j = P.colIdx[k];
    if (!(j >= 0 && j < P.nCols) || !Number.isFinite(P.values[k])) {
      throw new RungsInputError(`amg: firstCoarseSpace.P entry ${k} (column ${j}, value ${P.values[k]}) must have a column in [0, ${P.nCols}) and a finite value`, WHERE);
    }
  }
}

const copyCsr = (M: Csr, alloc: Allocator): Csr => {
  const nnz = M.rowPtr[M.nRows];
  const rowPtr = alloc.i32(M.nRows + 1, false), colIdx = alloc.i32(Math.max(1, nnz), false), values = alloc.f64(Math.max(1, nnz), false);
  rowPtr.set(M.rowPtr.subarray(0, M.nRows + 1)); colIdx.set(M.colIdx.subarray(0, nnz)); values.set(M.values.subarray(0, nnz));
  return { nRows: M.nRows, nCols: M.nCols, rowPtr, colIdx: alloc.shrink(colIdx, nnz), values: alloc.shrink(values, nnz) };
};

function freeTentative(t: ReturnType<typeof tentativeProlongator>, alloc: Allocator): void {
  alloc.free(t.P.rowPtr); alloc.free(t.P.colIdx); alloc.free(t.P.values);
  freeNodes(t.nodes, alloc);
  for (const v of t.B) alloc.free(v);
}
