// Mesh generation speed. Run: npx tsx test/bench/mesh.bench.ts
// Target: rectangleMesh with 1024 × 1024 squares in triangles well under 0.5 s (typed arrays, no per-vertex objects).
import { Bench } from 'tinybench';
import { lShapeMesh } from '../../src/mesh/lshape.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { checkMesh } from '../../src/mesh/quality.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';

const TARGET_MS = 500;
const unit: [number, number] = [0, 1];
const mid = rectangleMesh({ x: unit, y: unit, nx: 512, ny: 512, cells: 'triangles' });

const bench = new Bench({ name: 'mesh generation', time: 2000, iterations: 5, warmupIterations: 1 });
bench
  .add('rectangle 1024² triangles (right)', () => {
    rectangleMesh({ x: unit, y: unit, nx: 1024, ny: 1024, cells: 'triangles' });
  })
  .add('rectangle 1024² triangles (crossed)', () => {
    rectangleMesh({ x: unit, y: unit, nx: 1024, ny: 1024, cells: 'triangles', diagonal: 'crossed' });
  })
  .add('rectangle 1024² quadrilaterals', () => {
    rectangleMesh({ x: unit, y: unit, nx: 1024, ny: 1024, cells: 'quadrilaterals' });
  })
  .add('L-shape n = 512 (3 · 512² squares)', () => {
    lShapeMesh(512);
  })
  .add('perturb 512² triangles', () => {
    perturbMesh(mid, { fraction: 0.3, seed: 1 });
  })
  .add('checkMesh 512² triangles', () => {
    checkMesh(mid);
  });

await bench.run();
console.log(bench.name);
console.table(bench.table());

const headline = bench.tasks[0]!.result;
if (headline.state === 'completed') {
  const median = headline.latency.p50;
  const verdict = median < TARGET_MS ? 'met' : 'MISSED';
  console.log(`rectangle 1024² triangles: median ${median.toFixed(1)} ms, target < ${TARGET_MS} ms: ${verdict}`);
  if (median >= TARGET_MS) process.exitCode = 1;
}
