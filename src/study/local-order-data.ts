import type { Mesh } from '../mesh/types.ts';
import { parentCells, type ParentCells } from '../mesh/nesting.ts';
import { cellMeasures } from '../mesh/regions.ts';
import { localOrders, summarizeLocalOrders, type LocalOrderSummary } from '../analysis/local-orders.ts';

/** The local orders of a pair of levels, per cell of the coarser one, and their summary: what the local-order map
 *  draws (where.ts, localOrderMap). */
export interface LocalOrderData { orders: Float64Array; summary: LocalOrderSummary | null }

/** The fine cells located in the coarse ones (parentCells), each coarse cell's local order from its error and its
 *  children's (localOrders, ratio h_coarse / h_fine from the meshes' h) and their summary; null when the pair is not
 *  nested. The same on any thread (the main one, or a worker of the cell team: local-order-task.ts). `nest`: the
 *  parents when they were located already (where.ts, parentCellsAhead). */
export function localOrderData(
  coarse: Mesh, fine: Mesh, coarseL2: Float64Array, fineL2: Float64Array, ratio: number, expected: number | null, tolerance: number,
  nest: Pick<ParentCells, 'parent' | 'nested'> = parentCells(coarse, fine),
): LocalOrderData | null {
  if (!nest.nested) return null;
  const orders = localOrders(coarseL2, fineL2, nest.parent, ratio);
  return { orders, summary: summarizeLocalOrders(orders, cellMeasures(coarse), expected, tolerance) };
}
