import { describe, expect, it } from 'vitest';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { singleField } from '../../../src/fem/space/space.ts';
import { boundaryLoad } from '../../../src/fem/time/boundary-load.ts';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';

// The basis functions of a Lagrange space sum to 1, so the entries of ∫_Γ g(·, t) v ds sum to ∫_Γ g(·, t) ds; on a
// unit square's 'top' (y = 1, n = (0, 1)) and 'right' (x = 1, n = (1, 0)) edges, g = x·n_y + t·y·n_x + t² gives
// ∫_top (x + t²) dx + ∫_right (t·y + t²) dy = 1/2 + t² + t/2 + t² (exact integrals, worked by hand).
describe('boundaryLoad', () => {
  const exact = (t: number) => 0.5 + t / 2 + 2 * t * t;
  it.each([1, 2, 3])('degree %s on triangles (and quadrilaterals up to 2): the entries sum to the exact flux integral at every t', (degree) => {
    for (const cells of degree <= 2 ? ['triangles', 'quadrilaterals'] as const : ['triangles'] as const) {
      const space = singleField('u', lagrangeSpace(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 5, ny: 3, cells }), degree));
      const load = boundaryLoad(space, {
        tags: ['top', 'right'], degree: 4,
        flux: (x, y, _z, t, nx, ny, _nz, out) => { out[0] = x * ny + t * y * nx + t * t; },
      })!;
      let worst = 0;
      for (const t of [0, 0.3, 1.7]) {
        const F = new Float64Array(space.nDofs);
        load(t, F);
        load(t, F); // adds: twice the integral
        worst = Math.max(worst, Math.abs(F.reduce((a, b) => a + b, 0) - 2 * exact(t)));
      }
      expect(worst, `${cells}`).toBeLessThan(1e-13);
    }
  });

  it('no facet with the tags: null', () => {
    const space = singleField('u', lagrangeSpace(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 2, cells: 'triangles' }), 1));
    expect(boundaryLoad(space, { tags: [], degree: 2, flux: () => undefined })).toBeNull();
  });
});
