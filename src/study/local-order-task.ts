// The cell team's task that computes the local orders of a study's finest pair of levels (where.ts, localOrderData)
// on a worker while the main thread writes the finest level's error file and maps (where.ts, localOrdersAhead). One
// part: the whole. Its results go into the input's shared buffers; the main thread reads them once the part is done.
import { meshOf, type SharedMesh } from '../fem/team/mesh.ts';
import { adoptCellMeasures } from '../mesh/regions.ts';
import { localOrderData } from './local-order-data.ts';

export interface LocalOrderTaskInput {
  coarse: SharedMesh;
  fine: SharedMesh;
  coarseL2: Float64Array;
  fineL2: Float64Array;
  /** cellMeasures of each mesh as the main thread has them (it needs them too), or null: computed here. */
  coarseMeasures: Float64Array | null;
  fineMeasures: Float64Array | null;
  /** The fine cells' parents when located already (where.ts, parentCellsAhead), or null: located here. */
  nest: { parent: Int32Array; nested: boolean } | null;
  /** h_coarse / h_fine. */
  ratio: number;
  /** The expected order (NaN: none) and the tolerance of its band. */
  expected: number;
  tolerance: number;
  /** Out: the local order of each coarse cell. */
  orders: Float64Array;
  /** Out: [nested (1 or 0), has a summary (1 or 0), covered, p05, median, p95, below, above] (NaN for a null share). */
  numbers: Float64Array;
}

/** The order of the summary's numbers in LocalOrderTaskInput.numbers. */
export const SUMMARY_FIELDS = ['covered', 'p05', 'median', 'p95', 'below', 'above'] as const;

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as LocalOrderTaskInput;
  return () => {
    const coarse = meshOf(p.coarse), fine = meshOf(p.fine);
    if (p.coarseMeasures) adoptCellMeasures(coarse, p.coarseMeasures);
    if (p.fineMeasures) adoptCellMeasures(fine, p.fineMeasures);
    const data = localOrderData(coarse, fine, p.coarseL2, p.fineL2, p.ratio, Number.isNaN(p.expected) ? null : p.expected, p.tolerance, p.nest ?? undefined);
    p.numbers[0] = data ? 1 : 0;
    if (!data) return;
    p.orders.set(data.orders);
    p.numbers[1] = data.summary ? 1 : 0;
    if (data.summary) SUMMARY_FIELDS.forEach((k, i) => { p.numbers[2 + i] = data.summary![k] ?? Number.NaN; });
  };
}
