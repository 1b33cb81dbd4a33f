/** The WebAssembly kernels against the TypeScript loops they transcribe, on the P1 stiffness matrix rungs assembles
 *  for the unit square cut into m×m squares of right-diagonal triangles (default m = 1024: 1.05M unknowns), Dirichlet
 *  dofs eliminated: the finest level's product, its two fused Gauss–Seidel sweeps, a whole multigrid cycle, and the
 *  multigrid setup. Both versions give the same bits (test/linalg/kernels.test.ts); this measures their speed, as
 *  ratios (the machine is shared and noisy). Run: npx tsx test/bench/kernels.bench.ts [m] */
import { Bench } from 'tinybench';
import { manufacture } from '../../src/equation/index.ts';
import { assembleSystem } from '../../src/fem/assemble/system.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { backwardSweepWithProduct, forwardSweepFromZeroWithResidual } from '../../src/linalg/amg/smoother.ts';
import { vCyclePreconditioner } from '../../src/linalg/amg/vcycle.ts';
import { spmv } from '../../src/linalg/csr.ts';
import { arenaBytes, createArena } from '../../src/linalg/kernels/arena.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { printFigure } from './figures.ts';

const m = Number(process.argv[2] ?? 1024);
const exact = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' });
const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
const sys = assembleSystem(lagrangeSpace(mesh, 1), { f: exact.f }, { dirichlet: { tags: mesh.tagNames, value: exact.u } });

// One hierarchy in the arena serves both cycles: the TypeScript loops read the same arrays through their views.
const { hierarchy, preconditioner: wasm } = amgSetup(sys.A, { symmetric: true });
const ts = vCyclePreconditioner(hierarchy);
const L = hierarchy.levels[0];
const n = L.A.nRows, nnz = L.A.rowPtr[n];
const r = wasm.vector!(n), z = wasm.vector!(n), w = wasm.vector!(n), x = wasm.vector!(n);
for (let i = 0; i < n; i++) r[i] = Math.sin(i);

// The single kernels on a copy of the finest level in an arena of their own.
const arena = createArena(arenaBytes([L.A.rowPtr.byteLength, L.A.colIdx.byteLength, L.A.values.byteLength,
  L.diagPos.byteLength, L.invDiag.byteLength, ...new Array<number>(4).fill(8 * n)]))!;
const copy = <T extends Int32Array | Float64Array>(a: T): number => {
  const v = a instanceof Int32Array ? arena.i32(a.length) : arena.f64(a.length);
  v.set(a);
  return v.byteOffset;
};
const [rp, ci, va, dp, inv] = [copy(L.A.rowPtr), copy(L.A.colIdx), copy(L.A.values), copy(L.diagPos), copy(L.invDiag)];
const [br, bz, bw, bx] = [copy(r), copy(z), copy(w), copy(x)];
const kk = arena.kernels;

const bench = new Bench({ iterations: 10, time: 0, warmupIterations: 2 });
bench
  .add('spmv TypeScript', () => spmv(L.A, r, z))
  .add('spmv WebAssembly', () => kk.spmv(n, rp, ci, va, br, bz))
  .add('forward sweep + residual TypeScript', () => forwardSweepFromZeroWithResidual(L.A, L.diagPos, L.invDiag, r, x, z))
  .add('forward sweep + residual WebAssembly', () => kk.forwardSweepFromZeroWithResidual(n, rp, ci, va, dp, inv, br, bx, bz))
  .add('backward sweep + A z TypeScript', () => { backwardSweepWithProduct(L.A, L.diagPos, L.invDiag, r, x, w); })
  .add('backward sweep + A z WebAssembly', () => { kk.backwardSweepWithProduct(n, rp, ci, va, dp, inv, br, bx, bw); })
  .add('V-cycle with A z: TypeScript', () => { ts.withProduct!.apply(r, z, w); })
  .add('V-cycle with A z: WebAssembly', () => { wasm.withProduct!.apply(r, z, w); });
await bench.run();

const mean = (name: string): number => (bench.getTask(name)?.result as { latency?: { mean: number } } | undefined)?.latency?.mean ?? NaN;
console.log(`P1 ${m}² squares: ${n} unknowns, ${nnz} entries on the finest level (${(nnz / n).toFixed(1)} per row)`);
for (const what of ['spmv', 'forward sweep + residual', 'backward sweep + A z']) {
  const a = mean(`${what} TypeScript`), b = mean(`${what} WebAssembly`);
  printFigure({ name: `WebAssembly kernel speed-up on the ${n}-unknown P1 matrix: ${what}`, value: a / b, unit: '×', note: `${(b * 1e6 / nnz).toFixed(2)} ns per entry` });
  console.log(`${what.padEnd(26)} TypeScript ${(a * 1e6 / nnz).toFixed(2)} ns/entry, WebAssembly ${(b * 1e6 / nnz).toFixed(2)} ns/entry, ratio ${(a / b).toFixed(2)}x`);
}
const tsCycle = mean('V-cycle with A z: TypeScript'), wasmCycle = mean('V-cycle with A z: WebAssembly');
printFigure({ name: `WebAssembly speed-up: V-cycle with A z (${n} unknowns)`, value: tsCycle / wasmCycle, unit: '×', note: `${wasmCycle.toFixed(1)} ms per cycle` });
console.log(`V-cycle with A z: TypeScript ${tsCycle.toFixed(1)} ms, WebAssembly ${wasmCycle.toFixed(1)} ms, ratio ${(tsCycle / wasmCycle).toFixed(2)}x`);

const setups: Record<string, number[]> = { wasm: [], javascript: [] };
for (let rep = 0; rep < 3; rep++) {
  for (const kind of ['wasm', 'javascript'] as const) {
    const t0 = performance.now();
    const s = amgSetup(sys.A, { symmetric: true, kernels: kind });
    setups[kind].push(performance.now() - t0);
    s.preconditioner.dispose?.();
  }
}
const best = (v: number[]): number => Math.min(...v);
console.log(`AMG setup (best of 3): TypeScript ${best(setups.javascript).toFixed(0)} ms, WebAssembly ${best(setups.wasm).toFixed(0)} ms, ` +
  `ratio ${(best(setups.javascript) / best(setups.wasm)).toFixed(2)}x`);
printFigure({ name: `WebAssembly speed-up: multigrid setup (${n} unknowns)`, value: best(setups.javascript) / best(setups.wasm), unit: '×', note: `${best(setups.wasm).toFixed(0)} ms, best of 3` });
