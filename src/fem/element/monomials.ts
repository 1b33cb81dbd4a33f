import type { CellKind } from '../../mesh/types.ts';

/** Exponent tuples spanning P_k (total degree ≤ k; simplices) or Q_k (each variable ≤ k; quadrilaterals, hexahedra). */
export function monomialExponents(cell: CellKind, k: number): number[][] {
  const out: number[][] = [];
  if (cell === 'interval') for (let a = 0; a <= k; a++) out.push([a]);
  else if (cell === 'triangle') {
    for (let s = 0; s <= k; s++) for (let b = 0; b <= s; b++) out.push([s - b, b]);
  } else if (cell === 'quadrilateral') {
    for (let b = 0; b <= k; b++) for (let a = 0; a <= k; a++) out.push([a, b]);
  } else if (cell === 'tetrahedron') {
    for (let s = 0; s <= k; s++)
      for (let c = 0; c <= s; c++) for (let b = 0; b + c <= s; b++) out.push([s - b - c, b, c]);
  } else {
    for (let c = 0; c <= k; c++) for (let b = 0; b <= k; b++) for (let a = 0; a <= k; a++) out.push([a, b, c]);
  }
  return out;
}
