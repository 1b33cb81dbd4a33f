/** Smoothed-aggregation algebraic multigrid setup (Vaněk, Mandel & Brezina 1996, Computing 56, 179–196):
 *  strength graph → aggregates → Jacobi-smoothed prolongator → Galerkin operator Pᵀ A P, level after level,
 *  until the operator is small enough for a dense factorisation. The solve phase is vCyclePreconditioner. */
import { RungsInputError } from '../../errors.ts';
import { isSymmetric, transpose } from '../csr.ts';
import type { Csr } from '../types.ts';
import { aggregate } from './aggregation.ts';
import { buildCoarseSolver } from './coarse-solver.ts';
import { galerkinProduct } from './galerkin.ts';
import { smoothedProlongator } from './prolongator.ts';
import { scanLevel } from './level-scan.ts';
import { strengthGraph } from './strength.ts';
import { withoutExactZeros, withoutRoundOff } from './negligible-entries.ts';
export const X: Record<string, number> = JSON.parse(process.env.AMG_X ?? '{}');
import type { AmgLevel, AmgOptions, AmgSetupResult } from './types.ts';
import { vCyclePreconditioner } from './vcycle.ts';

const WHERE = 'linalg/amg';
/** A level that keeps more than this fraction of its unknowns is not worth coarsening further. */
const STALLED_COARSENING = 0.8;
/** Lanczos steps for ρ(D⁻¹A) in the prolongator damping; a handful suffice for the 4/(3ρ) rule. */
let LANCZOS_STEPS = X.lsteps ?? 4;

export function amgSetup(A: Csr, opts: AmgOptions = {}): AmgSetupResult {
  const t0 = performance.now();
  const theta0 = opts.strengthThreshold ?? 0.08;
  const maxCoarse = opts.maxCoarseSize ?? 400;
  const maxLevels = opts.maxLevels ?? 25;
  const sweeps = opts.sweeps ?? 1;
  if (!(theta0 >= 0 && theta0 < 1)) throw new RungsInputError(`amg: strengthThreshold must lie in [0, 1), got ${theta0}`, WHERE);
  if (!(Number.isInteger(maxCoarse) && maxCoarse >= 1)) throw new RungsInputError(`amg: maxCoarseSize must be a positive integer, got ${maxCoarse}`, WHERE);
  if (!(Number.isInteger(maxLevels) && maxLevels >= 1)) throw new RungsInputError(`amg: maxLevels must be a positive integer, got ${maxLevels}`, WHERE);
  if (!(Number.isInteger(sweeps) && sweeps >= 1)) throw new RungsInputError(`amg: sweeps must be a positive integer, got ${sweeps}`, WHERE);
  if (A.nRows !== A.nCols) throw new RungsInputError(`amg: matrix is ${A.nRows}×${A.nCols}; a square matrix is needed`, WHERE);
  if (A.nRows === 0) throw new RungsInputError('amg: the matrix is empty', WHERE);
  const symmetric = opts.symmetric ?? isSymmetric(A);

  const notes: string[] = [];
  const levels: AmgLevel[] = [];
  let current = A;
  let P: Csr | null = null;
  let R: Csr | null = null;
  for (let l = 0; ; l++) {
    const n = current.nRows;
    if (l === 0 && !X.keepZeros) current = withoutExactZeros(current);
    const { diagPos, diag, invDiag } = scanLevel(current, l);
    const onCoarsest = n <= maxCoarse || levels.length >= maxLevels;
    levels.push({
      A: current, diagPos, invDiag, P, R, b: new Float64Array(l === 0 ? 0 : n), x: new Float64Array(l === 0 ? 0 : n),
      r: new Float64Array(onCoarsest ? 0 : n),
    });
    if (onCoarsest) break;
    if (l === 0 && !X.keepRoundOff) current = withoutRoundOff(current, diag);

    const graph = strengthGraph(current, diag, (X.theta ?? theta0) * Math.pow(X.thetaDecay ?? 0.5, l), !!X.signed);
    const agg = aggregate(current, graph.strong, X.weakJoin ? diag : undefined);
    if (X.dbg) { let u = 0; for (let i = 0; i < n; i++) if (agg.aggregateOf[i] < 0) u++; console.log('level', l, 'n', n, 'unaggregated', u, 'aggs', agg.count); }
    if (agg.count === 0 || agg.count > STALLED_COARSENING * n) {
      notes.push(`coarsening stalled on level ${l} (${n} → ${agg.count} aggregates)`);
      break;
    }
    // Gershgorin is close to ρ(D⁻¹A) on a diagonally dominant finest level (discretised diffusion as an M-matrix:
    // ρ → 2 as h → 0 for the five-point stencil; common practice, no source); elsewhere a Lanczos estimate.
    const lanczos = symmetric && (l > 0 || !graph.diagonallyDominant) ? LANCZOS_STEPS : 0;
    let pg = graph;
    if (X.noFilter) { const all = strengthGraph(current, diag, 0, false); pg = all; }
    P = smoothedProlongator(current, pg, agg, X.lanczosAll ? LANCZOS_STEPS : lanczos);
    R = transpose(P);
    current = galerkinProduct(current, P, R, symmetric);
  }
  const coarse = buildCoarseSolver(levels[levels.length - 1].A, symmetric, notes);
  const hierarchy = { operator: A, levels, coarse, sweeps, symmetric };
  const nnz0 = A.rowPtr[A.nRows];
  let nnzSum = 0, rowSum = 0;
  for (const L of levels) { nnzSum += L.A.rowPtr[L.A.nRows]; rowSum += L.A.nRows; }
  const coarsest = levels[levels.length - 1].A.nRows;
  return {
    hierarchy,
    preconditioner: vCyclePreconditioner(hierarchy),
    stats: {
      levels: levels.length,
      operatorComplexity: nnzSum / nnz0,
      gridComplexity: rowSum / A.nRows,
      setupSeconds: (performance.now() - t0) / 1000,
      perLevel: levels.map((L) => ({ rows: L.A.nRows, nnz: L.A.rowPtr[L.A.nRows] })),
      coarseSolver: coarse.kind === 'gauss-seidel' ? `gauss-seidel sweeps (n = ${coarsest})` : `${coarse.kind} (n = ${coarsest})`,
      notes,
    },
  };
}
