/** Reverse Cuthill–McKee ordering to shrink the bandwidth before a banded factorisation.
 *  Cuthill & McKee (1969), Proc. 24th ACM National Conference, 157–172; reversal: George (1971), PhD thesis, Stanford;
 *  start node by the pseudo-peripheral search of George & Liu (1979), ACM TOMS 5(3) 284–295. */
import type { Csr } from '../types.ts';

/** Adjacency of the symmetrised pattern A + Aᵀ without the diagonal (CSR pattern). */
export function symmetricAdjacency(A: Csr): { ptr: Int32Array; adj: Int32Array } {
  const n = A.nRows;
  const { rowPtr, colIdx } = A;
  const count = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j !== i) { count[i + 1]++; count[j + 1]++; }
    }
  }
  for (let i = 0; i < n; i++) count[i + 1] += count[i];
  const fill = count.slice(0, n);
  const both = new Int32Array(count[n]);
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j !== i) { both[fill[i]++] = j; both[fill[j]++] = i; }
    }
  }
  // Drop the duplicates a symmetric pattern produces.
  const mark = new Int32Array(n).fill(-1);
  const ptr = new Int32Array(n + 1);
  let out = 0;
  for (let i = 0; i < n; i++) {
    for (let k = count[i]; k < count[i + 1]; k++) {
      const j = both[k];
      if (mark[j] !== i) { mark[j] = i; both[out++] = j; }
    }
    ptr[i + 1] = out;
  }
  return { ptr, adj: both.slice(0, out) };
}

/** order[newIndex] = oldIndex. Every connected component is ordered from a pseudo-peripheral node. */
export function reverseCuthillMcKee(A: Csr): Int32Array {
  const n = A.nRows;
  const { ptr, adj } = symmetricAdjacency(A);
  const degree = new Int32Array(n);
  for (let i = 0; i < n; i++) degree[i] = ptr[i + 1] - ptr[i];
  const order = new Int32Array(n);
  const placed = new Uint8Array(n);
  const level = new Int32Array(n).fill(-1);
  const queue = new Int32Array(n);
  let filled = 0;

  /** BFS from s over unplaced nodes; returns [number of levels, nodes visited], leaves levels in `level` and nodes in queue. */
  const bfs = (s: number): [number, number] => {
    let head = 0, tail = 0;
    queue[tail++] = s;
    level[s] = 0;
    let depth = 0;
    while (head < tail) {
      const v = queue[head++];
      depth = level[v];
      for (let k = ptr[v]; k < ptr[v + 1]; k++) {
        const w = adj[k];
        if (!placed[w] && level[w] < 0) { level[w] = level[v] + 1; queue[tail++] = w; }
      }
    }
    return [depth + 1, tail];
  };
  const clearLevels = (count: number): void => { for (let t = 0; t < count; t++) level[queue[t]] = -1; };

  for (let seed = 0; seed < n; seed++) {
    if (placed[seed]) continue;
    // Pseudo-peripheral node: restart the BFS from a minimum-degree node of the last level while the depth grows.
    let start = seed;
    let [depth, count] = bfs(start);
    for (let tries = 0; tries < 8; tries++) {
      let candidate = -1;
      for (let t = 0; t < count; t++) {
        const v = queue[t];
        if (level[v] === depth - 1 && (candidate < 0 || degree[v] < degree[candidate])) candidate = v;
      }
      clearLevels(count);
      const [d2, c2] = bfs(candidate);
      if (d2 <= depth) { clearLevels(c2); break; }
      start = candidate; depth = d2; count = c2;
    }
    clearLevels(count);
    // Cuthill–McKee sweep: neighbours in increasing degree.
    let head = filled;
    order[filled++] = start;
    placed[start] = 1;
    while (head < filled) {
      const v = order[head++];
      const first = filled;
      for (let k = ptr[v]; k < ptr[v + 1]; k++) {
        const w = adj[k];
        if (!placed[w]) { placed[w] = 1; order[filled++] = w; }
      }
      for (let a = first + 1; a < filled; a++) {
        const w = order[a];
        let b = a - 1;
        while (b >= first && degree[order[b]] > degree[w]) { order[b + 1] = order[b]; b--; }
        order[b + 1] = w;
      }
    }
  }
  order.reverse();
  return order;
}
