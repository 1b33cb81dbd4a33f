/** The multigrid cycle against the single-thread memory-bandwidth bound of the bytes it must move.
 *  Matrix: the P1 stiffness matrix rungs assembles for the unit square cut into m×m squares of right-diagonal
 *  triangles (default m = 1024: 1.05M unknowns), Dirichlet dofs eliminated, built as kernels.bench.ts builds it;
 *  amgSetup(A, { symmetric: true }) gives the hierarchy and the WebAssembly cycle (wasm-cycle.ts).
 *  Run: npx tsx test/bench/vcycle-bandwidth.bench.ts [m]
 *
 *  Bandwidth. A STREAM-like triad a[i] = b[i] + s·c[i] and copy a[i] = b[i] on three arrays of 2^24 doubles
 *  (128 MiB each, at least 4× the last-level cache: STREAM's sizing rule, from memory), written as plain Float64Array loops and
 *  as a small WebAssembly module (scalar and 2-lane SIMD); best of REPS timed repetitions after a warm-up, measured
 *  before and after the cycle timings. Bytes are counted by STREAM's rule: triad 24 bytes per element (two arrays
 *  read, one written), copy 16 (McCalpin 1995, STREAM: Sustainable Memory Bandwidth in High Performance Computers;
 *  from memory). Like STREAM this counts a written byte once, although without non-temporal stores (WebAssembly has
 *  none) the hardware also reads the line it writes; the cycle's writes are counted the same way, so the ratio is
 *  like for like. The bandwidth taken is the fastest of all these runs (the highest figure gives the tightest bound).
 *
 *  Bytes of one cycle (the model). The passes are not listed here by hand: the cycle of wasm-cycle.ts itself is run
 *  on a copy of the hierarchy (packHierarchy) with its kernels wrapped, so every kernel call it makes, on every level
 *  and every W-cycle visit, is counted (and timed) from its arguments; a kernel without a model below stops the run.
 *  Per call: the CSR arrays read (4 bytes per row pointer, 4 per column index, 8 per value; diagPos 4 and invDiag 8
 *  per row for the sweeps) plus every vector read and every vector written, 8 bytes per entry each (an entry read
 *  and written counts 16). A vector the kernel gathers from (x[colIdx[k]]) counts once per pass: its reuse within a
 *  pass is assumed to hit the cache. Nothing counts as cached from one pass to the next, so on the coarse levels,
 *  which fit in the caches, the bound can exceed the true minimum (there time/bound < 1 is possible).
 *    forwardSweepFromZero(+WithResidual): row pointers n, diagPos n, the strictly lower part of colIdx and values,
 *      invDiag, b read; x written (its gathered entries were written earlier in the same pass); r written.
 *    forwardSweep, backwardSweep (+WithResidual: r written; +WithProduct: w written): the whole CSR, diagPos,
 *      invDiag, b read; x read and written.
 *    residual: the whole CSR, b and x read, r written.  restrictByTranspose: the whole P, r read, b_c written
 *      (its scatter assumed to hit the cache).  multiplyAdd (prolongation): the whole P, x_c read, x read and
 *      written.  addInto: x read and written, dx read.  dense solve (coarsest level, TypeScript): the lower triangle
 *      of the n×n factor read twice (forward and backward substitution), b read, x written (the same in both counts).
 *  Two counts: "elements", the bytes the kernels load and store, and "lines", the 64-byte cache lines those touch
 *  (what the memory system actually moves). They differ for the sweeps from zero, which read only the lower part
 *  of each row: a P1 row is shorter than two lines, so nearly every line of colIdx and values is touched anyway.
 *  The bound is lines / bandwidth; the element count says what a layout that stored the lower triangle apart could
 *  save. GB = 1e9 bytes, MB = 1e6.
 *
 *  Time: best and median of ROUNDS applications after a warm-up, apply (the preconditioner) and withProduct.apply
 *  (the cycle CG runs: its last backward sweep also writes A·z) alternating, with vectors from
 *  preconditioner.vector(n) so that nothing is staged. Where the time goes: the wrapped cycle on the copy, each
 *  kernel call timed (the per-level table, with ns per row; its total against the unwrapped cycle on the same copy
 *  shows the cost of the timers). Last, three finest-level kernels alone, over the whole level (streamed from memory)
 *  and over its first 16384 rows repeated (in the cache): what a kernel costs when memory is not the limit. */
import { readFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import initWabt from 'wabt';
import { manufacture } from '../../src/equation/index.ts';
import { assembleSystem } from '../../src/fem/assemble/system.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { packHierarchy } from '../../src/linalg/amg/pack.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import type { AmgLevel, CoarseSolver } from '../../src/linalg/amg/types.ts';
import { wasmCyclePreconditioner } from '../../src/linalg/amg/wasm-cycle.ts';
import type { Arena } from '../../src/linalg/kernels/arena.ts';
import type { SparseKernels } from '../../src/linalg/kernels/sparse-kernels.ts';
import type { Csr, Preconditioner } from '../../src/linalg/types.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { printFigure } from './figures.ts';

const arg = process.argv[2] ?? '1024';
const m = Number(arg);
if (!(Number.isInteger(m) && m >= 4 && m <= 4096)) {
  process.stderr.write(`vcycle-bandwidth.bench.ts: argument m (squares per side) is '${arg}'; give an integer from 4 to 4096 (default 1024)\n`);
  process.exit(2);
}
/** Timed repetitions of each bandwidth kernel, and timed applications of each cycle. */
const REPS = 10, ROUNDS = 30, WARM = 3;
const LINE = 64;
const GB = 1e9, MB = 1e6;

const loads = (): string => loadavg().map((v) => v.toFixed(2)).join(' / ');
const best = (v: readonly number[]): number => Math.min(...v);
const median = (v: readonly number[]): number => {
  const s = [...v].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
const fmt = (v: number, digits = 1): string => v.toFixed(digits);
/** Three significant digits. */
const sig = (v: number): string => String(Number(v.toPrecision(3)));

const loadAtStart = loads();
const cpu = cpus();
let l3 = 'unknown';
try { l3 = readFileSync('/sys/devices/system/cpu/cpu0/cache/index3/size', 'utf8').trim(); } catch { /* not Linux */ }
console.log(`machine: ${cpu[0]?.model.trim() ?? 'unknown CPU'}, ${cpu.length} logical cores, L3 ${l3}, Node ${process.version}; ` +
  `load average (1/5/15 min) at start ${loadAtStart}`);

// ---------------------------------------------------------------------------------------------------------------
// Single-thread bandwidth: STREAM-like triad and copy.
const N = 1 << 24; // doubles per array: 128 MiB
const STREAM_WAT = `(module
  (import "env" "memory" (memory 1))
  (func (export "triad") (param $a i32) (param $b i32) (param $c i32) (param $n i32) (param $s f64)
    (local $end i32)
    (local.set $end (i32.add (local.get $a) (i32.shl (local.get $n) (i32.const 3))))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $a) (local.get $end)))
      (f64.store (local.get $a) (f64.add (f64.load (local.get $b)) (f64.mul (local.get $s) (f64.load (local.get $c)))))
      (local.set $a (i32.add (local.get $a) (i32.const 8)))
      (local.set $b (i32.add (local.get $b) (i32.const 8)))
      (local.set $c (i32.add (local.get $c) (i32.const 8)))
      (br $l))))
  (func (export "triadSimd") (param $a i32) (param $b i32) (param $c i32) (param $n i32) (param $s f64)
    (local $end i32) (local $sv v128)
    (local.set $sv (f64x2.splat (local.get $s)))
    (local.set $end (i32.add (local.get $a) (i32.shl (local.get $n) (i32.const 3))))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $a) (local.get $end)))
      (v128.store (local.get $a) (f64x2.add (v128.load (local.get $b)) (f64x2.mul (local.get $sv) (v128.load (local.get $c)))))
      (local.set $a (i32.add (local.get $a) (i32.const 16)))
      (local.set $b (i32.add (local.get $b) (i32.const 16)))
      (local.set $c (i32.add (local.get $c) (i32.const 16)))
      (br $l))))
  (func (export "copy") (param $a i32) (param $b i32) (param $n i32)
    (local $end i32)
    (local.set $end (i32.add (local.get $a) (i32.shl (local.get $n) (i32.const 3))))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $a) (local.get $end)))
      (f64.store (local.get $a) (f64.load (local.get $b)))
      (local.set $a (i32.add (local.get $a) (i32.const 8)))
      (local.set $b (i32.add (local.get $b) (i32.const 8)))
      (br $l))))
  (func (export "copySimd") (param $a i32) (param $b i32) (param $n i32)
    (local $end i32)
    (local.set $end (i32.add (local.get $a) (i32.shl (local.get $n) (i32.const 3))))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $a) (local.get $end)))
      (v128.store (local.get $a) (v128.load (local.get $b)))
      (local.set $a (i32.add (local.get $a) (i32.const 16)))
      (local.set $b (i32.add (local.get $b) (i32.const 16)))
      (br $l)))))`;

interface StreamKernels {
  triad(a: number, b: number, c: number, n: number, s: number): void;
  triadSimd(a: number, b: number, c: number, n: number, s: number): void;
  copy(a: number, b: number, n: number): void;
  copySimd(a: number, b: number, n: number): void;
}

const wabt = await initWabt();
const streamModule = wabt.parseWat('stream.wat', STREAM_WAT, { simd: true });
let streamBytes: Uint8Array<ArrayBuffer>;
try {
  streamModule.validate();
  streamBytes = new Uint8Array(streamModule.toBinary({ log: false }).buffer);
} finally {
  streamModule.destroy();
}
const streamMemory = new WebAssembly.Memory({ initial: Math.ceil((3 * 8 * N + LINE) / 65536) });
const sk = new WebAssembly.Instance(new WebAssembly.Module(streamBytes), { env: { memory: streamMemory } }).exports as unknown as StreamKernels;
const [pa, pb, pc] = [LINE, LINE + 8 * N, LINE + 16 * N];
new Float64Array(streamMemory.buffer, pb, N).fill(1);
new Float64Array(streamMemory.buffer, pc, N).fill(2);
new Float64Array(streamMemory.buffer, pa, N).fill(0);
const ja = new Float64Array(N), jb = new Float64Array(N).fill(1), jc = new Float64Array(N).fill(2);
function jsTriad(a: Float64Array, b: Float64Array, c: Float64Array, s: number): void {
  for (let i = 0; i < a.length; i++) a[i] = b[i] + s * c[i];
}
function jsCopy(a: Float64Array, b: Float64Array): void {
  for (let i = 0; i < a.length; i++) a[i] = b[i];
}

interface StreamRun { name: string; bytes: number; run: () => void }
const streamRuns: StreamRun[] = [
  { name: 'triad, WebAssembly SIMD', bytes: 24 * N, run: () => sk.triadSimd(pa, pb, pc, N, 3) },
  { name: 'triad, WebAssembly scalar', bytes: 24 * N, run: () => sk.triad(pa, pb, pc, N, 3) },
  { name: 'triad, Float64Array loop', bytes: 24 * N, run: () => jsTriad(ja, jb, jc, 3) },
  { name: 'copy, WebAssembly SIMD', bytes: 16 * N, run: () => sk.copySimd(pa, pb, N) },
  { name: 'copy, WebAssembly scalar', bytes: 16 * N, run: () => sk.copy(pa, pb, N) },
  { name: 'copy, Float64Array loop', bytes: 16 * N, run: () => jsCopy(ja, jb) },
];

/** Best bandwidth (bytes/s) of each run: two warm-up calls, then REPS timed ones. */
function measureBandwidth(): Map<string, number> {
  const out = new Map<string, number>();
  for (const r of streamRuns) {
    r.run(); r.run();
    const t: number[] = [];
    for (let i = 0; i < REPS; i++) {
      const t0 = performance.now();
      r.run();
      t.push(performance.now() - t0);
    }
    out.set(r.name, r.bytes / (best(t) / 1000));
  }
  return out;
}

const bwBefore = measureBandwidth();
console.log(`\nsingle-thread bandwidth, 3 arrays × 2^24 doubles (128 MiB each), best of ${REPS} (GB/s, STREAM's byte counts):`);
for (const [name, bw] of bwBefore) console.log(`  ${name.padEnd(28)} ${fmt(bw / GB, 2)}`);

// ---------------------------------------------------------------------------------------------------------------
// The matrix and the hierarchy, as kernels.bench.ts builds them.
const exact = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' });
const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
const sys = assembleSystem(lagrangeSpace(mesh, 1), { f: exact.f }, { dirichlet: { tags: mesh.tagNames, value: exact.u } });
const { hierarchy, preconditioner, stats } = amgSetup(sys.A, { symmetric: true });
const n0 = hierarchy.levels[0].A.nRows;
if (stats.kernels !== 'wasm' || !preconditioner.vector) {
  process.stderr.write('vcycle-bandwidth.bench.ts: the multigrid cycle did not get a WebAssembly arena; nothing to measure\n');
  process.exit(1);
}

// A copy of the hierarchy in an arena of its own, whose kernels can be wrapped to count and time every call.
const packed = packHierarchy(hierarchy);
if (!packed) {
  process.stderr.write('vcycle-bandwidth.bench.ts: no second arena for the copy of the hierarchy\n');
  process.exit(1);
}
const levels = packed.hierarchy.levels;
const last = levels.length - 1;

/** Bytes of the 64-byte lines that [ptr, ptr + bytes) touches. */
const lineBytes = (ptr: number, bytes: number): number =>
  bytes <= 0 ? 0 : (Math.floor((ptr + bytes - 1) / LINE) - Math.floor(ptr / LINE) + 1) * LINE;

interface MatrixInfo {
  /** The level of A, or for a prolongator the finer level it maps to (its rows). */
  level: number;
  /** For a prolongator: the coarse level (its columns). */
  coarse: number | null;
  csr: Csr;
  nnz: number;
  /** Strictly lower entries, and the line bytes of their colIdx and values (A only). */
  lower: number; lowerCiLines: number; lowerVaLines: number;
}

/** Line bytes of the rows' segments [rowPtr[i], diagPos[i]) of an array of `size`-byte entries at `base`. */
function lowerLines(A: Csr, diagPos: Int32Array, base: number, size: number): number {
  let lines = 0, lastLine = -1;
  for (let i = 0; i < A.nRows; i++) {
    const lo = A.rowPtr[i], hi = diagPos[i];
    if (hi <= lo) continue;
    const first = Math.floor((base + lo * size) / LINE), end = Math.floor((base + hi * size - 1) / LINE);
    lines += end - Math.max(first, lastLine + 1) + 1;
    lastLine = end;
  }
  return lines * LINE;
}

const matrices = new Map<number, MatrixInfo>(); // keyed by rowPtr's byte offset
const vectorLevel = new Map<number, number>(); // a level's x by byte offset (addInto)
levels.forEach((L: AmgLevel, l) => {
  const A = L.A, nnz = A.rowPtr[A.nRows];
  let lower = 0;
  for (let i = 0; i < A.nRows; i++) lower += L.diagPos[i] - A.rowPtr[i];
  matrices.set(A.rowPtr.byteOffset, {
    level: l, coarse: null, csr: A, nnz, lower,
    lowerCiLines: lowerLines(A, L.diagPos, A.colIdx.byteOffset, 4), lowerVaLines: lowerLines(A, L.diagPos, A.values.byteOffset, 8),
  });
  if (L.P) matrices.set(L.P.rowPtr.byteOffset, { level: l - 1, coarse: l, csr: L.P, nnz: L.P.rowPtr[L.P.nRows], lower: 0, lowerCiLines: 0, lowerVaLines: 0 });
  vectorLevel.set(L.x.byteOffset, l);
});

/** Bytes of one kernel call: [elements, lines] for the matrix data and for the vectors. */
class Traffic {
  matrixEl = 0; matrixLn = 0; vectorEl = 0; vectorLn = 0;
  constructor(public level: number, public label: string, public rows: number) {}
  matrix(ptr: number, bytes: number): this { this.matrixEl += bytes; this.matrixLn += lineBytes(ptr, bytes); return this; }
  vector(ptr: number, bytes: number): this { this.vectorEl += bytes; this.vectorLn += lineBytes(ptr, bytes); return this; }
}

const info = (rp: number): MatrixInfo => {
  const M = matrices.get(rp);
  if (!M) throw new Error(`vcycle-bandwidth: a kernel was called with a matrix (row pointers at ${rp}) that is not in the hierarchy`);
  return M;
};
/** The whole CSR read. */
const wholeCsr = (t: Traffic, M: MatrixInfo): Traffic =>
  t.matrix(M.csr.rowPtr.byteOffset, 4 * (M.csr.nRows + 1)).matrix(M.csr.colIdx.byteOffset, 4 * M.nnz).matrix(M.csr.values.byteOffset, 8 * M.nnz);
/** A sweep's diagPos and invDiag. */
const smootherData = (t: Traffic, n: number, dp: number, inv: number): Traffic => t.matrix(dp, 4 * n).matrix(inv, 8 * n);
/** Row pointers rp[0..n−1], diagPos, the strictly lower part, invDiag, b read, x written: a sweep from zero. */
function sweepFromZero(label: string, n: number, rp: number, dp: number, inv: number, b: number, x: number): Traffic {
  const M = info(rp);
  const t = new Traffic(M.level, label, n).matrix(rp, 4 * n);
  t.matrixEl += 12 * M.lower;
  t.matrixLn += M.lowerCiLines + M.lowerVaLines;
  return smootherData(t, n, dp, inv).vector(b, 8 * n).vector(x, 8 * n);
}
/** A full sweep: the whole CSR, diagPos, invDiag, b read, x read and written. */
const fullSweep = (label: string, n: number, rp: number, dp: number, inv: number, b: number, x: number): Traffic =>
  smootherData(wholeCsr(new Traffic(info(rp).level, label, n), info(rp)), n, dp, inv).vector(b, 8 * n).vector(x, 8 * n).vector(x, 8 * n);

type Model = (a: number[]) => Traffic;
/** One byte model per kernel the cycle may call (argument order of sparse-kernels.ts). */
const MODELS: Record<string, Model> = {
  spmv: ([n, rp, , , x, y]) => { const M = info(rp); return wholeCsr(new Traffic(M.level, 'spmv', n), M).vector(x, 8 * M.csr.nCols).vector(y, 8 * n); },
  residual: ([n, rp, , , b, x, r]) => wholeCsr(new Traffic(info(rp).level, 'residual', n), info(rp)).vector(b, 8 * n).vector(x, 8 * n).vector(r, 8 * n),
  addInto: ([n, x, y]) => new Traffic(vectorLevel.get(x) ?? -1, 'addInto', n).vector(x, 8 * n).vector(x, 8 * n).vector(y, 8 * n),
  forwardSweepFromZero: ([n, rp, , , dp, inv, b, x]) => sweepFromZero('forwardSweepFromZero', n, rp, dp, inv, b, x),
  forwardSweepFromZeroWithResidual: ([n, rp, , , dp, inv, b, x, r]) =>
    sweepFromZero('forwardSweepFromZeroWithResidual', n, rp, dp, inv, b, x).vector(r, 8 * n),
  forwardSweep: ([n, rp, , , dp, inv, b, x]) => fullSweep('forwardSweep', n, rp, dp, inv, b, x),
  forwardSweepWithResidual: ([n, rp, , , dp, inv, b, x, r]) => fullSweep('forwardSweepWithResidual', n, rp, dp, inv, b, x).vector(r, 8 * n),
  backwardSweep: ([n, rp, , , dp, inv, b, x]) => fullSweep('backwardSweep', n, rp, dp, inv, b, x),
  backwardSweepWithProduct: ([n, rp, , , dp, inv, b, x, w]) => fullSweep('backwardSweepWithProduct', n, rp, dp, inv, b, x).vector(w, 8 * n),
  restrictByTranspose: ([n, rp, , , r, nc, bc]) => {
    const M = info(rp);
    return wholeCsr(new Traffic(M.level, `restrictByTranspose → ${M.coarse}`, n), M).vector(r, 8 * n).vector(bc, 8 * nc);
  },
  multiplyAdd: ([n, rp, , , y, x]) => {
    const M = info(rp);
    return wholeCsr(new Traffic(M.level, `multiplyAdd (prolong) ← ${M.coarse}`, n), M).vector(y, 8 * M.csr.nCols).vector(x, 8 * n).vector(x, 8 * n);
  },
};

/** Per (level, label): calls and bytes of one cycle (counted once), and the time of each timed round. */
interface Row { level: number; label: string; calls: number; rows: number; matrixEl: number; matrixLn: number; vectorEl: number; vectorLn: number; times: number[] }
class Tally {
  rows = new Map<string, Row>();
  /** 'count': one cycle whose calls and bytes are recorded; a round index ≥ 0: times go to that round; null: nothing. */
  mode: 'count' | number | null = null;
  record(model: () => Traffic, dt: number): void {
    if (this.mode === null) return;
    const t = model();
    const key = `${t.level}|${t.label}`;
    let row = this.rows.get(key);
    if (!row) {
      row = { level: t.level, label: t.label, calls: 0, rows: 0, matrixEl: 0, matrixLn: 0, vectorEl: 0, vectorLn: 0, times: new Array<number>(ROUNDS).fill(0) };
      this.rows.set(key, row);
    }
    if (this.mode === 'count') {
      row.calls++;
      row.rows += t.rows;
      row.matrixEl += t.matrixEl; row.matrixLn += t.matrixLn; row.vectorEl += t.vectorEl; row.vectorLn += t.vectorLn;
    } else row.times[this.mode] += dt;
  }
  total(f: (r: Row) => number, keep: (r: Row) => boolean = () => true): number {
    let s = 0;
    for (const r of this.rows.values()) if (keep(r)) s += f(r);
    return s;
  }
}

type KernelFn = (...a: number[]) => number | void;
/** The arena's kernels, each call timed and handed to the tally; a kernel without a byte model stops the run. */
function instrumented(real: SparseKernels, tally: () => Tally): SparseKernels {
  const wrapped: Record<string, KernelFn> = {};
  for (const [name, model] of Object.entries(MODELS)) {
    const f = (real as unknown as Record<string, KernelFn>)[name];
    wrapped[name] = (...a: number[]) => {
      const t0 = performance.now();
      const v = f(...a);
      const dt = performance.now() - t0;
      tally().record(() => model(a), dt);
      return v;
    };
  }
  return new Proxy(wrapped, {
    get(target, name) {
      if (typeof name !== 'string') return undefined;
      const f = target[name];
      if (!f) throw new Error(`vcycle-bandwidth: the cycle calls kernel '${name}', which has no byte model in this benchmark; add one to MODELS`);
      return f;
    },
  }) as unknown as SparseKernels;
}

/** The coarsest level's solver with its dense solve timed and counted (Gauss–Seidel sweeps go through the kernels). */
function instrumentedCoarse(coarse: CoarseSolver, tally: () => Tally): CoarseSolver {
  if (coarse.kind === 'gauss-seidel') return coarse;
  const nc = coarse.factor.n, real = coarse.factor;
  const solve = (b: Float64Array, x: Float64Array): void => {
    const t0 = performance.now();
    real.solve(b, x);
    const dt = performance.now() - t0;
    tally().record(() => {
      const t = new Traffic(last, `dense ${coarse.kind} solve (TypeScript)`, nc);
      t.matrixEl += 8 * nc * (nc + 1); t.matrixLn += 8 * nc * (nc + 1);
      return t.vector(b.byteOffset, 8 * nc).vector(x.byteOffset, 8 * nc);
    }, dt);
  };
  return coarse.kind === 'cholesky'
    ? { kind: 'cholesky', factor: { ...coarse.factor, solve } }
    : { kind: 'lu', factor: { ...coarse.factor, solve } };
}

const tallies = { apply: new Tally(), withProduct: new Tally() };
let current = tallies.apply;
const wrappedArena = { ...packed.arena, kernels: instrumented(packed.arena.kernels, () => current) } as Arena;
const counted = wasmCyclePreconditioner({
  ...packed, arena: wrappedArena,
  hierarchy: { ...packed.hierarchy, coarse: instrumentedCoarse(packed.hierarchy.coarse, () => current) },
});
const plainCopy = wasmCyclePreconditioner(packed);

// Vectors in the arenas: the cycle then works on them in place.
const vecs = (p: Preconditioner): { r: Float64Array; z: Float64Array; w: Float64Array } => {
  const [r, z, w] = [p.vector!(n0), p.vector!(n0), p.vector!(n0)];
  for (let i = 0; i < n0; i++) r[i] = Math.sin(i);
  return { r, z, w };
};
const main = vecs(preconditioner), copyVecs = vecs(plainCopy);
const hasProduct = !!preconditioner.withProduct && !!counted.withProduct;

// One counted cycle of each kind.
current = tallies.apply; current.mode = 'count';
counted.apply(copyVecs.r, copyVecs.z);
current.mode = null;
if (hasProduct) {
  current = tallies.withProduct; current.mode = 'count';
  counted.withProduct!.apply(copyVecs.r, copyVecs.z, copyVecs.w);
  current.mode = null;
}

// ---------------------------------------------------------------------------------------------------------------
// Timing. The cycle of amgSetup (the headline figures), then the copy plain and wrapped, all alternating.
const loadBeforeTiming = loads();
const time = (f: () => void): number => { const t0 = performance.now(); f(); return performance.now() - t0; };
const t = { apply: [] as number[], withProduct: [] as number[], copyApply: [] as number[], wrappedApply: [] as number[], copyProduct: [] as number[], wrappedProduct: [] as number[] };
const round = (rep: number | null): void => {
  const keep = (list: number[], v: number): void => { if (rep !== null) list.push(v); };
  keep(t.apply, time(() => preconditioner.apply(main.r, main.z)));
  if (hasProduct) keep(t.withProduct, time(() => preconditioner.withProduct!.apply(main.r, main.z, main.w)));
  keep(t.copyApply, time(() => plainCopy.apply(copyVecs.r, copyVecs.z)));
  current = tallies.apply; current.mode = rep;
  keep(t.wrappedApply, time(() => counted.apply(copyVecs.r, copyVecs.z)));
  current.mode = null;
  if (hasProduct) {
    keep(t.copyProduct, time(() => plainCopy.withProduct!.apply(copyVecs.r, copyVecs.z, copyVecs.w)));
    current = tallies.withProduct; current.mode = rep;
    keep(t.wrappedProduct, time(() => counted.withProduct!.apply(copyVecs.r, copyVecs.z, copyVecs.w)));
    current.mode = null;
  }
};
for (let i = 0; i < WARM; i++) round(null);
for (let i = 0; i < ROUNDS; i++) round(i);
const loadAfterTiming = loads();

const bwAfter = measureBandwidth();
const allBw = [...bwBefore].map(([name, bw]) => ({ name, bw, when: 'before' })).concat([...bwAfter].map(([name, bw]) => ({ name, bw, when: 'after' })));
const fastest = allBw.reduce((a, b) => (b.bw > a.bw ? b : a));
const bw = fastest.bw;
console.log(`after the timings (GB/s): ${[...bwAfter].map(([name, v]) => `${name} ${fmt(v / GB, 2)}`).join('; ')}`);
console.log(`bandwidth taken for the bound: ${fmt(bw / GB, 2)} GB/s (${fastest.name}, ${fastest.when} the timings)`);

// Is it the memory? Three kernels of the finest level, each alone: over the whole level (streamed from memory) and
// over its first PREFIX rows only, repeated (their data then stays in the caches). spmv has no row-to-row recurrence;
// the sweeps do (row i waits for x of the row before it).
const PREFIX = 16384;
const inCache: string[] = [];
{
  const L = levels[0], A = L.A, k = packed.arena.kernels;
  const [b, x, y] = [copyVecs.r.byteOffset, copyVecs.z.byteOffset, copyVecs.w.byteOffset];
  const [rp, ci, va, dp, inv] = [A.rowPtr.byteOffset, A.colIdx.byteOffset, A.values.byteOffset, L.diagPos.byteOffset, L.invDiag.byteOffset];
  const cases: { name: string; call: (n: number) => void; args: (n: number) => number[] }[] = [
    { name: 'spmv', call: (n) => k.spmv(n, rp, ci, va, x, y), args: (n) => [n, rp, ci, va, x, y] },
    { name: 'forwardSweepFromZeroWithResidual', call: (n) => k.forwardSweepFromZeroWithResidual(n, rp, ci, va, dp, inv, b, x, y), args: (n) => [n, rp, ci, va, dp, inv, b, x, y] },
    { name: 'backwardSweep', call: (n) => k.backwardSweep(n, rp, ci, va, dp, inv, b, x), args: (n) => [n, rp, ci, va, dp, inv, b, x] },
  ];
  /** Best of 20 timings of `calls` calls, per call (ms). */
  const bestOf = (f: () => void, calls: number): number => {
    for (let i = 0; i < WARM; i++) f();
    const v: number[] = [];
    for (let i = 0; i < 20; i++) v.push(time(() => { for (let c = 0; c < calls; c++) f(); }) / calls);
    return best(v);
  };
  const n = A.nRows, p = Math.min(PREFIX, n);
  inCache.push(`  (level 0: ${fmt(A.rowPtr[n] / n, 2)} entries per row; its first ${p} rows ${fmt(A.rowPtr[p] / p, 2)})`);
  for (const c of cases) {
    const whole = bestOf(() => c.call(n), 1), part = bestOf(() => c.call(p), 20);
    const bytes = ((t: Traffic): number => t.matrixLn + t.vectorLn)(MODELS[c.name](c.args(n)));
    inCache.push(`  ${c.name.padEnd(34)} whole level ${fmt(1e6 * whole / n, 2)} ns/row (${fmt(bytes / (whole / 1000) / GB, 1)} GB/s), ` +
      `first ${p} rows in the cache ${fmt(1e6 * part / p, 2)} ns/row; at ${fmt(bw / GB, 1)} GB/s its bytes would take ${fmt(1e9 * bytes / bw / n, 2)} ns/row`);
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Report.
console.log(`\nP1 ${m}² squares: ${n0} unknowns; hierarchy (${levels.length} levels, coarsest solved by ${stats.coarseSolver}):`);
console.log('  level        n        nnz(A)  nnz(P to finer)  sweeps  coarse visits  visits per cycle  MB (A+P+diagPos+invDiag)');
const visitsOf = (l: number): number => tallies.apply.total((r) => r.calls, (r) => r.level === l && /^(forwardSweepFromZero|dense)/.test(r.label));
levels.forEach((L, l) => {
  const nnz = L.A.rowPtr[L.A.nRows], nnzP = L.P ? L.P.rowPtr[L.P.nRows] : 0;
  const bytes = 4 * (L.A.nRows + 1) + 12 * nnz + 12 * L.A.nRows + (L.P ? 4 * (L.P.nRows + 1) + 12 * nnzP : 0);
  console.log(`  ${String(l).padStart(5)} ${String(L.A.nRows).padStart(9)} ${String(nnz).padStart(12)} ${String(nnzP).padStart(15)} ` +
    `${String(L.sweeps).padStart(7)} ${String(L.coarseVisits).padStart(14)} ${String(visitsOf(l)).padStart(17)} ${fmt(bytes / MB, 2).padStart(25)}`);
});

function report(kind: 'apply' | 'withProduct', tally: Tally, best_: number, median_: number, copyMedian: number, wrappedMedian: number): { lines: number; elements: number; finest: number } {
  const rows = [...tally.rows.values()].sort((a, b) => a.level - b.level || a.label.localeCompare(b.label));
  const lines = tally.total((r) => r.matrixLn + r.vectorLn), elements = tally.total((r) => r.matrixEl + r.vectorEl);
  const vectorsLn = tally.total((r) => r.vectorLn);
  const rowTime = (r: Row): number => median(r.times);
  const timedSum = tally.total(rowTime);
  console.log(`\n${kind === 'apply' ? 'preconditioner.apply(r, z)' : 'withProduct.apply(r, z, w) (last sweep also writes A·z)'}: ` +
    `${fmt(lines / MB)} MB per cycle in 64-byte lines (${fmt(elements / MB)} MB as elements; vectors ${fmt(100 * vectorsLn / lines)} %)`);
  console.log('  per kernel (level l: the kernels on A_l and the transfers between l and l+1), median over the wrapped cycles:');
  console.log('  level  kernel                                   calls   MB lines  MB elements   ms/cycle   GB/s  time/bound  ns/row');
  for (const r of rows) {
    const ln = r.matrixLn + r.vectorLn, el = r.matrixEl + r.vectorEl, ms = rowTime(r);
    console.log(`  ${String(r.level).padStart(5)}  ${r.label.padEnd(40)} ${String(r.calls).padStart(5)} ${fmt(ln / MB, 2).padStart(10)} ${fmt(el / MB, 2).padStart(12)} ` +
      `${fmt(ms, 3).padStart(10)} ${fmt(ln / (ms / 1000) / GB, 2).padStart(6)} ${fmt(ms / 1000 / (ln / bw), 2).padStart(11)} ${fmt(1e6 * ms / r.rows, 2).padStart(7)}`);
  }
  console.log('  per level:');
  for (let l = 0; l <= last; l++) {
    const keep = (r: Row): boolean => r.level === l;
    const ln = tally.total((r) => r.matrixLn + r.vectorLn, keep), ms = tally.total(rowTime, keep);
    if (ln === 0 && ms === 0) continue;
    console.log(`    level ${l}: ${fmt(ln / MB, 2).padStart(8)} MB (${fmt(100 * ln / lines).padStart(5)} % of the bytes), ${fmt(ms, 2).padStart(7)} ms ` +
      `(${fmt(100 * ms / timedSum).padStart(5)} % of the kernels' time), bound ${fmt(1000 * ln / bw, 2)} ms, time/bound ${fmt(ms / 1000 / (ln / bw), 2)}`);
  }
  const boundMs = 1000 * lines / bw, finest = tally.total((r) => r.matrixLn + r.vectorLn, (r) => r.level === 0);
  console.log(`  bound ${fmt(boundMs, 2)} ms = ${fmt(lines / MB)} MB / ${fmt(bw / GB, 2)} GB/s (as elements: ${fmt(1000 * elements / bw, 2)} ms)`);
  console.log(`  measured (cycle of amgSetup, ${ROUNDS} applications after ${WARM} warm-up): best ${fmt(best_, 2)} ms, median ${fmt(median_, 2)} ms → ` +
    `time/bound ${fmt(best_ / boundMs, 2)} (best), ${fmt(median_ / boundMs, 2)} (median); against the element count ${fmt(best_ / (1000 * elements / bw), 2)} (best)`);
  console.log(`  the copy: plain ${fmt(copyMedian, 2)} ms, wrapped ${fmt(wrappedMedian, 2)} ms (median), its kernels' time summed per row ${fmt(timedSum, 2)} ms ` +
    `(the rest: the cycle's own JavaScript and the timers)`);
  return { lines, elements, finest };
}

const a = report('apply', tallies.apply, best(t.apply), median(t.apply), median(t.copyApply), median(t.wrappedApply));
const p = hasProduct
  ? report('withProduct', tallies.withProduct, best(t.withProduct), median(t.withProduct), median(t.copyProduct), median(t.wrappedProduct))
  : null;
if (!hasProduct) console.log('\nwithProduct is not offered for this matrix (its finest operator dropped round-off entries): not measured');

console.log('\nfinest-level kernels alone (best of 20): streamed from memory against the same code on rows that stay in the cache:');
for (const line of inCache) console.log(line);

const loadAtEnd = loads();
console.log(`\nload average (1/5/15 min): start ${loadAtStart}, before the timings ${loadBeforeTiming}, after them ${loadAfterTiming}, end ${loadAtEnd}`);

const bwNote = `${fastest.name}, best of ${REPS} × 384 MiB, ${fastest.when} the cycle timings; ` +
  `others ${allBw.filter((x) => x !== fastest && x.when === fastest.when).map((x) => `${x.name.replace(/, /, ' ')} ${fmt(x.bw / GB, 1)}`).join(', ')}`;
printFigure({ name: 'single-thread memory bandwidth (STREAM-like triad/copy, fastest)', value: bw / GB, unit: 'GB/s', note: bwNote });
printFigure({ name: `multigrid cycle bytes moved per apply (${n0} P1 unknowns, 64-byte lines)`, value: a.lines / MB, unit: 'MB',
  note: `finest level ${sig(a.finest / MB)} MB; ${sig(a.elements / MB)} MB as elements` });
const boundA = 1000 * a.lines / bw;
printFigure({ name: `multigrid cycle (apply) time / bandwidth bound (${n0} P1 unknowns)`, value: best(t.apply) / boundA, unit: '×', target: '≤ 1.5×',
  met: best(t.apply) / boundA <= 1.5, note: `best ${sig(best(t.apply))} ms, median ${sig(median(t.apply))} ms (×${fmt(median(t.apply) / boundA, 2)}); bound ${sig(boundA)} ms = ${sig(a.lines / MB)} MB / ${fmt(bw / GB, 1)} GB/s` });
if (p) {
  const boundP = 1000 * p.lines / bw;
  printFigure({ name: `multigrid cycle with A·z (withProduct) time / bandwidth bound (${n0} P1 unknowns)`, value: best(t.withProduct) / boundP, unit: '×', target: '≤ 1.5×',
    met: best(t.withProduct) / boundP <= 1.5, note: `best ${sig(best(t.withProduct))} ms, median ${sig(median(t.withProduct))} ms (×${fmt(median(t.withProduct) / boundP, 2)}); bound ${sig(boundP)} ms = ${sig(p.lines / MB)} MB / ${fmt(bw / GB, 1)} GB/s` });
}
