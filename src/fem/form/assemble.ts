import type { Csr } from '../../linalg/types.ts';
import { facetsWithTags } from '../../mesh/tags.ts';
import { RungsInputError } from '../../errors.ts';
import { ruleFor } from '../quadrature/index.ts';
import { makeCellValues, reinitCell, type CellValues } from '../geometry/cellvalues.ts';
import { locateFacets } from '../geometry/facets.ts';
import { makeFacetGeometry, reinitFacetGeometry, type FacetGeometry } from '../geometry/facet-geometry.ts';
import type { LagrangeElement } from '../element/types.ts';
import { findEntry } from '../assemble/sparsity.ts';
import type { MixedSpace } from '../space/types.ts';
import type { Form } from './types.ts';
import { sparsityOfCells } from './sparsity.ts';

export interface AssembledForm {
  /** The whole matrix over every unknown of the space (no boundary condition applied: see constraints/). */
  A: Csr;
  b: Float64Array;
}

export interface AssembleFormOptions {
  /** A pattern from an earlier assembly on the same space, reused (values overwritten). */
  pattern?: Csr;
  /** Assemble only the vector (Newton residuals) or only the matrix. */
  matrix?: boolean;
  vector?: boolean;
}

/** The one generic assembly loop: for every cell, every term of the form is integrated with its own rule into one
 *  cell matrix and vector over all the cell's unknowns, which are then added into the global CSR once. Boundary
 *  conditions are a separate step (src/fem/constraints/dirichlet.ts), after assembly, as in the finite element
 *  codes that keep forming the linear system apart from assembly (e.g. MFEM's FormLinearSystem). */
export function assembleForm(space: MixedSpace, form: Form, opts: AssembleFormOptions = {}): AssembledForm {
  const { mesh, nLocal: L, cellDofs, nDofs } = space;
  const withMatrix = opts.matrix ?? true, withVector = opts.vector ?? true;
  const A = withMatrix ? (opts.pattern ?? sparsityOfCells(nDofs, mesh.nCells, L, cellDofs)) : (opts.pattern ?? emptyCsr(nDofs));
  if (withMatrix && opts.pattern) A.values.fill(0);
  const b = new Float64Array(nDofs);
  // One CellValues per (element, rule degree), shared by every term that asks for it.
  const values = new Map<string, CellValues>();
  const cvFor = (el: LagrangeElement, degree: number): CellValues => {
    const key = `${el.cell}:${el.degree}:${degree}`;
    let cv = values.get(key);
    if (!cv) { cv = makeCellValues(el, ruleFor(mesh.cellKind, Math.max(0, degree))); values.set(key, cv); }
    return cv;
  };
  const elementOf = (field: number): LagrangeElement => {
    const f = space.fields[field];
    if (!f) throw new Error(`internal: form term names field ${field}; the space has ${space.fields.length}`);
    return f.space.scalar.element;
  };
  const matrixTerms = withMatrix ? form.matrix.map((t) => ({ t, test: cvFor(elementOf(t.test), t.degree), trial: cvFor(elementOf(t.trial), t.degree) })) : [];
  const vectorTerms = withVector ? form.vector.map((t) => ({ t, test: cvFor(elementOf(t.test), t.degree) })) : [];
  const Ke = new Float64Array(L * L);
  const Fe = new Float64Array(L);
  // Each CellValues is refilled once per cell, whichever terms share it: the cell it was last filled for.
  const filledFor = new Map<CellValues, number>();
  const refill = (cv: CellValues, c: number): void => {
    if (filledFor.get(cv) !== c) { reinitCell(cv, mesh, c); filledFor.set(cv, c); }
  };
  const { rowPtr, colIdx } = A;
  const rowEnd = (r: number): number => rowPtr[r + 1];
  const scatter = (c: number, withK: boolean, withF: boolean): void => {
    const o = c * L;
    for (let i = 0; i < L; i++) {
      const r = cellDofs[o + i];
      if (withF) b[r] += Fe[i];
      if (!withK) continue;
      // Consecutive unknowns of a cell (the components of a node) are usually consecutive entries of the row: the
      // entry after the previous column's is checked before searching the row.
      let prevCol = -2, prevAt = -1;
      for (let j = 0; j < L; j++) {
        const v = Ke[i * L + j];
        if (v === 0) continue;
        const col = cellDofs[o + j];
        const at = col === prevCol + 1 && prevAt + 1 < rowEnd(r) && colIdx[prevAt + 1] === col ? prevAt + 1 : findEntry(A, r, col);
        A.values[at] += v;
        prevCol = col; prevAt = at;
      }
    }
  };
  for (let c = 0; c < mesh.nCells; c++) {
    if (withMatrix) Ke.fill(0);
    if (withVector) Fe.fill(0);
    for (const { t, test, trial } of matrixTerms) {
      refill(test, c); refill(trial, c);
      t.add(c, test, trial, Ke, L, space.fields[t.test].localOffset, space.fields[t.trial].localOffset);
    }
    for (const { t, test } of vectorTerms) {
      refill(test, c);
      t.add(c, test, Fe, space.fields[t.test].localOffset);
    }
    scatter(c, withMatrix, withVector);
  }
  assembleFacets(space, form, withMatrix, withVector, Ke, Fe, scatter);
  return { A, b };
}

function assembleFacets(
  space: MixedSpace, form: Form, withMatrix: boolean, withVector: boolean, Ke: Float64Array, Fe: Float64Array,
  scatter: (c: number, withK: boolean, withF: boolean) => void,
): void {
  const { mesh, nLocal: L } = space;
  const vectorTerms = withVector ? form.facetVector ?? [] : [];
  const matrixTerms = withMatrix ? form.facetMatrix ?? [] : [];
  if (vectorTerms.length === 0 && matrixTerms.length === 0) return;
  const fc = locateFacets(mesh);
  const fvCache = new Map<string, FacetGeometry>();
  const fvFor = (field: number, degree: number): FacetGeometry => {
    const el = space.fields[field].space.scalar.element;
    const key = `${el.cell}:${el.degree}:${degree}`;
    let fv = fvCache.get(key);
    if (!fv) { fv = makeFacetGeometry(el, degree); fvCache.set(key, fv); }
    return fv;
  };
  for (const t of vectorTerms) {
    const fv = fvFor(t.test, t.degree);
    for (const f of facetsWithTags(mesh, t.tags)) {
      const c = fc.cell[f], lf = fc.local[f];
      reinitFacetGeometry(fv, mesh, c, lf);
      Fe.fill(0);
      t.add(c, lf, fv, Fe, space.fields[t.test].localOffset);
      scatter(c, false, true);
    }
  }
  for (const t of matrixTerms) {
    if (space.fields[t.test].space.scalar.element !== space.fields[t.trial].space.scalar.element) {
      throw new RungsInputError(`facet term '${t.name}' couples fields with different elements; only same-element facet terms are supported`);
    }
    const fv = fvFor(t.test, t.degree);
    for (const f of facetsWithTags(mesh, t.tags)) {
      const c = fc.cell[f], lf = fc.local[f];
      reinitFacetGeometry(fv, mesh, c, lf);
      Ke.fill(0);
      t.add(c, lf, fv, Ke, L, space.fields[t.test].localOffset, space.fields[t.trial].localOffset);
      scatter(c, true, false);
    }
  }
}

function emptyCsr(n: number): Csr {
  return { nRows: n, nCols: n, rowPtr: new Int32Array(n + 1), colIdx: new Int32Array(0), values: new Float64Array(0) };
}
