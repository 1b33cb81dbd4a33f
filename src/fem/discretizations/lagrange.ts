import { solverTeam } from '../team/team.ts';
import type { Mesh } from '../../mesh/types.ts';
import type { SolveStats } from '../../linalg/types.ts';
import { solveSystem, type SolveSystemOptions } from '../../linalg/index.ts';
import { lagrangeSpace } from '../dofmap/dofmap.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { assembleSystem, expandSolution, type AssembledSystem } from '../assemble/system.ts';
import type { BoundarySpec, FormCoefficients, QuadratureDegrees } from '../assemble/types.ts';
import { lagrangeField } from '../field/lagrange-field.ts';
import type { DiscreteField } from '../field/types.ts';

export interface LagrangeSolveInput {
  mesh: Mesh;
  degree: number;
  coefficients: FormCoefficients;
  boundary: BoundarySpec;
  quadrature?: QuadratureDegrees;
  solver?: Omit<SolveSystemOptions, 'symmetric'>;
  /** The space, when the caller built it already (same mesh and degree). */
  space?: FunctionSpace;
}

export interface LagrangeSolution {
  space: FunctionSpace;
  system: AssembledSystem;
  coefficients: Float64Array;
  field: DiscreteField;
  solver: SolveStats;
  seconds: { space: number; assemble: number; solve: number };
}

/** The reference discretization: continuous Lagrange elements of the given degree, Galerkin, Dirichlet data
 *  interpolated, Neumann/Robin data integrated. */
export function solveLagrange(input: LagrangeSolveInput): LagrangeSolution {
  const t0 = performance.now();
  const space = input.space ?? lagrangeSpace(input.mesh, input.degree);
  const t1 = performance.now();
  // Degree 1: the load vector is assembled on the cell team's worker while this thread assembles the matrix and sets
  // up the solver (assembleSystem, loadAhead), and completed just before the solve: there the source's evaluation is
  // about half the cost of the cells, and the team's cell parts gained little on the matrix (1024² P1 squares, 2
  // threads: 540–620 ms for the matrix alone against 580–860 ms for both in parts). From degree 2 the cells' matrices
  // are most of the work, and both threads share them in parts (P2 at 512²: no gain from the load ahead).
  const system = assembleSystem(space, input.coefficients, input.boundary, { quadrature: input.quadrature, loadAhead: space.element.degree === 1 });
  const t2 = performance.now();
  // The cell team sweeps the interiors of the multigrid's seam-ordered levels, which only large systems have.
  const team = solverTeam(system.A.nRows);
  // A form without convection is symmetric by construction (each entry and its transpose are the same products of the
  // same cell terms), so CG's O(nnz) symmetry check is skipped (80 ms over the P1 ladder).
  const rhs = (): Float64Array => { system.settleLoad?.(); return system.b; };
  const { x, stats } = solveSystem(system.A, rhs, {
    ...input.solver, symmetric: system.symmetric, symmetricByConstruction: system.symmetric, ...(team ? { team } : {}),
  });
  const t3 = performance.now();
  const coefficients = expandSolution(system, x);
  return {
    space, system, coefficients, field: lagrangeField(space, coefficients), solver: stats,
    seconds: { space: (t1 - t0) / 1e3, assemble: (t2 - t1) / 1e3, solve: (t3 - t2) / 1e3 },
  };
}
