import type { Csr } from '../../linalg/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { facetClosureDofs } from '../dofmap/dofmap.ts';
import { ruleFor } from '../quadrature/index.ts';
import { makeCellValues, type CellValues } from '../geometry/cellvalues.ts';
import { locateFacets } from '../geometry/facets.ts';
import { facetsWithTags } from '../../mesh/tags.ts';
import { RungsInputError } from '../../errors.ts';
import type { BoundarySpec, FormCoefficients, QuadratureDegrees, Term } from './types.ts';
import { quadratureDegrees } from './degrees.ts';
import { buildSparsity } from './sparsity.ts';
import { cellLoop } from './cell-loop.ts';
import { scatterCell } from './general-cells.ts';
import { allCells } from './cell-set.ts';
import { ASSEMBLY_PART_CELLS, cellParts, completionWords, runPart } from './cell-parts.ts';
import { deferredBuffer } from './deferred.ts';
import { assembleTaskInput, cellLoopTaskInput, teamCanAssemble, type CellLoopTaskInput, type LoadTaskInput } from './system-team.ts';
import { cellTeam, taskUrl } from '../team/team.ts';
import { sharedFloat64, TEAM_MIN_CELLS } from '../team/shared.ts';

const ASSEMBLE_TASK = taskUrl(import.meta.url, 'assemble-task');
const LOAD_TASK = taskUrl(import.meta.url, 'load-task');
import { makeFacetValues, reinitFacet } from './facetvalues.ts';
import { makeFacetGeometry, reinitFacetGeometry } from '../geometry/facet-geometry.ts';
import { checkFinite } from './check-finite.ts';

export interface AssembledSystem {
  space: FunctionSpace;
  /** Matrix on the free (non-Dirichlet) dofs; Dirichlet dofs are eliminated symmetrically. */
  A: Csr;
  b: Float64Array;
  /** reduced[g] = row of global dof g in A, or −1 for a Dirichlet dof. */
  reduced: Int32Array;
  /** Full-length vector holding the Dirichlet values at Dirichlet dofs (0 elsewhere). */
  dirichletValues: Float64Array;
  dirichletDofs: Int32Array;
  /** True when the form is symmetric (no convection term). */
  symmetric: boolean;
  degrees: Record<Term, number>;
  /** With AssembleOptions.loadAhead: b is being assembled on a worker thread; this completes it (waits for the
   *  worker, or assembles b here if no worker did) and must be called before b is read. Absent: b is complete. */
  settleLoad?: () => void;
}

export interface AssembleOptions {
  quadrature?: QuadratureDegrees;
  /** Reuse a pattern built for the same space and Dirichlet set. */
  pattern?: Csr;
  /** The reference cell loop (general-cells.ts) instead of the fast paths for triangles and tetrahedra (tests). */
  reference?: boolean;
  /** Cells per part of an assembly shared with the cell team (default ASSEMBLY_PART_CELLS; tests use small parts). */
  partCells?: number;
  /** On a mesh large enough for the cell team (two parts of partCells), a source f, and Dirichlet
   *  conditions only: the load vector is assembled by a worker of the team in a pass of its own while this thread
   *  assembles the matrix and goes on (to the solver's setup, which needs no b); the result's settleLoad completes b. The same bits as one pass: each of
   *  A and b receives the same additions in the same order. */
  loadAhead?: boolean;
}

/** Assembles A U = b for −∇·(k∇u) + b·∇u + c·u = f with the given boundary conditions, straight into CSR.
 *  Dirichlet data are interpolated at boundary dofs and eliminated from rows and columns (the reduced system keeps
 *  symmetry and definiteness; common practice, e.g. Brenner & Scott 2008 §5.5 implementation remarks). */
export function assembleSystem(space: FunctionSpace, coef: FormCoefficients, bc: BoundarySpec, opts: AssembleOptions = {}): AssembledSystem {
  const { mesh, element: el, cellDofs, nDofs } = space;
  const n = el.nDofs;
  const degrees = quadratureDegrees(mesh.cellKind, el.degree, coef, opts.quadrature);
  const dim = mesh.dim;

  // Dirichlet dofs and values. On a mesh the cell team may work on, these and the unknowns' rows live in shared
  // memory from the start: the team's jobs take them as they are instead of keeping copies beside them (12.6 MB at
  // 1M unknowns, through the multigrid setup that follows).
  const large = mesh.nCells >= TEAM_MIN_CELLS;
  const dirichletValues = large ? sharedFloat64(nDofs) : new Float64Array(nDofs);
  let dirichletDofs: Int32Array = new Int32Array(0);
  if (bc.dirichlet && bc.dirichlet.tags.length) {
    const facets = facetsWithTags(mesh, bc.dirichlet.tags);
    dirichletDofs = boundaryDofs(space, facets);
    const g = bc.dirichlet.value;
    const X = space.dofCoords;
    for (const d of dirichletDofs) {
      const v = g(X[d * dim], dim > 1 ? X[d * dim + 1] : 0, dim > 2 ? X[d * dim + 2] : 0);
      if (!Number.isFinite(v)) throw new RungsInputError(`Dirichlet value is ${v} at dof ${d}`);
      dirichletValues[d] = v;
    }
  }
  const reduced = large ? new Int32Array(new SharedArrayBuffer(4 * nDofs)) : new Int32Array(nDofs);
  for (const d of dirichletDofs) reduced[d] = -1;
  let nRed = 0;
  for (let g = 0; g < nDofs; g++) if (reduced[g] === 0) reduced[g] = nRed++;
  // The load vector ahead on a worker (AssembleOptions.loadAhead): its own pass, started before the matrix's.
  const boundaryTerms = (bc.neumann?.tags.length ?? 0) + (bc.robin?.tags.length ?? 0) > 0;
  // From the size at which the team shares the cells (smaller levels would only pay for starting its workers).
  const ahead = opts.loadAhead === true && mesh.nCells >= 2 * (opts.partCells ?? ASSEMBLY_PART_CELLS) && coef.f !== undefined && !boundaryTerms &&
    teamCanAssemble(space, coef) && cellTeam().workers > 0;
  if (ahead) return assembleWithLoadAhead(space, coef, degrees, reduced, nRed, dirichletValues, dirichletDofs, opts);
  // The cell team takes part when the mesh has two parts or more and a worker can rebuild the cell loop; the
  // system's arrays then live in shared memory (a given pattern only when it already does).
  const teamWanted = mesh.nCells >= 2 * (opts.partCells ?? ASSEMBLY_PART_CELLS) && teamCanAssemble(space, coef) &&
    (opts.pattern === undefined || opts.pattern.values.buffer instanceof SharedArrayBuffer);
  const team = teamWanted && cellTeam().workers > 0 ? cellTeam() : null;
  const A = opts.pattern ?? buildSparsity(space, reduced, nRed, team ? 'shared' : 'private');
  if (opts.pattern) A.values.fill(0);
  const b = team ? sharedFloat64(nRed) : new Float64Array(nRed);

  const Ke = new Float64Array(n * n);
  const Fe = new Float64Array(n);
  const rows = new Int32Array(n);
  const cols = new Int32Array(n);
  // The serial scatter: every row is this pass's own (no owner, nothing deferred).
  const scatter = (c: number): void => scatterCell(c, n, cellDofs, reduced, dirichletValues, Ke, Fe, rows, cols, A, b, null, 0, null);


  const rules = termRules(degrees, coef);
  const { cvK, cvB, cvC, cvF } = termCellValues(space, rules);

  // The cells: on large meshes shared with the cell team's worker threads, part by part, each part writing the rows it
  // owns and replaying its additions to earlier parts' rows once those are complete (cell-parts.ts, runPart); else in
  // one pass. The same bits either way (test/fem/assemble/shared-assembly.test.ts).
  const loopInput = { mesh, cellDofs, n, cvK, cvB, cvC, cvF, coef, A, b, reduced, dirichletValues };
  if (team) {
    const parts = cellParts(mesh.nCells, n, cellDofs, nDofs, opts.partCells);
    const done = completionWords(parts.parts);
    const input = assembleTaskInput(space, coef, rules, A, b, reduced, dirichletValues, parts, done, opts.reference ?? false);
    const loop = cellLoop(loopInput, opts.reference);
    try {
      const d = deferredBuffer();
      team.run(ASSEMBLE_TASK, input, parts.parts, (p) => runPart(loop, parts, done, p, d, A.values, b));
    } catch {
      // A cell that fails (a coefficient that is not finite, an inverted cell): assembled again in one pass, which
      // throws for the first such cell in cell order, as an assembly without the team does.
      A.values.fill(0); b.fill(0);
      cellLoop(loopInput, opts.reference)(allCells(mesh.nCells));
      throw new Error('internal: a shared assembly failed where a serial one did not');
    }
  } else cellLoop(loopInput, opts.reference)(allCells(mesh.nCells));

  // Neumann and Robin facets.
  const boundaryParts: { tags: string[]; g: (x: number, y: number, z: number, nx: number, ny: number, nz: number) => number; alpha?: (x: number, y: number, z: number) => number }[] = [];
  if (bc.neumann && bc.neumann.tags.length) boundaryParts.push({ tags: bc.neumann.tags, g: bc.neumann.flux });
  if (bc.robin && bc.robin.tags.length) boundaryParts.push({ tags: bc.robin.tags, g: bc.robin.g, alpha: bc.robin.alpha });
  if (boundaryParts.length) {
    // Straight facets (simplices, quadrilaterals): one normal per facet, the same bits as always. The faces of a
    // hexahedron are bilinear surfaces: a normal and surface element per point (src/fem/geometry/facet-geometry.ts).
    const curved = mesh.cellKind === 'hexahedron';
    const fvals = curved ? null : makeFacetValues(el, degrees.boundary);
    const fgeo = curved ? makeFacetGeometry(el, degrees.boundary) : null;
    const fc = locateFacets(mesh);
    for (const part of boundaryParts) {
      const facets = facetsWithTags(mesh, part.tags);
      for (const f of facets) {
        const c = fc.cell[f], lf = fc.local[f];
        if (fgeo) reinitFacetGeometry(fgeo, mesh, c, lf); else reinitFacet(fvals!, mesh, c, lf);
        Ke.fill(0); Fe.fill(0);
        const vals = fgeo ? fgeo.values[lf] : fvals!.values[lf];
        const x = fgeo ? fgeo.x : fvals!.x, wds = fgeo ? fgeo.wds : fvals!.wds;
        const nq = fgeo ? fgeo.nq : fvals!.nq;
        const normal = fvals?.normal;
        for (let q = 0; q < nq; q++) {
          const X = x[3 * q], Y = x[3 * q + 1], Z = x[3 * q + 2];
          const gq = normal ? part.g(X, Y, Z, normal[0], normal[1], normal[2]) : part.g(X, Y, Z, fgeo!.normals[3 * q], fgeo!.normals[3 * q + 1], fgeo!.normals[3 * q + 2]);
          checkFinite(gq, 'boundary flux g', c, x, q);
          const w = wds[q];
          for (let i = 0; i < n; i++) Fe[i] += w * gq * vals[q * n + i];
          if (part.alpha) {
            const aq = part.alpha(X, Y, Z);
            checkFinite(aq, 'Robin coefficient α', c, x, q);
            for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) Ke[i * n + j] += w * aq * vals[q * n + i] * vals[q * n + j];
          }
        }
        scatter(c);
      }
    }
  }
  return { space, A, b, reduced, dirichletValues, dirichletDofs, symmetric: !coef.b, degrees };
}

/** Each term's rule degree (at least 0), null for a term whose coefficient is absent (the stiffness is always there). */
function termRules(degrees: Record<Term, number>, coef: FormCoefficients): CellLoopTaskInput['rules'] {
  const rule = (t: Term, on: boolean) => (on ? Math.max(0, degrees[t]) : null);
  return { stiffness: Math.max(0, degrees.stiffness), convection: rule('convection', !!coef.b), reaction: rule('reaction', !!coef.c), load: rule('load', !!coef.f) };
}

/** The element's values at each present term's rule (null for an absent term), for the cell loops. */
function termCellValues(space: FunctionSpace, rules: CellLoopTaskInput['rules']): { cvK: CellValues; cvB: CellValues | null; cvC: CellValues | null; cvF: CellValues | null } {
  const cv = (d: number | null): CellValues | null => (d === null ? null : makeCellValues(space.element, ruleFor(space.mesh.cellKind, d)));
  return { cvK: cv(rules.stiffness)!, cvB: cv(rules.convection), cvC: cv(rules.reaction), cvF: cv(rules.load) };
}

/**
 * assembleSystem's matrix and load vector by separate passes over the cells (loadAhead): a worker of the cell team
 * assembles b (every cell's load, and the matrix columns of Dirichlet unknowns folded into it) while this thread
 * assembles A without evaluating the source, then returns; settleLoad completes b. On the P1 ladder's 1024² level the
 * source's evaluation at the load rule's 6 points per triangle is half the cost of the cells, and the solver's setup
 * that follows needs A only. A cell that fails in either pass: the whole system is assembled again in one pass, which
 * throws for the first such cell in cell order, as one pass does.
 */
function assembleWithLoadAhead(
  space: FunctionSpace, coef: FormCoefficients, degrees: Record<Term, number>, reduced: Int32Array, nRed: number,
  dirichletValues: Float64Array, dirichletDofs: Int32Array, opts: AssembleOptions,
): AssembledSystem {
  const { mesh, element: el, cellDofs } = space;
  const reference = opts.reference ?? false;
  const A = opts.pattern ?? buildSparsity(space, reduced, nRed, 'private');
  if (opts.pattern) A.values.fill(0);
  const b = sharedFloat64(nRed);
  const rules = termRules(degrees, coef);
  const loopInput = { mesh, cellDofs, n: el.nDofs, ...termCellValues(space, rules), coef, A, b, reduced, dirichletValues };
  const input: LoadTaskInput = { ...cellLoopTaskInput(space, coef, rules, reduced, dirichletValues, reference), b_: b };
  const job = cellTeam().background(LOAD_TASK, input);
  const onePass = (): never => {
    A.values.fill(0); b.fill(0);
    cellLoop(loopInput, reference)(allCells(mesh.nCells));
    throw new Error('internal: separate passes of an assembly failed where one pass did not');
  };
  try {
    cellLoop({ ...loopInput, cvF: null, coef: { ...coef, f: undefined }, b: null }, reference)(allCells(mesh.nCells));
  } catch {
    job.settle(); // nothing writes b once this returns
    onePass();
  }
  let settled = false;
  const settleLoad = (): void => {
    if (settled) return;
    settled = true;
    if (job.settle()) return;
    // No worker assembled b (none free, or the pass failed there): here, from zero.
    b.fill(0);
    try { cellLoop({ ...loopInput, A: null }, reference)(allCells(mesh.nCells)); } catch { onePass(); }
  };
  return { space, A, b, reduced, dirichletValues, dirichletDofs, symmetric: !coef.b, degrees, settleLoad };
}

/** The dofs on the closure of the given boundary facets, sorted and unique. Spaces whose dofs are the mesh vertices
 *  (P1, Q1: in 3D always, in 1D and 2D when the space numbers its dofs as the mesh its vertices): the vertices of the
 *  facets, read from the mesh's facet list, the set facetClosureDofs gives without locating every facet's cell (which
 *  builds a vertex → cells adjacency: 0.6–0.9 s on 6M tetrahedra, 50–90 ms on the 2M triangles of 1024² squares). */
function boundaryDofs(space: FunctionSpace, facets: Int32Array): Int32Array {
  const { mesh, element: el, nDofs } = space;
  const vertexDofs = el.degree === 1 && nDofs === mesh.nVertices && el.nDofs === mesh.verticesPerCell &&
    (mesh.dim === 3 || space.cellDofs === mesh.cells);
  if (!vertexDofs) {
    const fc = locateFacets(mesh);
    return facetClosureDofs(space, fc.cell, fc.local, facets);
  }
  const mark = new Uint8Array(mesh.nVertices);
  const vpf = mesh.verticesPerFacet;
  for (let i = 0; i < facets.length; i++) for (let a = 0; a < vpf; a++) mark[mesh.facets[facets[i] * vpf + a]] = 1;
  let count = 0;
  for (let v = 0; v < mark.length; v++) count += mark[v];
  const out = new Int32Array(count);
  for (let v = 0, k = 0; v < mark.length; v++) if (mark[v]) out[k++] = v;
  return out;
}

/** Full coefficient vector from the reduced solution and the Dirichlet values. */
export function expandSolution(sys: AssembledSystem, x: Float64Array): Float64Array {
  // In shared memory when the Dirichlet values are (a large mesh): the error integration's team takes it as it is.
  const shared = sys.dirichletValues.buffer instanceof SharedArrayBuffer;
  const u = shared ? sharedFloat64(sys.dirichletValues.length) : sys.dirichletValues.slice();
  if (shared) u.set(sys.dirichletValues);
  const red = sys.reduced;
  for (let g = 0; g < u.length; g++) if (red[g] >= 0) u[g] = x[red[g]];
  return u;
}
