// The error integration's task for the workers of the cell team (src/fem/team/): rebuilds the fields, functions and
// rule from the input (error-task-input.ts) and integrates one part of the cells (error-cells.ts) into the shared sums.
import { ruleFor } from '../fem/quadrature/index.ts';
import { lagrangeElement } from '../fem/element/lagrange.ts';
import { lagrangeField } from '../fem/field/lagrange-field.ts';
import { meshOf } from '../fem/team/mesh.ts';
import { rebuild } from '../fem/team/shared.ts';
import type { ScalarFn } from '../fem/assemble/types.ts';
import { ERROR_PART_CELLS, errorCells, type ValueAndGradient } from './error-cells.ts';
import type { ErrorTaskInput } from './error-task-input.ts';

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as ErrorTaskInput;
  const mesh = meshOf(p.mesh);
  const fields = p.fields.map((f) => lagrangeField({
    mesh, element: lagrangeElement(mesh.cellKind, f.degree), nDofs: f.nDofs, cellDofs: f.cellDofs, dofCoords: new Float64Array(0), nEdges: 0,
  }, f.coeffs));
  let uAndG: ValueAndGradient;
  if (p.valueAndGrad) uAndG = rebuild<ValueAndGradient>(p.valueAndGrad);
  else {
    const u = rebuild<ScalarFn>(p.u!), grad = rebuild<(x: number, y: number, z: number, out: Float64Array) => void>(p.grad!);
    // As errorNormsOf builds it from u and grad.
    uAndG = (X, Y, Z, out) => { grad(X, Y, Z, out); return u(X, Y, Z); };
  }
  const cells = errorCells({
    mesh, fields, uAndG, k: p.k ? rebuild<ScalarFn>(p.k) : undefined, c: p.c ? rebuild<ScalarFn>(p.c) : undefined,
    rule: ruleFor(mesh.cellKind, p.degree), stride: p.stride, start: p.start, perCellL2: p.perCellL2, perCellH1: p.perCellH1,
  });
  const nf = fields.length;
  return (part) => cells(part * ERROR_PART_CELLS, Math.min(mesh.nCells, (part + 1) * ERROR_PART_CELLS), p.sums, part * 3 * nf);
}
