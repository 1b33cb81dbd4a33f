/** Greedy aggregation of the strength graph in the three passes of Vaněk, Mandel & Brezina (1996), Computing 56,
 *  179–196, §3: (1) a node whose strong neighbourhood is untouched founds an aggregate with that neighbourhood;
 *  (2) a leftover node joins the pass-1 aggregate it is most strongly coupled to; (3) what remains founds aggregates
 *  with its remaining neighbours. Nodes with no strong neighbour (decoupled rows) stay out of every aggregate: the
 *  smoother solves them exactly, so the coarse space need not represent them. */
import type { Csr } from '../types.ts';

export const NOT_AGGREGATED = -1;

export interface Aggregation {
  /** Aggregate of each node, or NOT_AGGREGATED for decoupled nodes. */
  aggregateOf: Int32Array;
  count: number;
}

export function aggregate(A: Csr, strong: Uint8Array, diag?: Float64Array): Aggregation {
  const { nRows: n, rowPtr, colIdx, values } = A;
  const UNSEEN = -2;
  const aggregateOf = new Int32Array(n).fill(UNSEEN);
  const fromPass1 = new Uint8Array(n);
  let count = 0;
  const WEAK = -3;
  for (let i = 0; i < n; i++) {
    let hasStrong = false;
    let off = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) { if (strong[k]) { hasStrong = true; break; } if (colIdx[k] !== i) off += Math.abs(values[k]); }
    if (!hasStrong) aggregateOf[i] = diag && off > 1e-3 * diag[i] ? WEAK : NOT_AGGREGATED;
  }
  // Pass 1.
  for (let i = 0; i < n; i++) {
    if (aggregateOf[i] !== UNSEEN) continue;
    let free = true;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      if (strong[k] && aggregateOf[colIdx[k]] !== UNSEEN) { free = false; break; }
    }
    if (!free) continue;
    aggregateOf[i] = count;
    fromPass1[i] = 1;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      if (strong[k]) { aggregateOf[colIdx[k]] = count; fromPass1[colIdx[k]] = 1; }
    }
    count++;
  }
  // Pass 2: join the pass-1 aggregate of the strongest coupling.
  for (let i = 0; i < n; i++) {
    if (aggregateOf[i] !== UNSEEN) continue;
    let best = -1, bestValue = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      if (!strong[k]) continue;
      const j = colIdx[k];
      const v = Math.abs(values[k]);
      if (fromPass1[j] && v > bestValue) { bestValue = v; best = aggregateOf[j]; }
    }
    if (best >= 0) aggregateOf[i] = best;
  }
  // Pass 3.
  for (let i = 0; i < n; i++) {
    if (aggregateOf[i] !== UNSEEN) continue;
    aggregateOf[i] = count;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      if (strong[k] && aggregateOf[colIdx[k]] === UNSEEN) aggregateOf[colIdx[k]] = count;
    }
    count++;
  }
  // Pass 4: weakly coupled nodes join the aggregate of their largest coupling, or found a singleton.
  for (let i = 0; i < n; i++) {
    if (aggregateOf[i] !== WEAK) continue;
    let best = -1, bestValue = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j === i || aggregateOf[j] < 0) continue;
      const v = Math.abs(values[k]) / Math.sqrt(diag![j]);
      if (v > bestValue) { bestValue = v; best = aggregateOf[j]; }
    }
    aggregateOf[i] = best >= 0 ? best : count++;
  }
  return { aggregateOf, count };
}
