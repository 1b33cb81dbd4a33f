// The scalar assembly's task for the workers of the cell team (src/fem/team/): rebuilds the cell loop from the input
// (assembleTaskInput in system-team.ts) and assembles one part of the cells into the shared matrix and vector.
import { ruleFor } from '../quadrature/index.ts';
import { lagrangeElement } from '../element/lagrange.ts';
import { makeCellValues } from '../geometry/cellvalues.ts';
import { meshOf } from '../team/mesh.ts';
import { rebuild } from '../team/shared.ts';
import { cellLoop } from './cell-loop.ts';
import { runPart } from './cell-parts.ts';
import { deferredBuffer } from './deferred.ts';
import type { AssembleTaskInput } from './system-team.ts';
import type { FormCoefficients } from './types.ts';

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as AssembleTaskInput;
  const mesh = meshOf(p.mesh);
  const el = lagrangeElement(mesh.cellKind, p.degree);
  const cv = (d: number | null) => (d === null ? null : makeCellValues(el, ruleFor(mesh.cellKind, d)));
  const coef: FormCoefficients = {
    k: p.k ? rebuild(p.k) : undefined, b: p.b ? rebuild(p.b) : undefined,
    c: p.c ? rebuild(p.c) : undefined, f: p.f ? rebuild(p.f) : undefined,
  };
  const loop = cellLoop({
    mesh, cellDofs: p.cellDofs, n: el.nDofs, cvK: cv(p.rules.stiffness)!, cvB: cv(p.rules.convection), cvC: cv(p.rules.reaction), cvF: cv(p.rules.load),
    coef, A: { nRows: p.nRows, nCols: p.nRows, rowPtr: p.rowPtr, colIdx: p.colIdx, values: p.values }, b: p.b_, reduced: p.reduced, dirichletValues: p.dirichletValues,
  }, p.reference);
  const d = deferredBuffer();
  return (part) => runPart(loop, p.parts, p.done, part, d, p.values, p.b_);
}
