import type { Csr } from '../../linalg/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { lagrangeElement } from '../element/lagrange.ts';
import { functionText, shared } from '../team/shared.ts';
import { sharedMesh, type SharedMesh } from '../team/mesh.ts';
import type { CellParts } from './cell-parts.ts';
import type { FormCoefficients } from './types.ts';

/** What a worker of the cell team rebuilds the scalar assembly's cell loop from (assemble-task.ts): the mesh, the
 *  element's degree, each term's rule degree (null: no such term), the coefficients as text, the system's arrays in
 *  shared memory and the parts. */
export interface AssembleTaskInput {
  mesh: SharedMesh;
  degree: number;
  cellDofs: Int32Array;
  rules: { stiffness: number; convection: number | null; reaction: number | null; load: number | null };
  k: string | null;
  b: string | null;
  c: string | null;
  f: string | null;
  nRows: number;
  rowPtr: Int32Array;
  colIdx: Int32Array;
  values: Float64Array;
  b_: Float64Array;
  reduced: Int32Array;
  dirichletValues: Float64Array;
  parts: CellParts;
  /** The parts' completion words (cell-parts.ts, runPart). */
  done: Int32Array;
  reference: boolean;
}

/** Whether a worker can assemble what this thread assembles: the standard element of its cell and degree, and every
 *  coefficient present a compiled formula (functionText). */
export function teamCanAssemble(space: FunctionSpace, coef: FormCoefficients): boolean {
  try { if (lagrangeElement(space.mesh.cellKind, space.element.degree) !== space.element) return false; } catch { return false; }
  for (const f of [coef.k, coef.b, coef.c, coef.f]) if (f !== undefined && functionText(f) === null) return false;
  return true;
}

export function assembleTaskInput(
  space: FunctionSpace, coef: FormCoefficients, rules: AssembleTaskInput['rules'], A: Csr, b: Float64Array,
  reduced: Int32Array, dirichletValues: Float64Array, parts: CellParts, done: Int32Array, reference: boolean,
): AssembleTaskInput {
  const text = (f: unknown) => (f === undefined ? null : functionText(f));
  return {
    mesh: sharedMesh(space.mesh), degree: space.element.degree, cellDofs: shared(space.cellDofs), rules,
    k: text(coef.k), b: text(coef.b), c: text(coef.c), f: text(coef.f),
    nRows: A.nRows, rowPtr: A.rowPtr, colIdx: A.colIdx, values: A.values, b_: b,
    reduced: shared(reduced), dirichletValues: shared(dirichletValues), parts, done, reference,
  };
}
