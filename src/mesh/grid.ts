/** How each square of a structured grid is cut into triangles.
 *  'right': diagonal lower-left → upper-right; 'left': lower-right → upper-left;
 *  'alternating': 'right' where i + j is even, 'left' where odd (a checkerboard of the two);
 *  'crossed': both diagonals, four triangles around a centre vertex. */
export type Diagonal = 'right' | 'left' | 'alternating' | 'crossed';

export const DIAGONALS: readonly Diagonal[] = ['right', 'left', 'alternating', 'crossed'];

/** n + 1 equally spaced points from lo to hi, with both end points exact (no accumulated round-off at hi). */
export function gridPoints(lo: number, hi: number, n: number): Float64Array {
  const points = new Float64Array(n + 1);
  const step = (hi - lo) / n;
  for (let i = 0; i < n; i++) points[i] = lo + i * step;
  points[n] = hi;
  return points;
}

/** Triangles per square for a diagonal choice. */
export function trianglesPerSquare(diagonal: Diagonal): number {
  return diagonal === 'crossed' ? 4 : 2;
}

/** Writes the triangles of one square (corners counter-clockwise from lower-left: v00, v10, v11, v01) into cells
 *  at offset, each triangle counter-clockwise; centre is used only by 'crossed'. Returns the next offset. */
export function writeSquareTriangles(
  cells: Int32Array,
  offset: number,
  v00: number,
  v10: number,
  v11: number,
  v01: number,
  centre: number,
  diagonal: Diagonal,
  parity: number,
): number {
  let o = offset;
  if (diagonal === 'crossed') {
    cells[o++] = v00; cells[o++] = v10; cells[o++] = centre;
    cells[o++] = v10; cells[o++] = v11; cells[o++] = centre;
    cells[o++] = v11; cells[o++] = v01; cells[o++] = centre;
    cells[o++] = v01; cells[o++] = v00; cells[o++] = centre;
  } else if (diagonal === 'right' || (diagonal === 'alternating' && (parity & 1) === 0)) {
    cells[o++] = v00; cells[o++] = v10; cells[o++] = v11;
    cells[o++] = v00; cells[o++] = v11; cells[o++] = v01;
  } else {
    cells[o++] = v00; cells[o++] = v10; cells[o++] = v01;
    cells[o++] = v10; cells[o++] = v11; cells[o++] = v01;
  }
  return o;
}
