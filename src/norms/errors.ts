import { ruleFor } from '../fem/quadrature/index.ts';
import type { ScalarFn } from '../fem/assemble/types.ts';
import type { DiscreteField, ErrorOptions, ExactSolution, NormValues, PerCellErrors } from './types.ts';
import { RungsInputError } from '../errors.ts';
import type { CellKind } from '../mesh/types.ts';
import { cellTeam, taskUrl } from '../fem/team/team.ts';
import { sharedFloat64 } from '../fem/team/shared.ts';
import { ERROR_PART_CELLS, errorCells } from './error-cells.ts';
import { errorTaskInput } from './error-task-input.ts';

const ERROR_TASK = taskUrl(import.meta.url, 'error-task');

/**
 * Extra degrees of the error quadrature above 2k, the degree of |u_h|². The accuracy policy: the rule's own error in
 * a squared norm must stay far below what moves a fitted order. With a rule exact to degree d = 2k + 2 on a cell of
 * size h, the error of ∫|e|² is O(h^{d+2}) against ∫|e|² ~ h^{2k+2}, so its relative error falls as h² (and as h⁴
 * for ∫|∇e|², ~h^{2k}): Taylor expansion of e² about the rule (Strang & Fix 1973, §4.3, quadrature of degree d errs
 * by h^{d+1} times the (d+1)-th derivatives, here O(h) since all but one factor of e² are of order k+1 or more).
 * An order fitted over levels h and h/2 moves by (ε(h) − ε(h/2)) / (2 ln 2) for a relative error ε in the squared
 * norm: measured against a rule of degree 2k + 14 (test/norms/error-rule-policy.test.ts) ε stays below 2e-3 (L2) and
 * 1e-4 (H1 seminorm) from 4 cells per half-wavelength of u on, so orders move by less than 2e-3. Degree 2k + 2
 * evaluates u and ∇u at half the points of 2k + 4 for P1 triangles (6 against 12) and P2 tetrahedra (24 against 125).
 * Intervals, triangles and tetrahedra (affine maps) take it; quadrilaterals and hexahedra keep ERROR_RULE_EXTRA_MAPPED.
 */
export const ERROR_RULE_EXTRA = 2;

/** Extra degrees on quadrilaterals and hexahedra: their bilinear and trilinear maps make det J and u_h ∘ F polynomials
 *  of higher degree in the reference coordinates (even a polynomial u is then integrated exactly only by a rule of
 *  higher degree), so they keep the former 2k + 4 (common practice, no source). */
export const ERROR_RULE_EXTRA_MAPPED = 4;

/** The default quadrature degree of the error integrals for fields of largest degree k on cells of this kind. */
export function errorRuleDegree(cellKind: CellKind, k: number): number {
  return 2 * k + (cellKind === 'quadrilateral' || cellKind === 'hexahedron' ? ERROR_RULE_EXTRA_MAPPED : ERROR_RULE_EXTRA);
}

export type { ErrorOptions, PerCellErrors } from './types.ts';

/** Arrays for the errors per cell of a mesh, in shared memory: the cell team's workers write into them directly, so
 *  no second copy of 2 × 8 bytes per cell is made (fresh memory costs 1–3 ms per MB here; at 2M cells the copy
 *  made error densities 1.13× the cost of the errors alone, measured with error-densities.bench.ts). */
export function perCellArrays(nCells: number): PerCellErrors {
  return { L2: sharedFloat64(nCells), H1semi: sharedFloat64(nCells) };
}

/** Checks a perCell request against the mesh and the stride: both arrays nCells long, and no cell sampling (an
 *  estimate over every stride-th cell leaves most cells without a value, so the two are refused together). */
export function checkPerCell(perCell: PerCellErrors | undefined, nCells: number, stride: number, where: string): void {
  if (perCell === undefined) return;
  if (stride > 1) {
    throw new RungsInputError(`${where}: opts.perCell cannot be combined with cellStride = ${stride} (an estimate over every ${stride}th cell ` +
      'leaves the other cells without a value); leave cellStride at 1 for error densities', `${where}.perCell`);
  }
  for (const key of ['L2', 'H1semi'] as const) {
    const a = perCell[key] as unknown;
    if (!(a instanceof Float64Array) || a.length !== nCells) {
      const got = a instanceof Float64Array ? `a Float64Array of length ${a.length}` : 'no Float64Array';
      throw new RungsInputError(`${where}: opts.perCell.${key} must be a Float64Array of length nCells = ${nCells}, got ${got}`, `${where}.perCell.${key}`);
    }
  }
}

/** L2, H1 seminorm, H1, energy and largest nodal error of u − u_h, integrated cell by cell. */
export function errorNorms(field: DiscreteField, exact: ExactSolution, opts: ErrorOptions = {}): NormValues {
  return errorNormsOf([field], exact, opts)[0];
}

/** The norms of u − f for several fields on the same mesh in one pass, so u, ∇u and the coefficients are
 *  evaluated once per quadrature point (the discrete solution and the interpolant share the work). With
 *  opts.perCell, fields[0]'s squared L2 and H1 seminorm per cell are written there too (two more additions per
 *  point into locals, one store per cell; no allocation per cell or point: DEVELOPERS.md, "Hot loops").
 *  The cells are integrated in parts of ERROR_PART_CELLS (error-cells.ts), shared with the worker threads of the
 *  cell team (src/fem/team/) when the level is large and its fields and functions can be rebuilt there; the parts'
 *  sums are added in part order, so the totals are the same bits on any number of threads. */
export function errorNormsOf(fields: DiscreteField[], exact: ExactSolution, opts: ErrorOptions = {}): NormValues[] {
  const mesh = fields[0].mesh;
  const dim = mesh.dim;
  const k = Math.max(...fields.map((f) => f.degree ?? 2));
  const degree = opts.degree ?? errorRuleDegree(mesh.cellKind, k);
  const rule = ruleFor(mesh.cellKind, degree);
  const nf = fields.length;
  const ux = exact.u, gx = exact.grad;
  const uAndG = exact.valueAndGrad ?? ((X: number, Y: number, Z: number, out: Float64Array): number => { gx(X, Y, Z, out); return ux(X, Y, Z); });
  const stride = Math.max(1, Math.floor(opts.cellStride ?? 1));
  checkPerCell(opts.perCell, mesh.nCells, stride, 'errorNorms');
  // With a stride, start mid-stride so that boundary rows and columns of structured meshes are not favoured.
  const start = stride > 1 ? stride >> 1 : 0;
  const parts = Math.max(1, Math.ceil(mesh.nCells / ERROR_PART_CELLS));
  const sums = new Float64Array(parts * 3 * nf);
  const team = parts >= 2 ? cellTeam() : null;
  const input = team && team.workers > 0 ? errorTaskInput(fields, exact, opts, degree, stride, start, parts, opts.perCell) : null;
  let perCellL2 = opts.perCell?.L2 ?? null, perCellH1 = opts.perCell?.H1semi ?? null;
  if (input) {
    // The workers write their sums and per-cell values into shared memory; the main thread copies them out after.
    const cells = errorCells({ mesh, fields, uAndG, k: opts.k, c: opts.c, rule, stride, start, perCellL2: input.perCellL2, perCellH1: input.perCellH1 });
    team!.run(ERROR_TASK, input, parts, (p) => cells(p * ERROR_PART_CELLS, Math.min(mesh.nCells, (p + 1) * ERROR_PART_CELLS), input.sums, p * 3 * nf));
    sums.set(input.sums);
    if (perCellL2 && perCellL2 !== input.perCellL2) { perCellL2.set(input.perCellL2!); perCellH1!.set(input.perCellH1!); }
  } else {
    const cells = errorCells({ mesh, fields, uAndG, k: opts.k, c: opts.c, rule, stride, start, perCellL2, perCellH1 });
    for (let p = 0; p < parts; p++) cells(p * ERROR_PART_CELLS, Math.min(mesh.nCells, (p + 1) * ERROR_PART_CELLS), sums, p * 3 * nf);
  }
  perCellL2 = perCellH1 = null;
  const l2 = new Float64Array(nf), h1 = new Float64Array(nf), en = new Float64Array(nf);
  for (let p = 0; p < parts; p++) {
    for (let f = 0; f < nf; f++) { const o = (p * nf + f) * 3; l2[f] += sums[o]; h1[f] += sums[o + 1]; en[f] += sums[o + 2]; }
  }
  if (stride > 1) {
    const sampled = Math.ceil((mesh.nCells - start) / stride);
    const scale = mesh.nCells / Math.max(1, sampled);
    for (let f = 0; f < nf; f++) { l2[f] *= scale; h1[f] *= scale; en[f] *= scale; }
  }
  return fields.map((field, f) => ({
    L2: Math.sqrt(l2[f]), H1semi: Math.sqrt(h1[f]), H1: Math.sqrt(l2[f] + h1[f]), energy: Math.sqrt(Math.max(en[f], 0)),
    maxNodal: maxNodalError(field, exact, dim),
  }));
}

function maxNodalError(field: DiscreteField, exact: ExactSolution, dim: number): number {
  if (!field.nodes) return NaN;
  let m = 0;
  const { coords, values } = field.nodes;
  for (let i = 0; i < values.length; i++) {
    const e = Math.abs(exact.u(coords[i * dim], dim > 1 ? coords[i * dim + 1] : 0, dim > 2 ? coords[i * dim + 2] : 0) - values[i]);
    if (e > m) m = e;
  }
  return m;
}

/** The same norms of u itself (the error of the zero field): the scale that round-off is judged against. */
export function exactNorms(mesh: DiscreteField['mesh'], exact: ExactSolution, opts: ErrorOptions & { degree: number }): NormValues {
  const zero: DiscreteField = {
    mesh, nDofs: 0, degree: 0,
    evaluate(_c, _p, n, v, gr) { v.fill(0, 0, n); gr.fill(0); },
  };
  return errorNorms(zero, exact, opts);
}
