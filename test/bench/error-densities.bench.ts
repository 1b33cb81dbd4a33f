// Cost of the error densities per cell (opts.perCell) on top of the error integration, at about 1M P1 unknowns in
// 2D: 999 × 999 squares in triangles (1 000 000 vertices, 1 996 002 cells), the discrete solution and its nodal
// interpolant in one pass as a scalar study measures them (src/study/discretizations/measure-scalar.ts).
// Target: with perCell at most 1.10 × the time without, in the same run. Runs alternate (without, with, without,
// …) so that a shared machine's load falls on both alike; the best and the median of each are printed.
// Also times writing that level as .vtu (src/external/vtk/write.ts) in both encodings, into a temporary folder.
// Run: npx tsx test/bench/error-densities.bench.ts   (ROUNDS=9 by default; --small for 255 × 255 squares)
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { manufacture } from '../../src/equation/index.ts';
import { errorNormsOf, perCellArrays } from '../../src/norms/errors.ts';
import { fieldErrors } from '../../src/norms/field-errors.ts';
import type { ExactField } from '../../src/norms/types.ts';
import { vertexValues, writeVtu } from '../../src/external/vtk/write.ts';
import { printFigure } from './figures.ts';

const TARGET_RATIO = 1.1;
const n = process.argv.includes('--small') ? 255 : 999;
const rounds = Number(process.env.ROUNDS ?? 9);
const ms = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' });
const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' });
const space = lagrangeSpace(mesh, 1);
const ih = interpolate(space, ms.u);
// A stand-in for the discrete solution: the interpolant with a smooth perturbation of the size of the error.
const uh = ih.slice();
for (let i = 0; i < uh.length; i++) uh[i] += 1e-6 * Math.cos(7 * i / uh.length);
const fields = [lagrangeField(space, uh), lagrangeField(space, ih)];
const perCell = perCellArrays(mesh.nCells);
const opts = { k: ms.k, c: ms.c };

const asField: ExactField = {
  components: 1,
  value: (x, y, z, out) => { out[0] = ms.u(x, y, z); },
  grad: (x, y, z, out) => ms.grad(x, y, z, out),
};

function time(run: () => void): number {
  const t = performance.now();
  run();
  return performance.now() - t;
}
const median = (a: number[]) => [...a].sort((p, q) => p - q)[a.length >> 1]!;

function compare(name: string, without: () => void, withCells: () => void): void {
  without(); withCells(); // warm-up: compile both paths
  const a: number[] = [], b: number[] = [];
  for (let r = 0; r < rounds; r++) {
    a.push(time(without));
    b.push(time(withCells));
  }
  const best = Math.min(...b) / Math.min(...a), med = median(b) / median(a);
  printFigure({ name: `error densities per cell, ${space.nDofs} P1 unknowns (${name}): with / without`, value: med, unit: '×', target: `≤ ${TARGET_RATIO}`, met: med <= TARGET_RATIO,
    note: `median of ${rounds} alternating rounds, best ${best.toFixed(3)}; without ${median(a).toFixed(0)} ms` });
  console.log(`${name}: without ${Math.min(...a).toFixed(0)} ms (median ${median(a).toFixed(0)}), with perCell ${Math.min(...b).toFixed(0)} ms ` +
    `(median ${median(b).toFixed(0)}); ratio best ${best.toFixed(3)}, median ${med.toFixed(3)} ${med <= TARGET_RATIO ? '(within' : '(ABOVE'} ${TARGET_RATIO})`);
}

console.log(`P1 on ${n}² squares in triangles: ${space.nDofs} unknowns, ${mesh.nCells} cells, ${rounds} rounds`);
compare('errorNormsOf, solution + interpolant', () => { errorNormsOf(fields, ms, opts); }, () => { errorNormsOf(fields, ms, { ...opts, perCell }); });
compare('fieldErrors, solution + interpolant', () => { fieldErrors(fields, asField); }, () => { fieldErrors(fields, asField, { perCell }); });

const dir = mkdtempSync(join(tmpdir(), 'rungs-vtu-bench-'));
try {
  const t = performance.now();
  const atVertices = vertexValues(fields[0]);
  console.log(`vertexValues of u_h: ${(performance.now() - t).toFixed(0)} ms`);
  for (const format of ['ascii', 'binary'] as const) {
    const file = join(dir, `level.${format}.vtu`);
    const t0 = performance.now();
    writeVtu(file, { mesh, format, pointData: { u_h: atVertices, u: ih }, cellData: { 'L2 density': perCell.L2, 'H1 density': perCell.H1semi } });
    console.log(`writeVtu ${format}: ${(performance.now() - t0).toFixed(0)} ms, ${(statSync(file).size / 1e6).toFixed(1)} MB`);
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
