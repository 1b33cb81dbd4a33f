// A hand-written P1 discretization on triangles, the kind a user writes from scratch: −∇·(k∇u) + c·u = f with
// Dirichlet data eliminated at boundary vertices and Neumann data integrated along boundary edges. Every switch in
// HandP1Options off gives the textbook Galerkin method (Brenner & Scott 2008, ch. 0 and 5); each switch is one
// mistake or one benign variant that the corpus studies under test/corpus/ turn on.
// Built only on rungs's exported building blocks (ruleFor, lagrangeSpace, lagrangeField, solveSystem).
import { lagrangeField, lagrangeSpace, ruleFor, solveSystem, type LevelContext, type LevelSolution } from 'rungs';

export interface HandP1Options {
  /** Flaw: map reference gradients with J⁻¹ instead of J⁻ᵀ (the inverse Jacobian transposed). */
  transposeJacobian?: boolean;
  /** Flaw: Dirichlet vertices for which this returns true stay unknowns (not eliminated, no natural data). */
  freeVertex?: (x: number, y: number) => boolean;
  /** Reaction term c·u: 'consistent' (quadrature, the default) or 'lumped' (row-sum / vertex rule). */
  reaction?: 'consistent' | 'lumped';
  /** Load: 'quadrature' (∫ f φ_i by a rule of degree loadDegree, the default) or 'interpolated' (the P1
   *  interpolant of f integrated exactly against φ_i: the mass matrix times the nodal values of f). */
  load?: 'quadrature' | 'interpolated';
  /** Quadrature degree of the load and the reaction (default 4). */
  loadDegree?: number;
  /** Dirichlet data imposed by a boundary penalty α ∫ (u − g) v ds, α = penalty / h², instead of elimination. */
  penalty?: number;
  /** Solver settings that override the level's (method, preconditioner, relTol). */
  solver?: { method?: 'cg' | 'direct' | 'auto'; preconditioner?: 'none' | 'jacobi' | 'ic0' | 'amg' | 'auto'; relTol?: number };
}

/** Gauss–Legendre on [0, 1], 3 points (degree 5): textbook values (Abramowitz & Stegun 1964, 25.4.30). */
const G3 = [0.5 - Math.sqrt(0.15), 0.5, 0.5 + Math.sqrt(0.15)];
const W3 = [5 / 18, 8 / 18, 5 / 18];
/** P1 reference gradients of 1 − ξ − η, ξ, η. */
const REF_GRAD = [-1, -1, 1, 0, 0, 1];

export function handP1(level: LevelContext, opts: HandP1Options = {}): LevelSolution {
  const { mesh, coefficients: coef, boundary } = level;
  if (mesh.cellKind !== 'triangle') throw new Error('handP1: triangles only');
  const nv = mesh.nVertices;
  const X = mesh.coords;
  const cells = mesh.cells;

  // Boundary vertices by kind: Dirichlet vertices (closure of Dirichlet edges), Neumann edges.
  const dirTags = new Set(boundary.dirichlet?.tags ?? []);
  const neuTags = new Set(boundary.neumann?.tags ?? []);
  const isDirichlet = new Uint8Array(nv);
  const dirEdges: number[] = [];
  const neuEdges: number[] = [];
  for (let f = 0; f < mesh.nFacets; f++) {
    const tag = mesh.tagNames[mesh.facetTags[f]];
    if (dirTags.has(tag)) { dirEdges.push(f); isDirichlet[mesh.facets[2 * f]] = 1; isDirichlet[mesh.facets[2 * f + 1]] = 1; }
    else if (neuTags.has(tag)) neuEdges.push(f);
  }
  const g = boundary.dirichlet?.value;
  const fixed = new Uint8Array(nv);
  const u = new Float64Array(nv);
  if (opts.penalty === undefined) {
    for (let v = 0; v < nv; v++) {
      if (!isDirichlet[v]) continue;
      if (opts.freeVertex?.(X[2 * v], X[2 * v + 1])) continue; // the flaw: left free
      fixed[v] = 1;
      u[v] = g!(X[2 * v], X[2 * v + 1], 0);
    }
  }
  const row = new Int32Array(nv).fill(-1);
  let nFree = 0;
  for (let v = 0; v < nv; v++) if (!fixed[v]) row[v] = nFree++;

  // Triplets, summed into CSR below.
  const ti: number[] = [], tj: number[] = [], tv: number[] = [];
  const b = new Float64Array(nFree);
  const add = (a: number, c: number, val: number): void => {
    const r = row[a];
    if (r < 0) return;
    const s = row[c];
    if (s < 0) b[r] -= val * u[c];
    else { ti.push(r); tj.push(s); tv.push(val); }
  };
  const rhs = (a: number, val: number): void => { if (row[a] >= 0) b[row[a]] += val; };

  const rule = ruleFor('triangle', opts.loadDegree ?? 4);
  const stiffRule = ruleFor('triangle', 2);
  const grads = new Float64Array(6);
  const Ke = new Float64Array(9);
  const Fe = new Float64Array(3);
  const vs = [0, 0, 0];
  for (let c = 0; c < mesh.nCells; c++) {
    for (let i = 0; i < 3; i++) vs[i] = cells[3 * c + i];
    const x0 = X[2 * vs[0]], y0 = X[2 * vs[0] + 1];
    // J[d][r] = ∂x_d/∂ξ_r; invJ[r][d] = ∂ξ_r/∂x_d.
    const j00 = X[2 * vs[1]] - x0, j01 = X[2 * vs[2]] - x0;
    const j10 = X[2 * vs[1] + 1] - y0, j11 = X[2 * vs[2] + 1] - y0;
    const det = j00 * j11 - j01 * j10;
    const inv = [j11 / det, -j01 / det, -j10 / det, j00 / det]; // row-major invJ[r][d]
    for (let i = 0; i < 3; i++) {
      const g0 = REF_GRAD[2 * i], g1 = REF_GRAD[2 * i + 1];
      if (opts.transposeJacobian) {
        // The flaw: ∂φ/∂x_d = Σ_r invJ[d][r] ∂φ/∂ξ_r (indices swapped).
        grads[2 * i] = inv[0] * g0 + inv[1] * g1;
        grads[2 * i + 1] = inv[2] * g0 + inv[3] * g1;
      } else {
        grads[2 * i] = inv[0] * g0 + inv[2] * g1;
        grads[2 * i + 1] = inv[1] * g0 + inv[3] * g1;
      }
    }
    Ke.fill(0); Fe.fill(0);
    const at = (xi: number, eta: number): [number, number] => [x0 + j00 * xi + j01 * eta, y0 + j10 * xi + j11 * eta];
    // Stiffness: k integrated by a degree-2 rule times constant gradients.
    let kbar = 0;
    for (let q = 0; q < stiffRule.nPoints; q++) {
      const [x, y] = at(stiffRule.points[2 * q], stiffRule.points[2 * q + 1]);
      kbar += stiffRule.weights[q] * det * (coef.k ? coef.k(x, y, 0) : 1);
    }
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) Ke[3 * i + j] += kbar * (grads[2 * i] * grads[2 * j] + grads[2 * i + 1] * grads[2 * j + 1]);
    // Reaction and load by quadrature.
    for (let q = 0; q < rule.nPoints; q++) {
      const xi = rule.points[2 * q], eta = rule.points[2 * q + 1];
      const phi = [1 - xi - eta, xi, eta];
      const [x, y] = at(xi, eta);
      const w = rule.weights[q] * det;
      if (coef.c && opts.reaction !== 'lumped') {
        const cq = coef.c(x, y, 0) * w;
        for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) Ke[3 * i + j] += cq * phi[i] * phi[j];
      }
      if (coef.f && opts.load !== 'interpolated') {
        const fq = coef.f(x, y, 0) * w;
        for (let i = 0; i < 3; i++) Fe[i] += fq * phi[i];
      }
    }
    const area = det / 2;
    if (coef.c && opts.reaction === 'lumped') {
      // Vertex rule: ∫ c φ_i φ_j ≈ (area/3) c(x_i) δ_ij.
      for (let i = 0; i < 3; i++) Ke[4 * i] += (area / 3) * coef.c(X[2 * vs[i]], X[2 * vs[i] + 1], 0);
    }
    if (coef.f && opts.load === 'interpolated') {
      // Exact ∫ (I_h f) φ_i with the P1 mass matrix (area/12)·[2 1 1; 1 2 1; 1 1 2].
      const fv = vs.map((v) => coef.f!(X[2 * v], X[2 * v + 1], 0));
      for (let i = 0; i < 3; i++) Fe[i] += (area / 12) * (fv[0] + fv[1] + fv[2] + fv[i]);
    }
    for (let i = 0; i < 3; i++) {
      rhs(vs[i], Fe[i]);
      for (let j = 0; j < 3; j++) add(vs[i], vs[j], Ke[3 * i + j]);
    }
  }

  // Boundary edges: Neumann data, or the Dirichlet penalty.
  const centre = [0.5 * (coordRange(mesh, 0)[0] + coordRange(mesh, 0)[1]), 0.5 * (coordRange(mesh, 1)[0] + coordRange(mesh, 1)[1])];
  const edgeTerms = (f: number, alpha: number, data: (x: number, y: number, nx: number, ny: number) => number): void => {
    const a = mesh.facets[2 * f], e = mesh.facets[2 * f + 1];
    const ax = X[2 * a], ay = X[2 * a + 1], ex = X[2 * e] - ax, ey = X[2 * e + 1] - ay;
    const len = Math.hypot(ex, ey);
    // Outward normal: on a rectangle (convex) the one pointing away from the centre of the bounding box.
    let nx = ey / len, ny = -ex / len;
    const mx = ax + ex / 2 - centre[0], my = ay + ey / 2 - centre[1];
    if (nx * mx + ny * my < 0) { nx = -nx; ny = -ny; }
    for (let q = 0; q < 3; q++) {
      const t = G3[q], w = W3[q] * len;
      const phi = [1 - t, t];
      const val = data(ax + t * ex, ay + t * ey, nx, ny);
      rhs(a, w * val * phi[0]); rhs(e, w * val * phi[1]);
      if (alpha > 0) {
        const ends = [a, e];
        for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) add(ends[i], ends[j], w * alpha * phi[i] * phi[j]);
      }
    }
  };
  const flux = boundary.neumann?.flux;
  for (const f of neuEdges) edgeTerms(f, 0, (x, y, nx, ny) => flux!(x, y, 0, nx, ny, 0));
  if (opts.penalty !== undefined) {
    const alpha = opts.penalty / (mesh.h * mesh.h);
    for (const f of dirEdges) edgeTerms(f, alpha, (x, y) => alpha * g!(x, y, 0));
  }

  const A = toCsr(nFree, ti, tj, tv);
  const { x, stats } = solveSystem(A, b, { ...level.solver, ...opts.solver, symmetric: true });
  for (let v = 0; v < nv; v++) if (row[v] >= 0) u[v] = x[row[v]];
  return { field: lagrangeField(lagrangeSpace(mesh, 1), u), solver: stats };
}

function coordRange(mesh: LevelContext['mesh'], d: number): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (let v = 0; v < mesh.nVertices; v++) { lo = Math.min(lo, mesh.coords[2 * v + d]); hi = Math.max(hi, mesh.coords[2 * v + d]); }
  return [lo, hi];
}

/** Sums triplets into CSR with sorted column indices. */
function toCsr(n: number, ti: number[], tj: number[], tv: number[]) {
  const order = ti.map((_, k) => k).sort((p, q) => ti[p] - ti[q] || tj[p] - tj[q]);
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [], vals: number[] = [];
  let lastR = -1, lastC = -1;
  for (const k of order) {
    if (ti[k] === lastR && tj[k] === lastC) { vals[vals.length - 1] += tv[k]; continue; }
    lastR = ti[k]; lastC = tj[k];
    cols.push(tj[k]); vals.push(tv[k]); rowPtr[ti[k] + 1]++;
  }
  for (let r = 0; r < n; r++) rowPtr[r + 1] += rowPtr[r];
  return { nRows: n, nCols: n, rowPtr, colIdx: Int32Array.from(cols), values: Float64Array.from(vals) };
}
