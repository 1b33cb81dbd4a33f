import { RungsInputError } from '../errors.ts';

/**
 * Default threshold below which a cell's error counts as round-off: a fraction of the largest cell error of its
 * level (on e, not e²). A cell's error is u − u_h taken at quadrature points where both are of the solution's size
 * U, so it carries an absolute round-off of a few ε U (ε ≈ 2.2e-16), more after a linear solve; the largest cell
 * error of a level is the discretization error, typically 1e-3 … 1e-10 of U. Below a millionth of the largest,
 * a cell's error is within a few decades of that round-off on fine high-order levels, and a ratio of two such
 * values says nothing about the order. Those cells hold under 1e-12 of the largest cell's share of the squared
 * norm, so nothing that matters is hidden (chosen, no source). A caller that knows the solution's size or the
 * solver's floor (an algebraic error near 1e-3 of the discretization error is a higher floor) passes its own.
 */
export const LOCAL_ORDER_ROUND_OFF = 1e-6;

/**
 * Local observed order per coarse cell of a nested pair of levels: p_K = ln(e_K / e_children) / ln(ratio), with
 * e_K = sqrt(coarsePerCell[K]) and e_children = sqrt(Σ finePerCell[c] over the fine cells c with parents[c] = K):
 * both measure the error over the same region K, so a density C h^p over it gives ratio^p (common practice, no
 * source). Inputs are per-cell squared errors (∫_K e² or ∫_K |∇e|²); `parents` comes from parentCells (−1 entries
 * are skipped); ratio is h_coarse / h_fine. NaN where either error is at or below threshold × the largest of its
 * level (LOCAL_ORDER_ROUND_OFF by default), or where K has no children.
 */
export function localOrders(
  coarsePerCell: Float64Array,
  finePerCell: Float64Array,
  parents: Int32Array,
  ratio: number,
  threshold = LOCAL_ORDER_ROUND_OFF,
): Float64Array {
  if (!(Number.isFinite(ratio) && ratio > 1)) {
    throw new RungsInputError(`local orders need a refinement ratio h_coarse / h_fine above 1, got ${ratio}`, 'ratio');
  }
  if (parents.length !== finePerCell.length) {
    throw new RungsInputError(
      `parents must hold one coarse cell per fine cell (${finePerCell.length}), got ${parents.length}`, 'parents');
  }
  const nCoarse = coarsePerCell.length;
  const children = new Float64Array(nCoarse);
  for (let c = 0; c < parents.length; c++) {
    const K = parents[c]!;
    if (K < 0) continue;
    if (K >= nCoarse) {
      throw new RungsInputError(`parents[${c}] = ${K} is not a coarse cell index in 0..${nCoarse - 1}`, 'parents');
    }
    children[K]! += finePerCell[c]!;
  }
  if (!(threshold >= 0 && threshold < 1)) {
    throw new RungsInputError(`the round-off threshold must lie in [0, 1), got ${threshold}`, 'threshold');
  }
  // Squared errors: the threshold on e is squared.
  const floor2 = threshold * threshold;
  const coarseFloor = floor2 * largest(coarsePerCell), fineFloor = floor2 * largest(children);
  const out = new Float64Array(nCoarse);
  const logRatio = Math.log(ratio);
  for (let K = 0; K < nCoarse; K++) {
    const a = coarsePerCell[K]!, b = children[K]!;
    out[K] = a > coarseFloor && b > fineFloor ? (0.5 * Math.log(a / b)) / logRatio : Number.NaN;
  }
  return out;
}

/** Largest finite entry (0 when none). */
function largest(values: Float64Array): number {
  let top = 0;
  for (let i = 0; i < values.length; i++) if (values[i]! > top && Number.isFinite(values[i]!)) top = values[i]!;
  return top;
}

/** What the local orders of a pair of levels say, in numbers a sentence can carry (summarizeLocalOrders). */
export interface LocalOrderSummary {
  /** Share of the coarse level's measure (area, length or volume) whose cells have a local order; the rest are at
   *  round-off (LOCAL_ORDER_ROUND_OFF) or have no children. */
  covered: number;
  /** Measure-weighted 5%, 50% and 95% quantiles of the local orders over the cells that have one. */
  p05: number;
  median: number;
  p95: number;
  /** With an expected order p: the share of the covered measure whose local order lies below p − tolerance, and the
   *  share above p + tolerance; null without one. */
  below: number | null;
  above: number | null;
  /** The expected order and tolerance these shares are taken against (null without an expected order). */
  expected: number | null;
  tolerance: number;
}

/**
 * Measure-weighted quantiles of per-cell local orders (localOrders) and the shares of the measure below and above the
 * expected order's band: weighting by |K| makes the figures those of the domain, not of the mesh's cell count (a
 * graded mesh has many small cells near a singularity). Quantile q is the smallest order whose cumulative weight
 * reaches q of the total (the lower weighted quantile, simple-statistics' weightedQuantile; common practice, no
 * source). NaN orders are left out and their measure counts as not covered. Null when no cell has a local order.
 */
export function summarizeLocalOrders(
  orders: Float64Array, measures: Float64Array, expected: number | null, tolerance: number,
): LocalOrderSummary | null {
  if (measures.length !== orders.length) {
    throw new RungsInputError(`measures must hold one value per cell (${orders.length}), got ${measures.length}`, 'measures');
  }
  let total = 0, covered = 0, below = 0, above = 0, count = 0;
  for (let K = 0; K < orders.length; K++) {
    const w = measures[K]!;
    total += w;
    const p = orders[K]!;
    if (!Number.isFinite(p)) continue;
    count++;
    covered += w;
    if (expected !== null && p < expected - tolerance) below += w;
    if (expected !== null && p > expected + tolerance) above += w;
  }
  if (count === 0 || !(covered > 0)) return null;
  const values = new Float64Array(count), weights = new Float64Array(count);
  for (let K = 0, i = 0; K < orders.length; K++) {
    if (Number.isFinite(orders[K]!)) { values[i] = orders[K]!; weights[i++] = measures[K]!; }
  }
  const [p05, median, p95] = weightedQuantiles(values, weights, [0.05, 0.5, 0.95]);
  return {
    covered: covered / total,
    p05: p05!, median: median!, p95: p95!,
    below: expected !== null ? below / covered : null,
    above: expected !== null ? above / covered : null,
    expected, tolerance,
  };
}

/**
 * Lower weighted quantiles of finite values with non-negative weights: for each p, the first value, in the order of
 * a stable sort by value, at which the weights summed in that order reach p × the total (summed in input order); p = 0
 * gives the smallest value. The definition of simple-statistics' weightedQuantile (and the same bits: tested against
 * it), on typed arrays: that function sorts one two-element array per value, about 90 MB of heap for the 524k cells
 * of the P1 ladder's 512² level, which set the whole run's peak memory; this one needs 40 bytes per value, and
 * finds the stable order by a radix sort (stableOrder), so the order of equal values, and with it every rounding of
 * the sums, is the stable sort's.
 */
export function weightedQuantiles(values: Float64Array, weights: Float64Array, ps: readonly number[]): number[] {
  const n = values.length;
  if (n === 0 || weights.length !== n) throw new RungsInputError(`weighted quantiles need as many weights as values (at least one), got ${n} values and ${weights.length} weights`, 'weights');
  let total = 0;
  for (let i = 0; i < n; i++) {
    if (!(weights[i]! >= 0)) throw new RungsInputError(`weights must be non-negative, got ${weights[i]} at ${i}`, 'weights');
    if (!Number.isFinite(values[i]!)) throw new RungsInputError(`values must be finite, got ${values[i]} at ${i}`, 'values');
    total += weights[i]!;
  }
  if (!(total > 0)) throw new RungsInputError('weighted quantiles need at least one positive weight', 'weights');
  const order = stableOrder(values);
  const sortedValues = new Float64Array(n), sortedWeights = new Float64Array(n);
  for (let k = 0; k < n; k++) { const i = order[k]!; sortedValues[k] = values[i]!; sortedWeights[k] = weights[i]!; }
  return ps.map((p) => {
    if (!(p >= 0 && p <= 1)) throw new RungsInputError(`quantiles must lie in [0, 1], got ${p}`, 'p');
    if (p === 0) return sortedValues[0]!;
    const threshold = p * total;
    let cumulative = 0;
    for (let i = 0; i < n; i++) {
      cumulative += sortedWeights[i]!;
      if (cumulative >= threshold) return sortedValues[i]!;
    }
    return sortedValues[n - 1]!;
  });
}

/**
 * The indices of `values` (finite) in the order of a stable sort by value, −0 and +0 counting as equal: an LSD radix
 * sort on the bits of each double made to sort as unsigned integers (sign bit flipped for values ≥ 0, every bit for
 * negative ones: common practice, no source), 16 bits per pass, four passes, each stable. Linear in n: on the 524k
 * local orders of the P1 ladder it replaced a native sort plus one binary search per value (about 180 ms).
 */
export function stableOrder(values: Float64Array): Int32Array {
  const n = values.length;
  const bits = new Float64Array(1), words = new Uint32Array(bits.buffer);
  const lowEndian = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;
  const LO = lowEndian ? 0 : 1, HI = 1 - LO;
  let hi = new Uint32Array(n), lo = new Uint32Array(n), idx = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    bits[0] = values[i]! === 0 ? 0 : values[i]!; // −0 → +0
    const h = words[HI]!, l = words[LO]!;
    if (h & 0x80000000) { hi[i] = ~h >>> 0; lo[i] = ~l >>> 0; } else { hi[i] = (h | 0x80000000) >>> 0; lo[i] = l; }
    idx[i] = i;
  }
  let hi2 = new Uint32Array(n), lo2 = new Uint32Array(n), idx2 = new Int32Array(n);
  const count = new Int32Array(65537);
  for (let pass = 0; pass < 4; pass++) {
    const word = pass < 2 ? lo : hi, shift = (pass & 1) * 16;
    count.fill(0);
    for (let i = 0; i < n; i++) count[((word[i]! >>> shift) & 0xffff) + 1]++;
    for (let d = 0; d < 65536; d++) count[d + 1]! += count[d]!;
    for (let i = 0; i < n; i++) {
      const at = count[(word[i]! >>> shift) & 0xffff]!++;
      hi2[at] = hi[i]!; lo2[at] = lo[i]!; idx2[at] = idx[i]!;
    }
    [hi, hi2] = [hi2, hi]; [lo, lo2] = [lo2, lo]; [idx, idx2] = [idx2, idx];
  }
  return idx;
}
