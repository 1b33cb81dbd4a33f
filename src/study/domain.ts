import type { Mesh } from '../mesh/types.ts';
import { intervalMesh } from '../mesh/interval.ts';
import { rectangleMesh } from '../mesh/rectangle.ts';
import { lShapeMesh } from '../mesh/lshape.ts';
import { boxMesh, BOX_TAGS } from '../mesh/box.ts';
import type { Diagonal } from '../mesh/grid.ts';
import type { DomainSpec } from './declaration.ts';

/** The interval [a, b]; level n has round(n·(b − a)) cells (at least 1). Tags: left, right. */
export function interval(a: number, b: number): DomainSpec {
  return {
    kind: 'interval', dim: 1, tags: ['left', 'right'], bbox: [[a, b]], label: `interval [${a}, ${b}]`,
    mesh: (n) => intervalMesh(a, b, Math.max(1, Math.round(n * (b - a)))),
  };
}

export interface RectangleDomainOptions {
  cells?: 'triangles' | 'quadrilaterals';
  diagonal?: Diagonal;
}

/** The rectangle [x0,x1]×[y0,y1]; level n has round(n·width) × round(n·height) squares (at least 1 each),
 *  cut into triangles or kept as quadrilaterals. Tags: left, right, bottom, top. */
export function rectangle(x: [number, number], y: [number, number], opts: RectangleDomainOptions = {}): DomainSpec {
  const cells = opts.cells ?? 'triangles';
  const what = cells === 'triangles' ? `triangles (${opts.diagonal ?? 'right'} diagonals)` : 'quadrilaterals';
  return {
    kind: 'rectangle', dim: 2, tags: ['left', 'right', 'bottom', 'top'], bbox: [x, y],
    label: `rectangle [${x[0]}, ${x[1]}]×[${y[0]}, ${y[1]}] in ${what}`,
    mesh: (n) => rectangleMesh({
      x, y, cells, diagonal: opts.diagonal,
      nx: Math.max(1, Math.round(n * (x[1] - x[0]))),
      ny: Math.max(1, Math.round(n * (y[1] - y[0]))),
    }),
  };
}

/** The L-shaped domain of src/mesh/lshape.ts in triangles; level n has n cells per unit length. */
export function lShape(opts: { diagonal?: Diagonal } = {}): DomainSpec {
  return {
    kind: 'lshape', dim: 2, tags: ['outer', 'reentrant'], bbox: [[-1, 1], [-1, 1]],
    label: 'L-shape [-1,1]² less one quadrant, triangles',
    mesh: (n) => lShapeMesh(n, opts.diagonal ?? 'right'),
  };
}

export interface BoxDomainOptions {
  cells?: 'tetrahedra' | 'hexahedra';
}

/** The box [x0,x1]×[y0,y1]×[z0,z1]; level n has round(n·width) × round(n·depth) × round(n·height) cubes (at least 1
 *  each), cut into six tetrahedra each (Kuhn's subdivision, the default) or kept as hexahedra. Tags: left, right
 *  (x = x0, x1), bottom, top (y = y0, y1), front, back (z = z0, z1). */
export function box(x: [number, number], y: [number, number], z: [number, number], opts: BoxDomainOptions = {}): DomainSpec {
  const cells = opts.cells ?? 'tetrahedra';
  return {
    kind: 'box', dim: 3, tags: [...BOX_TAGS], bbox: [x, y, z],
    label: `box [${x[0]}, ${x[1]}]×[${y[0]}, ${y[1]}]×[${z[0]}, ${z[1]}] in ${cells === 'tetrahedra' ? 'tetrahedra (Kuhn, 6 per cube)' : 'hexahedra'}`,
    mesh: (n) => boxMesh({
      x, y, z, cells,
      nx: Math.max(1, Math.round(n * (x[1] - x[0]))),
      ny: Math.max(1, Math.round(n * (y[1] - y[0]))),
      nz: Math.max(1, Math.round(n * (z[1] - z[0]))),
    }),
  };
}

/** A domain meshed by the user's own function of n. */
export function customDomain(opts: { dim: 1 | 2 | 3; tags: string[]; bbox: [number, number][]; label: string; mesh: (n: number) => Mesh }): DomainSpec {
  return { kind: 'custom', ...opts };
}
