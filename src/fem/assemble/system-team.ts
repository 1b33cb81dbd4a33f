import type { Csr } from '../../linalg/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { lagrangeElement } from '../element/lagrange.ts';
import { functionText, rebuild, shared } from '../team/shared.ts';
import { meshOf, sharedMesh, type SharedMesh } from '../team/mesh.ts';
import { ruleFor } from '../quadrature/index.ts';
import { makeCellValues } from '../geometry/cellvalues.ts';
import { cellLoop } from './cell-loop.ts';
import type { CellLoop } from './cell-set.ts';
import type { CellParts } from './cell-parts.ts';
import type { FormCoefficients } from './types.ts';

/** What a worker of the cell team rebuilds the scalar assembly's cell loop from (workerCellLoop): the mesh, the
 *  element's degree, each term's rule degree (null: no such term), the coefficients as text and the Dirichlet data. */
export interface CellLoopTaskInput {
  mesh: SharedMesh;
  degree: number;
  cellDofs: Int32Array;
  rules: { stiffness: number; convection: number | null; reaction: number | null; load: number | null };
  k: string | null;
  b: string | null;
  c: string | null;
  f: string | null;
  reduced: Int32Array;
  dirichletValues: Float64Array;
  reference: boolean;
}

/** The assembly's task in parts (assemble-task.ts): the loop's data, the system's arrays in shared memory and the
 *  parts. */
export interface AssembleTaskInput extends CellLoopTaskInput {
  nRows: number;
  rowPtr: Int32Array;
  colIdx: Int32Array;
  values: Float64Array;
  b_: Float64Array;
  parts: CellParts;
  /** The parts' completion words (cell-parts.ts, runPart). */
  done: Int32Array;
}

/** The load vector's own pass (load-task.ts): the loop's data and the vector, in shared memory. */
export interface LoadTaskInput extends CellLoopTaskInput {
  b_: Float64Array;
}

/** The cell loop a worker rebuilds from a task's input, writing into A and b (either may be null: not written). */
export function workerCellLoop(p: CellLoopTaskInput, A: Csr | null, b: Float64Array | null): CellLoop {
  const mesh = meshOf(p.mesh);
  const el = lagrangeElement(mesh.cellKind, p.degree);
  const cv = (d: number | null) => (d === null ? null : makeCellValues(el, ruleFor(mesh.cellKind, d)));
  const coef: FormCoefficients = {
    k: p.k ? rebuild(p.k) : undefined, b: p.b ? rebuild(p.b) : undefined,
    c: p.c ? rebuild(p.c) : undefined, f: p.f ? rebuild(p.f) : undefined,
  };
  return cellLoop({
    mesh, cellDofs: p.cellDofs, n: el.nDofs, cvK: cv(p.rules.stiffness)!, cvB: cv(p.rules.convection), cvC: cv(p.rules.reaction), cvF: cv(p.rules.load),
    coef, A, b, reduced: p.reduced, dirichletValues: p.dirichletValues,
  }, p.reference);
}

/** Whether a worker can assemble what this thread assembles: the standard element of its cell and degree, and every
 *  coefficient present a compiled formula (functionText). */
export function teamCanAssemble(space: FunctionSpace, coef: FormCoefficients): boolean {
  try { if (lagrangeElement(space.mesh.cellKind, space.element.degree) !== space.element) return false; } catch { return false; }
  for (const f of [coef.k, coef.b, coef.c, coef.f]) if (f !== undefined && functionText(f) === null) return false;
  return true;
}

/** The loop's data of a task's input, from this thread's space, coefficients and Dirichlet data. */
export function cellLoopTaskInput(
  space: FunctionSpace, coef: FormCoefficients, rules: CellLoopTaskInput['rules'], reduced: Int32Array, dirichletValues: Float64Array, reference: boolean,
): CellLoopTaskInput {
  const text = (f: unknown) => (f === undefined ? null : functionText(f));
  return {
    mesh: sharedMesh(space.mesh), degree: space.element.degree, cellDofs: shared(space.cellDofs), rules,
    k: text(coef.k), b: text(coef.b), c: text(coef.c), f: text(coef.f),
    reduced: shared(reduced), dirichletValues: shared(dirichletValues), reference,
  };
}

export function assembleTaskInput(
  space: FunctionSpace, coef: FormCoefficients, rules: AssembleTaskInput['rules'], A: Csr, b: Float64Array,
  reduced: Int32Array, dirichletValues: Float64Array, parts: CellParts, done: Int32Array, reference: boolean,
): AssembleTaskInput {
  return {
    ...cellLoopTaskInput(space, coef, rules, reduced, dirichletValues, reference),
    nRows: A.nRows, rowPtr: A.rowPtr, colIdx: A.colIdx, values: A.values, b_: b, parts, done,
  };
}
