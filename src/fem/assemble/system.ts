import type { Csr } from '../../linalg/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { facetClosureDofs } from '../dofmap/dofmap.ts';
import { ruleFor } from '../quadrature/index.ts';
import { makeCellValues, reinitCell, type CellValues } from '../geometry/cellvalues.ts';
import { locateFacets } from '../geometry/facets.ts';
import { facetsWithTags } from '../../mesh/tags.ts';
import { RungsInputError } from '../../errors.ts';
import type { BoundarySpec, FormCoefficients, QuadratureDegrees, Term } from './types.ts';
import { quadratureDegrees } from './degrees.ts';
import { buildSparsity, findEntry } from './sparsity.ts';
import { makeFacetValues, reinitFacet } from './facetvalues.ts';
import { makeFacetGeometry, reinitFacetGeometry } from '../geometry/facet-geometry.ts';
import { checkFinite } from './check-finite.ts';
import { assembleTetrahedronCells } from './tetrahedra.ts';

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
}

export interface AssembleOptions {
  quadrature?: QuadratureDegrees;
  /** Reuse a pattern built for the same space and Dirichlet set. */
  pattern?: Csr;
}

const vecB = new Float64Array(3);

/** Assembles A U = b for −∇·(k∇u) + b·∇u + c·u = f with the given boundary conditions, straight into CSR.
 *  Dirichlet data are interpolated at boundary dofs and eliminated from rows and columns (the reduced system keeps
 *  symmetry and definiteness; common practice, e.g. Brenner & Scott 2008 §5.5 implementation remarks). */
export function assembleSystem(space: FunctionSpace, coef: FormCoefficients, bc: BoundarySpec, opts: AssembleOptions = {}): AssembledSystem {
  const { mesh, element: el, cellDofs, nDofs } = space;
  const n = el.nDofs;
  const degrees = quadratureDegrees(mesh.cellKind, el.degree, coef, opts.quadrature);
  const dim = mesh.dim;

  // Dirichlet dofs and values.
  const dirichletValues = new Float64Array(nDofs);
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
  const reduced = new Int32Array(nDofs);
  for (const d of dirichletDofs) reduced[d] = -1;
  let nRed = 0;
  for (let g = 0; g < nDofs; g++) if (reduced[g] === 0) reduced[g] = nRed++;
  const A = opts.pattern ?? buildSparsity(space, reduced, nRed);
  if (opts.pattern) A.values.fill(0);
  const b = new Float64Array(nRed);

  const Ke = new Float64Array(n * n);
  const Fe = new Float64Array(n);
  const rows = new Int32Array(n);
  const cols = new Int32Array(n);
  const scatter = (c: number): void => {
    for (let i = 0; i < n; i++) { const g = cellDofs[c * n + i]; rows[i] = reduced[g]; cols[i] = g; }
    for (let i = 0; i < n; i++) {
      const r = rows[i];
      if (r < 0) continue;
      b[r] += Fe[i];
      for (let j = 0; j < n; j++) {
        const v = Ke[i * n + j];
        if (v === 0) continue;
        const cr = rows[j];
        if (cr >= 0) A.values[findEntry(A, r, cr)] += v;
        else b[r] -= v * dirichletValues[cols[j]];
      }
    }
  };

  const cv = (t: Term): CellValues => makeCellValues(el, ruleFor(mesh.cellKind, Math.max(0, degrees[t])));
  const cvK = cv('stiffness');
  const cvB = coef.b ? cv('convection') : null;
  const cvC = coef.c ? cv('reaction') : null;
  const cvF = coef.f ? cv('load') : null;
  const kf = coef.k, bf = coef.b, cf = coef.c, ff = coef.f;

  // Tetrahedra: the same arithmetic with the Jacobian once per cell, loops unrolled (src/fem/assemble/tetrahedra.ts);
  // 1D, 2D and hexahedral meshes keep this loop.
  if (mesh.cellKind === 'tetrahedron') assembleTetrahedronCells({ mesh, cellDofs, n, cvK, cvB, cvC, cvF, coef, A, b, reduced, dirichletValues });
  else for (let c = 0; c < mesh.nCells; c++) {
    Ke.fill(0); Fe.fill(0);
    {
      reinitCell(cvK, mesh, c);
      const { nq, grads, wdet, x } = cvK;
      for (let q = 0; q < nq; q++) {
        let w = wdet[q];
        if (kf) { const kq = kf(x[3 * q], x[3 * q + 1], x[3 * q + 2]); checkFinite(kq, 'conductivity k', c, x, q); w *= kq; }
        const o = q * n * dim;
        for (let i = 0; i < n; i++) {
          for (let j = i; j < n; j++) {
            let s = 0;
            for (let d = 0; d < dim; d++) s += grads[o + i * dim + d] * grads[o + j * dim + d];
            Ke[i * n + j] += w * s;
          }
        }
      }
      for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) Ke[i * n + j] = Ke[j * n + i];
    }
    if (cvB && bf) {
      reinitCell(cvB, mesh, c);
      const { nq, grads, values, wdet, x } = cvB;
      for (let q = 0; q < nq; q++) {
        bf(x[3 * q], x[3 * q + 1], x[3 * q + 2], vecB);
        for (let d = 0; d < dim; d++) checkFinite(vecB[d], `convection b[${d}]`, c, x, q);
        const w = wdet[q];
        const o = q * n * dim;
        for (let j = 0; j < n; j++) {
          let bg = 0;
          for (let d = 0; d < dim; d++) bg += vecB[d] * grads[o + j * dim + d];
          bg *= w;
          for (let i = 0; i < n; i++) Ke[i * n + j] += values[q * n + i] * bg;
        }
      }
    }
    if (cvC && cf) {
      reinitCell(cvC, mesh, c, false);
      const { nq, values, wdet, x } = cvC;
      for (let q = 0; q < nq; q++) {
        const cq = cf(x[3 * q], x[3 * q + 1], x[3 * q + 2]);
        checkFinite(cq, 'reaction c', c, x, q);
        const w = wdet[q] * cq;
        for (let i = 0; i < n; i++) {
          const wi = w * values[q * n + i];
          for (let j = 0; j < n; j++) Ke[i * n + j] += wi * values[q * n + j];
        }
      }
    }
    if (cvF && ff) {
      reinitCell(cvF, mesh, c, false);
      const { nq, values, wdet, x } = cvF;
      for (let q = 0; q < nq; q++) {
        const fq = ff(x[3 * q], x[3 * q + 1], x[3 * q + 2]);
        checkFinite(fq, 'source f', c, x, q);
        const w = wdet[q] * fq;
        for (let i = 0; i < n; i++) Fe[i] += w * values[q * n + i];
      }
    }
    scatter(c);
  }

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

/** The dofs on the closure of the given boundary facets, sorted and unique. 3D spaces whose dofs are the mesh
 *  vertices (P1, Q1): the vertices of the facets, read from the mesh's facet list, the set facetClosureDofs gives
 *  without locating every facet's cell (which builds a vertex → cells adjacency: 0.6–0.9 s on 6M tetrahedra). */
function boundaryDofs(space: FunctionSpace, facets: Int32Array): Int32Array {
  const { mesh, element: el, nDofs } = space;
  if (!(mesh.dim === 3 && el.degree === 1 && nDofs === mesh.nVertices && el.nDofs === mesh.verticesPerCell)) {
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
  const u = sys.dirichletValues.slice();
  const red = sys.reduced;
  for (let g = 0; g < u.length; g++) if (red[g] >= 0) u[g] = x[red[g]];
  return u;
}
