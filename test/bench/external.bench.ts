// Reading external solvers' VTK output. Run: npx tsx test/bench/external.bench.ts
// Target: a legacy ASCII file of 256 × 256 squares in P1 triangles (66 049 points, 131 072 cells) parsed and turned
// into a mesh and field in well under 1 s, so that reading never dominates a level.
import { Bench } from 'tinybench';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { errorNorms } from '../../src/norms/errors.ts';
import { parseLegacyVtk } from '../../src/external/vtk/legacy.ts';
import { parseVtu } from '../../src/external/vtk/vtu.ts';
import { gridToField } from '../../src/external/vtk/to-field.ts';
import { kuhnCubeMesh } from '../external/cube-mesh.ts';
import { legacyVtk, nodalGrid, vtuText } from '../external/vtk-writers.ts';

const TARGET_MS = 1000;
const u = (x: number, y: number, z: number) => Math.sin(3 * x) * Math.cos(2 * y) + z;
const exact = { u, grad: (x: number, y: number, _z: number, g: Float64Array) => { g[0] = 3 * Math.cos(3 * x) * Math.cos(2 * y); g[1] = -2 * Math.sin(3 * x) * Math.sin(2 * y); g[2] = 1; } };
const square = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 256, ny: 256, cells: 'triangles' });
const legacyP1 = legacyVtk(nodalGrid(square, 1, u));
const vtuP2 = vtuText(nodalGrid(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 128, ny: 128, cells: 'triangles' }), 2, u));
const tetP2 = legacyVtk(nodalGrid(kuhnCubeMesh(12), 2, u), '5.1');
const fieldP1 = gridToField(parseLegacyVtk(legacyP1, 'p1.vtk')).field;

const bench = new Bench({ name: 'external VTK output', time: 2000, iterations: 5, warmupIterations: 1 });
bench
  .add('legacy P1 triangles 256² (parse + mesh + field)', () => { gridToField(parseLegacyVtk(legacyP1, 'p1.vtk')); })
  .add('vtu P2 triangles 128² (parse + mesh + field)', () => { gridToField(parseVtu(vtuP2, 'p2.vtu')); })
  .add('legacy 5.1 P2 tetrahedra 12³·6 (parse + mesh + field)', () => { gridToField(parseLegacyVtk(tetP2, 'tet.vtk')); })
  .add('errorNorms of the P1 field 256²', () => { errorNorms(fieldP1, exact); });

await bench.run();
console.log(bench.name);
console.table(bench.table());
console.log(`file sizes: legacy P1 ${(legacyP1.length / 1e6).toFixed(1)} MB, vtu P2 ${(vtuP2.length / 1e6).toFixed(1)} MB, tetra P2 ${(tetP2.length / 1e6).toFixed(1)} MB`);

const headline = bench.tasks[0]!.result;
if (headline.state === 'completed') {
  const median = headline.latency.p50;
  const verdict = median < TARGET_MS ? 'met' : 'MISSED';
  console.log(`legacy P1 256²: median ${median.toFixed(1)} ms, target < ${TARGET_MS} ms: ${verdict}`);
  if (median >= TARGET_MS) process.exitCode = 1;
}
