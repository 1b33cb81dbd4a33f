// The mean of a function over a study's domain, by quadrature on a mesh of it: a mean-free field's exact solution
// (a Stokes pressure) must have mean zero, or a solver that fixes the mean is compared with the wrong function.
import { lagrangeElement } from '../fem/element/index.ts';
import { makeCellValues, reinitCell } from '../fem/geometry/cellvalues.ts';
import { ruleFor } from '../fem/quadrature/index.ts';
import type { Mesh } from '../mesh/types.ts';

/** ∫ f / |Ω| with a rule of degree `degree` per cell (f evaluated at the mapped quadrature points). */
export function domainMean(mesh: Mesh, f: (x: number, y: number, z: number) => number, degree = 10): { mean: number; scale: number } {
  const cv = makeCellValues(lagrangeElement(mesh.cellKind, 1), ruleFor(mesh.cellKind, degree));
  let integral = 0, area = 0, scale = 0;
  for (let c = 0; c < mesh.nCells; c++) {
    reinitCell(cv, mesh, c, false);
    for (let q = 0; q < cv.nq; q++) {
      const v = f(cv.x[3 * q]!, cv.x[3 * q + 1]!, cv.x[3 * q + 2]!);
      integral += cv.wdet[q]! * v;
      area += cv.wdet[q]!;
      scale = Math.max(scale, Math.abs(v));
    }
  }
  return { mean: integral / area, scale };
}
