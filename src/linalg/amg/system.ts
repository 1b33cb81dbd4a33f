/** Smoothed aggregation for systems of PDEs (Vaněk, Mandel & Brezina 1996, Computing 56, 179–196, the part on
 *  systems and elasticity, from memory): the unknowns come in nodes (e.g. the dim displacement components of a mesh
 *  vertex), the strength graph and the aggregates are built on nodes, and the tentative prolongator carries a given
 *  near-null space B (for elasticity the rigid-body modes) instead of the constant:
 *  - node graph: ā_IJ = −‖A_IJ‖_F for I ≠ J and ā_II = ‖A_II‖_F, the Frobenius norms of the node blocks. The scalar
 *    strength test of strength.ts on Ā, −ā_IJ ≥ θ √(ā_II ā_JJ), is then the symmetric test on block norms
 *    (amalgamation by block norms: common practice, no source), and the aggregation of aggregation.ts runs on Ā
 *    unchanged;
 *  - tentative prolongator: per aggregate, the rows of B on its unknowns are factorised B_a = Q_a R_a by a thin QR
 *    (modified Gram–Schmidt, each column orthogonalised twice: "twice is enough", Giraud, Langou & Rozložník 2005,
 *    Comput. Math. Appl. 50, 1069–1075, from memory); Q_a fills the aggregate's columns of P̂ and R_a becomes the
 *    coarse near-null space, so P̂ B_c = B. A column that is (numerically) dependent on the earlier ones on that
 *    aggregate is dropped (e.g. a single 2D node cannot carry three modes): coarse nodes hold at most m unknowns;
 *  - smoothing: P = (I − ω D⁻¹ A) P̂ with the point diagonal D and ω = 4/(3ρ(D⁻¹A)), ρ by Lanczos (symmetric A)
 *    or Gershgorin. Unlike the scalar path, A is not filtered: lumping weak couplings into the diagonal keeps the
 *    constants in the kernel of A_F but not the rotations (the default of common implementations, no source).
 *  Every array comes from the setup's allocator, so the products run as WebAssembly kernels when it is an arena. */
import { RungsInputError } from '../../errors.ts';
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import { spgemm } from '../spgemm.ts';
import type { Csr } from '../types.ts';
import { aggregate, type Aggregation } from './aggregation.ts';
import { lanczosSpectralRadius } from './spectral-radius.ts';
import { strengthGraph } from './strength.ts';

const WHERE = 'linalg/amg';

/** A column of B on an aggregate whose part orthogonal to the earlier columns is below this fraction of its own
 *  norm is dropped there. Rotations on an aggregate of diameter h keep a fraction of about h/(diameter of the
 *  domain) after the translations are removed, so the cut leaves room for meshes far finer than 1e-6. */
export const DEPENDENT_COLUMN = 1e-10;

/** Which unknowns form a node: node I holds unknowns dofs[ptr[I] .. ptr[I+1]), nodeOf[u] is the node of unknown u. */
export interface NodeBlocks {
  count: number;
  ptr: Int32Array;
  dofs: Int32Array;
  nodeOf: Int32Array;
}

/** The validated system options of AmgOptions, or null for the scalar path. */
export interface SystemOptions {
  nodes: NodeBlocks;
  nearNullSpace: Float64Array[];
}

/** Nodes and near-null space from AmgOptions: null when none of blockSize > 1, nearNullSpace or nodeOf is given
 *  (the scalar path, unchanged). Throws RungsInputError naming the field on inconsistent input. */
export function systemOptions(
  n: number, opts: { blockSize?: number; nearNullSpace?: Float64Array[]; nodeOf?: Int32Array }, alloc: Allocator = heapAllocator,
): SystemOptions | null {
  const { blockSize, nearNullSpace, nodeOf } = opts;
  if (blockSize !== undefined && !(Number.isInteger(blockSize) && blockSize >= 1)) {
    throw new RungsInputError(`amg: blockSize must be a positive integer, got ${blockSize}`, WHERE);
  }
  if ((blockSize ?? 1) === 1 && nearNullSpace === undefined && nodeOf === undefined) return null;
  let nodes: NodeBlocks;
  if (nodeOf !== undefined) {
    if (!(nodeOf instanceof Int32Array) || nodeOf.length !== n) {
      throw new RungsInputError(`amg: nodeOf must be an Int32Array with one node index per unknown (${n}), got length ${nodeOf?.length}`, WHERE);
    }
    if (nearNullSpace === undefined) {
      throw new RungsInputError('amg: nodeOf needs nearNullSpace (with some components eliminated, the constant per component ' +
        'is not defined by the node alone); pass e.g. the rigid-body modes of reducedRigidBodyModes', WHERE);
    }
    nodes = nodesFromIndex(nodeOf, blockSize, alloc);
  } else {
    const b = blockSize ?? 1;
    if (n % b !== 0) {
      throw new RungsInputError(`amg: ${n} unknowns are not whole nodes of blockSize ${b}; with only some components of a node ` +
        'eliminated pass nodeOf (the node of each unknown)', WHERE);
    }
    nodes = uniformNodes(n, b, alloc);
  }
  let B = nearNullSpace;
  if (B === undefined) {
    // Default: the constant in each component (for blockSize 1: the constant vector).
    const b = blockSize ?? 1;
    B = Array.from({ length: b }, (_, c) => { const v = new Float64Array(n); for (let u = c; u < n; u += b) v[u] = 1; return v; });
  } else {
    if (!Array.isArray(B) || B.length === 0) throw new RungsInputError('amg: nearNullSpace must be a non-empty array of vectors', WHERE);
    B.forEach((v, j) => {
      if (!(v instanceof Float64Array) || v.length !== n) {
        throw new RungsInputError(`amg: nearNullSpace[${j}] must be a Float64Array of length ${n} (one entry per unknown), got length ${v?.length}`, WHERE);
      }
      for (let u = 0; u < n; u++) {
        if (!Number.isFinite(v[u])) throw new RungsInputError(`amg: nearNullSpace[${j}][${u}] is ${v[u]}; every entry must be finite`, WHERE);
      }
    });
  }
  return { nodes, nearNullSpace: B };
}

function uniformNodes(n: number, b: number, alloc: Allocator): NodeBlocks {
  const count = n / b;
  const ptr = alloc.i32(count + 1, false);
  for (let I = 0; I <= count; I++) ptr[I] = I * b;
  const dofs = alloc.i32(n, false);
  const nodeOf = alloc.i32(n, false);
  for (let u = 0; u < n; u++) { dofs[u] = u; nodeOf[u] = (u / b) | 0; }
  return { count, ptr, dofs, nodeOf };
}

/** Nodes from any non-negative node index per unknown (numbered compactly in order of first appearance). */
function nodesFromIndex(index: Int32Array, blockSize: number | undefined, alloc: Allocator): NodeBlocks {
  const n = index.length;
  let maxId = -1;
  for (let u = 0; u < n; u++) {
    if (!(index[u] >= 0)) throw new RungsInputError(`amg: nodeOf[${u}] is ${index[u]}; node indices must be non-negative`, WHERE);
    if (index[u] > maxId) maxId = index[u];
  }
  const compact = new Int32Array(maxId + 1).fill(-1);
  const nodeOf = alloc.i32(n, false);
  let count = 0;
  for (let u = 0; u < n; u++) {
    if (compact[index[u]] < 0) compact[index[u]] = count++;
    nodeOf[u] = compact[index[u]];
  }
  const ptr = alloc.i32(count + 1);
  for (let u = 0; u < n; u++) ptr[nodeOf[u] + 1]++;
  for (let I = 0; I < count; I++) {
    if (blockSize !== undefined && ptr[I + 1] > blockSize) {
      throw new RungsInputError(`amg: nodeOf gives node ${index[firstOf(nodeOf, I)]} ${ptr[I + 1]} unknowns, more than blockSize ${blockSize}`, WHERE);
    }
    ptr[I + 1] += ptr[I];
  }
  const fill = ptr.slice(0, count);
  const dofs = alloc.i32(n, false);
  for (let u = 0; u < n; u++) dofs[fill[nodeOf[u]]++] = u;
  return { count, ptr, dofs, nodeOf };
}

const firstOf = (nodeOf: Int32Array, I: number): number => { let u = 0; while (nodeOf[u] !== I) u++; return u; };

export function freeNodes(nodes: NodeBlocks, alloc: Allocator): void {
  alloc.free(nodes.ptr); alloc.free(nodes.dofs); alloc.free(nodes.nodeOf);
}

/** Ā (see the file comment) and its diagonal, in one pass over A into room for nnz(A) entries (the unused tail is
 *  given back; in an arena the untouched part costs address space only). */
export function nodeMatrix(A: Csr, nodes: NodeBlocks, alloc: Allocator = heapAllocator): { Abar: Csr; diag: Float64Array } {
  const { rowPtr, colIdx, values } = A;
  const { count: N, ptr, dofs, nodeOf } = nodes;
  const owner = alloc.i32(N, false).fill(-1);
  const slot = alloc.i32(N, false);
  const bPtr = alloc.i32(N + 1);
  const cap = Math.max(1, rowPtr[A.nRows]);
  const bCol = alloc.i32(cap, false);
  const bVal = alloc.f64(cap, false);
  const diag = alloc.f64(N);
  let next = 0;
  for (let I = 0; I < N; I++) {
    const start = next;
    for (let p = ptr[I]; p < ptr[I + 1]; p++) {
      const u = dofs[p];
      for (let k = rowPtr[u]; k < rowPtr[u + 1]; k++) {
        const J = nodeOf[colIdx[k]];
        const v = values[k];
        if (owner[J] !== I) { owner[J] = I; slot[J] = next; bCol[next] = J; bVal[next++] = v * v; }
        else bVal[slot[J]] += v * v;
      }
    }
    for (let q = start; q < next; q++) {
      const s = Math.sqrt(bVal[q]);
      if (bCol[q] === I) { bVal[q] = s; diag[I] = s; } else bVal[q] = -s;
    }
    bPtr[I + 1] = next;
  }
  alloc.free(owner); alloc.free(slot);
  return { Abar: { nRows: N, nCols: N, rowPtr: bPtr, colIdx: alloc.shrink(bCol, next), values: alloc.shrink(bVal, next) }, diag };
}

/** Aggregates of nodes: the strength graph of Ā with threshold θ, then the passes of aggregation.ts. */
export function nodeAggregates(
  A: Csr, nodes: NodeBlocks, theta: number, typicalRootsFirst: boolean, alloc: Allocator = heapAllocator,
): Aggregation {
  const { Abar, diag } = nodeMatrix(A, nodes, alloc);
  const graph = strengthGraph(Abar, diag, theta, alloc);
  const agg = aggregate(Abar, graph, diag, typicalRootsFirst, alloc);
  alloc.free(graph.strong); alloc.free(graph.rowKind); alloc.free(graph.filteredDiag);
  alloc.free(Abar.rowPtr); alloc.free(Abar.colIdx); alloc.free(Abar.values); alloc.free(diag);
  return agg;
}

export interface Tentative {
  /** P̂: n × nc, orthonormal columns, the columns of an aggregate contiguous. */
  P: Csr;
  /** The coarse near-null space (m vectors of length nc): P̂ B_c = B (up to dropped dependent columns). */
  B: Float64Array[];
  /** Coarse nodes: one per aggregate that kept a column, holding its columns. */
  nodes: NodeBlocks;
}

/** The tentative prolongator from the near-null space B, aggregate by aggregate (see the file comment). */
export function tentativeProlongator(
  nodes: NodeBlocks, agg: Aggregation, B: Float64Array[], alloc: Allocator = heapAllocator,
): Tentative {
  const n = nodes.nodeOf.length;
  const m = B.length;
  const { aggregateOf, count } = agg;
  // Nodes of each aggregate (counting sort), and the largest number of unknowns of an aggregate.
  const aPtr = alloc.i32(count + 1);
  for (let I = 0; I < nodes.count; I++) if (aggregateOf[I] >= 0) aPtr[aggregateOf[I] + 1]++;
  for (let a = 0; a < count; a++) aPtr[a + 1] += aPtr[a];
  const aNodes = alloc.i32(Math.max(1, aPtr[count]), false);
  const fill = alloc.i32(Math.max(1, count), false);
  fill.set(aPtr.subarray(0, count));
  for (let I = 0; I < nodes.count; I++) if (aggregateOf[I] >= 0) aNodes[fill[aggregateOf[I]]++] = I;
  let maxDofs = 0;
  for (let a = 0; a < count; a++) {
    let d = 0;
    for (let p = aPtr[a]; p < aPtr[a + 1]; p++) d += nodes.ptr[aNodes[p] + 1] - nodes.ptr[aNodes[p]];
    if (d > maxDofs) maxDofs = d;
  }
  // Per aggregate: its unknowns, B on them column by column (work), R (m × m, row-major), the kept columns.
  const local = new Int32Array(maxDofs);
  const work = new Float64Array(maxDofs * m);
  const R = new Float64Array(m * m);
  // Row u of P̂ is written at u·m (room for all m columns) and moved down once the row lengths are known; the
  // coarse near-null space is written as the columns are numbered, into room for m per aggregate.
  const pCol = alloc.i32(Math.max(1, n * m), false);
  const pVal = alloc.f64(Math.max(1, n * m), false);
  const Bc = Array.from({ length: m }, () => alloc.f64(Math.max(1, count * m), false));
  const kept = alloc.i32(Math.max(1, count), false);
  let nc = 0;
  for (let a = 0; a < count; a++) {
    let d = 0;
    for (let p = aPtr[a]; p < aPtr[a + 1]; p++) {
      const I = aNodes[p];
      for (let s = nodes.ptr[I]; s < nodes.ptr[I + 1]; s++) local[d++] = nodes.dofs[s];
    }
    for (let j = 0; j < m; j++) { const bj = B[j]; for (let r = 0; r < d; r++) work[j * maxDofs + r] = bj[local[r]]; }
    R.fill(0);
    let k = 0;
    for (let j = 0; j < m; j++) {
      const v = j * maxDofs;
      let norm0 = 0;
      for (let r = 0; r < d; r++) norm0 += work[v + r] * work[v + r];
      norm0 = Math.sqrt(norm0);
      for (let pass = 0; pass < 2; pass++) {
        for (let i = 0; i < k; i++) {
          const w = i * maxDofs;
          let c = 0;
          for (let r = 0; r < d; r++) c += work[w + r] * work[v + r];
          R[i * m + j] += c;
          for (let r = 0; r < d; r++) work[v + r] -= c * work[w + r];
        }
      }
      let nrm = 0;
      for (let r = 0; r < d; r++) nrm += work[v + r] * work[v + r];
      nrm = Math.sqrt(nrm);
      if (!(nrm > DEPENDENT_COLUMN * norm0) || k === d) continue;
      // Column j is kept as the k-th column of Q (moved down to slot k when columns before it were dropped).
      const w = k * maxDofs, inv = 1 / nrm;
      for (let r = 0; r < d; r++) work[w + r] = work[v + r] * inv;
      R[k * m + j] = nrm;
      k++;
    }
    kept[a] = k;
    for (let c = 0; c < k; c++) {
      for (let r = 0; r < d; r++) { const at = local[r] * m + c; pCol[at] = nc + c; pVal[at] = work[c * maxDofs + r]; }
      for (let j = 0; j < m; j++) Bc[j][nc + c] = R[c * m + j];
    }
    nc += k;
  }
  // Coarse nodes: one per aggregate that kept a column, holding its columns in order.
  let coarseNodes = 0;
  for (let a = 0; a < count; a++) if (kept[a] > 0) coarseNodes++;
  const cPtr = alloc.i32(coarseNodes + 1, false);
  const cDofs = alloc.i32(Math.max(1, nc), false);
  const cNodeOf = alloc.i32(Math.max(1, nc), false);
  cPtr[0] = 0;
  for (let a = 0, I = 0, c = 0; a < count; a++) {
    if (kept[a] === 0) continue;
    for (let e = c + kept[a]; c < e; c++) { cDofs[c] = c; cNodeOf[c] = I; }
    cPtr[++I] = c;
  }
  // P̂ rows moved down to their final place (row u starts at or before u·m, so a forward pass overwrites nothing
  // still to be read). A node left out of every aggregate has an empty row.
  const pPtr = alloc.i32(n + 1);
  for (let u = 0; u < n; u++) {
    const a = aggregateOf[nodes.nodeOf[u]];
    const k = a >= 0 ? kept[a] : 0;
    const to = pPtr[u], from = u * m;
    if (to !== from) for (let c = 0; c < k; c++) { pCol[to + c] = pCol[from + c]; pVal[to + c] = pVal[from + c]; }
    pPtr[u + 1] = to + k;
  }
  const nnz = pPtr[n];
  alloc.free(aPtr); alloc.free(aNodes); alloc.free(fill); alloc.free(kept);
  return {
    P: { nRows: n, nCols: nc, rowPtr: pPtr, colIdx: alloc.shrink(pCol, nnz), values: alloc.shrink(pVal, nnz) },
    B: Bc.map((v) => alloc.shrink(v, nc)),
    nodes: { count: coarseNodes, ptr: cPtr, dofs: cDofs, nodeOf: cNodeOf },
  };
}

/** Lanczos steps for ρ(D⁻¹A) in the prolongator smoothing of a system. */
const SYSTEM_LANCZOS_STEPS = 4;

/** P = (I − ω D⁻¹ A) P̂, ω = 4/(3ρ) (Vaněk, Mandel & Brezina 1996, §4); P̂ is left to the caller. A P̂ is formed
 *  by the sparse product and turned into P in place: its rows are sorted and hold the columns of P̂'s row (a_ii ≠ 0
 *  reaches them), which are consecutive integers, hence consecutive entries. */
export function smoothTentative(
  A: Csr, Ptent: Csr, diag: Float64Array, symmetric: boolean, alloc: Allocator = heapAllocator,
): Csr {
  const { nRows: n, rowPtr, colIdx, values } = A;
  let gershgorin = 1;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s += Math.abs(values[k]);
    if (s / diag[i] > gershgorin) gershgorin = s / diag[i];
  }
  let rho = gershgorin;
  if (symmetric) {
    // Lanczos on D^{-1/2} A D^{-1/2}, similar to D⁻¹A (strong = null: the whole of A).
    rho = lanczosSpectralRadius(A, null, diag, SYSTEM_LANCZOS_STEPS, gershgorin, alloc);
  }
  const omega = 4 / (3 * rho);
  const AP = spgemm(A, Ptent, alloc);
  const { rowPtr: apPtr, colIdx: apCol, values: apVal } = AP;
  for (let i = 0; i < n; i++) {
    const scale = -omega / diag[i];
    const lo = apPtr[i], hi = apPtr[i + 1];
    for (let p = lo; p < hi; p++) apVal[p] *= scale;
    const tlo = Ptent.rowPtr[i], thi = Ptent.rowPtr[i + 1];
    if (tlo === thi) continue;
    let p = lo;
    while (apCol[p] !== Ptent.colIdx[tlo]) p++;
    for (let t = tlo; t < thi; t++, p++) apVal[p] += Ptent.values[t];
  }
  return AP;
}
