import type { Mesh } from './types.ts';

/** Smallest axis-aligned box holding every vertex: min and max per coordinate. */
export function boundingBox(mesh: Mesh): { min: number[]; max: number[] } {
  const { dim, coords } = mesh;
  const min = new Array<number>(dim).fill(Infinity);
  const max = new Array<number>(dim).fill(-Infinity);
  for (let v = 0; v < mesh.nVertices; v++) {
    for (let k = 0; k < dim; k++) {
      const x = coords[v * dim + k]!;
      if (x < min[k]!) min[k] = x;
      if (x > max[k]!) max[k] = x;
    }
  }
  return { min, max };
}
