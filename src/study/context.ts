import type { Mesh } from '../mesh/types.ts';
import type { ManufacturedSolution } from '../exact/types.ts';
import type { BoundarySpec, FormCoefficients } from '../fem/assemble/types.ts';
import type { SolveSystemOptions } from '../linalg/index.ts';

/** What a discretization receives for one level: the mesh, the PDE data derived from the exact solution,
 *  the boundary conditions by tag and the solver settings the runner chose. */
export interface LevelContext {
  study: string;
  index: number;
  n: number;
  mesh: Mesh;
  exact: ManufacturedSolution;
  coefficients: FormCoefficients;
  boundary: BoundarySpec;
  solver: Omit<SolveSystemOptions, 'symmetric'>;
}
