import type { DiscreteField, ErrorOptions, ExactSolution, PerCellErrors } from './types.ts';
import { lagrangeFieldData } from '../fem/field/lagrange-field.ts';
import { lagrangeElement } from '../fem/element/lagrange.ts';
import { functionText, sharedCopy, sharedFloat64 } from '../fem/team/shared.ts';
import { sharedCellDofs, sharedMesh, type SharedMesh } from '../fem/team/mesh.ts';

/** What a worker of the cell team rebuilds an error integration from (error-task.ts): the mesh, each field's
 *  element degree, unknowns per cell and coefficients, the functions as text, the rule's degree and the outputs. */
export interface ErrorTaskInput {
  mesh: SharedMesh;
  fields: { degree: number; nDofs: number; cellDofs: Int32Array; coeffs: Float64Array }[];
  /** u and ∇u in one function, or u and grad apart (texts of functionText). */
  valueAndGrad: string | null;
  u: string | null;
  grad: string | null;
  k: string | null;
  c: string | null;
  degree: number;
  stride: number;
  start: number;
  /** Parts × fields × 3 sums, and the per-cell sums of the first field (or null). */
  sums: Float64Array;
  perCellL2: Float64Array | null;
  perCellH1: Float64Array | null;
}

/** The input of the error task, or null when a worker could not compute the same numbers: a field that is not a
 *  standard Lagrange field of lagrangeField, fields on different meshes, or a function that is not a compiled formula
 *  (functionText). Then the main thread integrates every part itself. */
export function errorTaskInput(
  fields: DiscreteField[], exact: ExactSolution, opts: ErrorOptions, degree: number, stride: number, start: number, parts: number, perCell: PerCellErrors | undefined,
): ErrorTaskInput | null {
  const mesh = fields[0].mesh;
  const data = [];
  for (const f of fields) {
    const d = lagrangeFieldData(f);
    if (!d || f.mesh !== mesh || d.space.mesh !== mesh) return null;
    const el = d.space.element;
    try { if (lagrangeElement(mesh.cellKind, el.degree) !== el) return null; } catch { return null; }
    data.push({ degree: el.degree, nDofs: d.space.nDofs, cellDofs: sharedCellDofs(d.space), coeffs: sharedCopy(d.coeffs) });
  }
  const valueAndGrad = functionText(exact.valueAndGrad);
  const u = valueAndGrad ? null : functionText(exact.u), grad = valueAndGrad ? null : functionText(exact.grad);
  if (!valueAndGrad && !(u && grad)) return null;
  const k = opts.k ? functionText(opts.k) : null, c = opts.c ? functionText(opts.c) : null;
  if ((opts.k && !k) || (opts.c && !c)) return null;
  return {
    mesh: sharedMesh(mesh), fields: data, valueAndGrad, u, grad, k, c, degree, stride, start,
    sums: sharedFloat64(parts * 3 * fields.length),
    // The caller's arrays themselves when they live in shared memory (perCellArrays), else arrays copied out after.
    perCellL2: perCell ? (perCell.L2.buffer instanceof SharedArrayBuffer ? perCell.L2 : sharedFloat64(mesh.nCells)) : null,
    perCellH1: perCell ? (perCell.H1semi.buffer instanceof SharedArrayBuffer ? perCell.H1semi : sharedFloat64(mesh.nCells)) : null,
  };
}
