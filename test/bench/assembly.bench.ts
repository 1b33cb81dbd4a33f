// Mesh plus assembly at about 1M unknowns: P1 on 1024² squares and P2 on 512² squares (targets: under 3 s each,
// peak memory under 1.5 GB, on a 2-core machine). Also times the solve as it is today. Run: npx tsx test/bench/assembly.bench.ts
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { assembleSystem, expandSolution } from '../../src/fem/assemble/system.ts';
import { manufacture } from '../../src/equation/index.ts';
import { solveSystem } from '../../src/linalg/index.ts';
import { lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { errorNorms } from '../../src/norms/errors.ts';

const ms = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' });
const cases = process.argv.includes('--small') ? [[1, 256], [2, 128]] : [[1, 1024], [2, 512]];
const runs = Number(process.env.RUNS ?? 3);
for (const [k, m] of cases) {
  const best = { mesh: Infinity, space: Infinity, assemble: Infinity, solve: Infinity, errors: Infinity };
  let info = '';
  for (let r = 0; r < runs; r++) {
    let t = performance.now();
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
    const tMesh = performance.now() - t; t = performance.now();
    const space = lagrangeSpace(mesh, k);
    const tSpace = performance.now() - t; t = performance.now();
    const sys = assembleSystem(space, { f: ms.f, hints: { f: null } }, { dirichlet: { tags: mesh.tagNames, value: ms.u } });
    const tAsm = performance.now() - t; t = performance.now();
    const { x, stats } = solveSystem(sys.A, sys.b, { symmetric: true, relTol: 1e-10 });
    const tSolve = performance.now() - t; t = performance.now();
    const e = errorNorms(lagrangeField(space, expandSolution(sys, x)), ms);
    const tErr = performance.now() - t;
    best.mesh = Math.min(best.mesh, tMesh); best.space = Math.min(best.space, tSpace); best.assemble = Math.min(best.assemble, tAsm);
    best.solve = Math.min(best.solve, tSolve); best.errors = Math.min(best.errors, tErr);
    info = `${space.nDofs} dofs, nnz ${sys.A.colIdx.length}, ${stats.method}+${stats.preconditioner} ${stats.iterations} it, L2 ${e.L2.toExponential(3)}`;
  }
  const rss = process.resourceUsage().maxRSS / 1024;
  console.log(`P${k} ${m}²: ${info}`);
  console.log(`  best of ${runs}: mesh ${best.mesh.toFixed(0)} ms, dofs ${best.space.toFixed(0)} ms, assembly ${best.assemble.toFixed(0)} ms` +
    ` → mesh+dofs+assembly ${(best.mesh + best.space + best.assemble).toFixed(0)} ms; solve ${best.solve.toFixed(0)} ms; errors ${best.errors.toFixed(0)} ms; peak RSS so far ${rss.toFixed(0)} MB`);
}
