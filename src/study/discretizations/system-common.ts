import { RungsInputError } from '../../errors.ts';
import type { PointData } from '../../fem/form/terms/types.ts';
import type { StudyProblem } from '../problem.ts';

/** A one-component point function as a plain scalar function of position. */
export function scalarOf(f: PointData): (x: number, y: number, z: number) => number {
  const out = new Float64Array(1);
  return (x, y, z) => { f(x, y, z, out); return out[0]; };
}

/** The requested norms out of everything measured. */
export function pickNorms(all: Record<string, number>, norms: readonly string[]): Record<string, number> {
  return Object.fromEntries(norms.map((nm) => [nm, all[nm]]));
}

/** rungs's own system solvers take Dirichlet and Neumann data; Robin parts go to an external code. */
export function refuseRobin(problem: StudyProblem, study: string, file: string): void {
  if (problem.parts.robin.length) {
    throw new RungsInputError(`${file} (study '${study}'): boundary.robin: rungs's own solver for ${problem.pde.label ?? 'this pde'} takes Dirichlet and Neumann parts only; use boundary.dirichlet / boundary.neumann, or an external code for Robin data`, file);
  }
}

/** The first component of a vector point function, as a scalar function. */
export function firstComponent(f: (x: number, y: number, z: number, out: Float64Array) => void, dim: number): (x: number, y: number, z: number) => number {
  const out = new Float64Array(dim);
  return (x, y, z) => { f(x, y, z, out); return out[0]!; };
}
