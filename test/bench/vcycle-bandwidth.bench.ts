/** The multigrid cycle against the single-thread memory-bandwidth bound of the bytes it must move, on one thread and
 *  on two.
 *  Matrix: the P1 stiffness matrix rungs assembles for the unit square cut into m×m squares of right-diagonal
 *  triangles (default m = 1024: 1.05M unknowns), Dirichlet dofs eliminated, built as kernels.bench.ts builds it.
 *  Two hierarchies of it, built alike: amgSetup(A, { symmetric: true }), the WebAssembly cycle (wasm-cycle.ts) on
 *  this thread alone, and amgSetup(A, { symmetric: true, team }) with the cell team at 2 threads (setTeamThreads(2),
 *  cellTeam().warm(): fem/team/team.ts), whose seam-ordered levels (amg/seams.ts: rows cut into SEAM_PARTS parts,
 *  every part's interior swept first, then the seams on this thread) have the interiors swept by the worker and this
 *  thread together, each claiming the next part as it gets free, and the prolongation to them run as parts of rows
 *  the same way. The two give the same bits (checked here after the timings: one more cycle of each kind on the
 *  same vector, on 1 thread, on 2 and in the copy below).
 *  Run: npx tsx test/bench/vcycle-bandwidth.bench.ts [m]
 *
 *  Bandwidth. A STREAM-like triad a[i] = b[i] + s·c[i] and copy a[i] = b[i] on three arrays of 2^24 doubles
 *  (128 MiB each, at least 4× the last-level cache: STREAM's sizing rule, from memory), written as plain Float64Array loops and
 *  as a small WebAssembly module (scalar and 2-lane SIMD); best of REPS timed repetitions after a warm-up, measured
 *  before and after the cycle timings, on this thread alone. Bytes are counted by STREAM's rule: triad 24 bytes per
 *  element (two arrays read, one written), copy 16 (McCalpin 1995, STREAM: Sustainable Memory Bandwidth in High
 *  Performance Computers; from memory). Like STREAM this counts a written byte once, although without non-temporal
 *  stores (WebAssembly has none) the hardware also reads the line it writes; the cycle's writes are counted the same
 *  way, so the ratio is like for like. The bandwidth taken is the fastest of all these runs (the highest figure gives
 *  the tightest bound). Both thread counts are held to this single-thread bound (the issue's target: a cycle within
 *  1.5× of it), so on two threads a ratio below 1 is possible.
 *
 *  Bytes of one cycle (the model). The passes are not listed here by hand: the cycle of wasm-cycle.ts itself is run
 *  on a copy of the hierarchy (packHierarchy) with its kernels wrapped, so every kernel call it makes, on every level
 *  and every W-cycle visit, is counted (and timed) from its arguments; a kernel without a model below stops the run.
 *  The copy runs without a team: a worker thread calls its own instance of the kernels, which no wrapper here can
 *  see, and without a team the cycle makes the same calls in the same order on this thread (every interior part in
 *  turn), except that the prolongation to a seam-ordered level is one multiplyAdd over all its rows rather than one
 *  per run of rows (the same entries; a few row pointers fewer).
 *  Per call: the CSR arrays read (4 bytes per row pointer, 4 per column index, 8 per value; diagPos 4 and invDiag 8
 *  per row for the sweeps) plus every vector read and every vector written, 8 bytes per entry each (an entry read
 *  and written counts 16). A vector the kernel gathers from (x[colIdx[k]]) counts once per pass, over the rows of the
 *  call: its reuse within a pass is assumed to hit the cache. Nothing counts as cached from one pass (kernel call) to
 *  the next, so on the coarse levels, which fit in the caches, the bound can exceed the true minimum (there
 *  time/bound < 1 is possible).
 *    forwardSweepFromZero(+WithResidual): row pointers n, diagPos n, the strictly lower part of colIdx and values,
 *      invDiag, b read; x written (its gathered entries were written earlier in the same pass); r written.
 *    forwardSweep, backwardSweep (+WithResidual: r written; +WithProduct: w written): the whole CSR, diagPos,
 *      invDiag, b read; x read and written.
 *    residual: the whole CSR, b and x read, r written.  restrictByTranspose: the whole P, r read, b_c written
 *      (its scatter assumed to hit the cache).  multiplyAdd (prolongation): the whole P, x_c read, x read and
 *      written.  addInto: x read and written, dx read.  dense solve (coarsest level, TypeScript): the lower triangle
 *      of the n×n factor read twice (forward and backward substitution), b read, x written (the same in both counts).
 *    The seam-ordered sweeps, on rows first … last − 1 (n = last − first), labelled by what the rows are (an
 *    interior of the level's layout or a seam):
 *    zeroRows (a seam's x before the interiors): x written for its rows.
 *    forwardSweepFromZeroWithResidualRows (an interior): as forwardSweepFromZeroWithResidual on its rows: row
 *      pointers n, diagPos, the strictly lower part of those rows' colIdx and values, invDiag, b read; x and r
 *      written; its scatter into r hits its own rows written just before, and entries below its first row (the
 *      seam rows of its part), which are read and written, each distinct entry once.
 *    seamSweepWithResidualRows (a seam): row pointers n + 1, diagPos, invDiag, its rows of colIdx and values whole,
 *      b read, x read and written, r written for its rows; it scatters into r over the whole row, and the columns
 *      outside its own rows (the neighbouring interiors, written by an earlier pass) are read and written, each
 *      distinct entry once.
 *    backwardSweepRows (a seam or an interior): as backwardSweep on its rows (row pointers n + 1).
 *    backwardSweepWithProductRows (a seam or an interior): as backwardSweepRows, w written for its rows, and its
 *      scatter into the columns outside its rows (above a seam: the interior over it; below an interior: the seam
 *      under it) read and written, each distinct entry once; the scatter into its own rows hits entries the same
 *      call wrote just before.
 *  Two counts: "elements", the bytes the kernels load and store, and "lines", the 64-byte cache lines those touch
 *  (what the memory system actually moves). They differ for the sweeps from zero, which read only the lower part
 *  of each row: a P1 row is shorter than two lines, so nearly every line of colIdx and values is touched anyway.
 *  The bound is lines / bandwidth; the element count says what a layout that stored the lower triangle apart could
 *  save. GB = 1e9 bytes, MB = 1e6.
 *
 *  Time: best and median of ROUNDS rounds after a warm-up, each round: apply (the preconditioner) on 1 thread and
 *  on 2, withProduct.apply (the cycle CG runs: its last backward sweep also writes A·z) on 1 and on 2, then the
 *  copy plain and wrapped, with vectors from preconditioner.vector(n) so that nothing is staged. Each against the
 *  single-thread bound of its bytes. The worker's share: the cell team's partsElsewhere over the timed 2-thread
 *  cycles against the parts handed to the team in them (counted by a pass-through around its run). Where the time
 *  goes: the wrapped cycle on the copy, each kernel call timed (the per-level table, with ns per row; its total
 *  against the unwrapped cycle on the same copy shows the cost of the timers). Last, finest-level kernels alone
 *  (those the cycle runs there), over the whole level (streamed from memory) and over its first 16384 rows repeated
 *  (in the cache): what a kernel costs when memory is not the limit.
 *  Figures (printFigure): the bandwidth; the bytes of one apply; time/bound (best of the rounds) of apply on 2 threads
 *  (the headline, target ≤ 1.5) and on 1, then of withProduct on 2 and on 1. */
import { readFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import initWabt from 'wabt';
import { manufacture } from '../../src/equation/index.ts';
import { assembleSystem } from '../../src/fem/assemble/system.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { cellTeam, setTeamThreads } from '../../src/fem/team/team.ts';
import { packHierarchy } from '../../src/linalg/amg/pack.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import type { AmgLevel, CoarseSolver } from '../../src/linalg/amg/types.ts';
import { wasmCyclePreconditioner } from '../../src/linalg/amg/wasm-cycle.ts';
import type { Arena } from '../../src/linalg/kernels/arena.ts';
import type { SparseKernels } from '../../src/linalg/kernels/sparse-kernels.ts';
import type { Csr, PartTeam, Preconditioner } from '../../src/linalg/types.ts';
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

// The same hierarchy with the cell team at 2 threads. The team is passed through a wrapper that counts the parts
// handed to it (the worker's share: partsElsewhere against these).
const THREADS = 2;
setTeamThreads(THREADS);
const team = cellTeam();
team.warm();
let partsHanded = 0;
const countingTeam: PartTeam = {
  get workers() { return team.workers; },
  run(task, input, parts, here, options) { partsHanded += parts; return team.run(task, input, parts, here, options); },
};
const teamSetup = amgSetup(sys.A, { symmetric: true, team: countingTeam });
const teamPreconditioner = teamSetup.preconditioner;
if (teamSetup.stats.kernels !== 'wasm' || !teamPreconditioner.vector) {
  process.stderr.write('vcycle-bandwidth.bench.ts: the multigrid cycle with the team did not get a WebAssembly arena; nothing to measure\n');
  process.exit(1);
}
if (team.workers < THREADS - 1) console.log(`note: the cell team has ${team.workers} worker(s), not ${THREADS - 1}: the "2-thread" cycle runs on fewer threads`);

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
  /** A's diagonal positions (null for a prolongator). */
  diagPos: Int32Array | null;
  /** The interiors of A's seam layout as 'first,last' (empty for a level in the natural order and a prolongator). */
  interiors: Set<string>;
}

/** Line bytes of the rows' segments [rowPtr[i], diagPos[i]), rows first … last − 1, of an array of `size`-byte
 *  entries at `base`. */
function lowerLines(A: Csr, diagPos: Int32Array, base: number, size: number, first = 0, last = A.nRows): number {
  let lines = 0, lastLine = -1;
  for (let i = first; i < last; i++) {
    const lo = A.rowPtr[i], hi = diagPos[i];
    if (hi <= lo) continue;
    const start = Math.floor((base + lo * size) / LINE), end = Math.floor((base + hi * size - 1) / LINE);
    lines += end - Math.max(start, lastLine + 1) + 1;
    lastLine = end;
  }
  return lines * LINE;
}

const matrices = new Map<number, MatrixInfo>(); // keyed by rowPtr's byte offset
const vectorLevel = new Map<number, number>(); // a level's x and dx by byte offset (addInto, zeroRows)
levels.forEach((L: AmgLevel, l) => {
  const A = L.A, nnz = A.rowPtr[A.nRows];
  let lower = 0;
  for (let i = 0; i < A.nRows; i++) lower += L.diagPos[i] - A.rowPtr[i];
  const interiors = new Set<string>();
  if (L.seams) for (let p = 0; p < L.seams.interiors.length; p += 2) interiors.add(`${L.seams.interiors[p]},${L.seams.interiors[p + 1]}`);
  matrices.set(A.rowPtr.byteOffset, {
    level: l, coarse: null, csr: A, nnz, lower, diagPos: L.diagPos, interiors,
    lowerCiLines: lowerLines(A, L.diagPos, A.colIdx.byteOffset, 4), lowerVaLines: lowerLines(A, L.diagPos, A.values.byteOffset, 8),
  });
  if (L.P) matrices.set(L.P.rowPtr.byteOffset, { level: l - 1, coarse: l, csr: L.P, nnz: L.P.rowPtr[L.P.nRows], lower: 0, lowerCiLines: 0, lowerVaLines: 0, diagPos: null, interiors: new Set() });
  vectorLevel.set(L.x.byteOffset, l);
  if (L.dx.length > 0) vectorLevel.set(L.dx.byteOffset, l);
});

/** Bytes of one kernel call: [elements, lines] for the matrix data and for the vectors. */
class Traffic {
  matrixEl = 0; matrixLn = 0; vectorEl = 0; vectorLn = 0;
  constructor(public level: number, public label: string, public rows: number) {}
  matrix(ptr: number, bytes: number): this { this.matrixEl += bytes; this.matrixLn += lineBytes(ptr, bytes); return this; }
  vector(ptr: number, bytes: number): this { this.vectorEl += bytes; this.vectorLn += lineBytes(ptr, bytes); return this; }
  /** Entries at scattered places, each read and written: `entries` distinct entries in `lines` distinct lines. */
  scattered(entries: number, lines: number): this { this.vectorEl += 16 * entries; this.vectorLn += 2 * LINE * lines; return this; }
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

// The seam-ordered sweeps: rows first … last − 1 of the matrix at rp (absolute row indices, whole-level arrays).
/** What rows first … last − 1 of M are: one part's interior, or (anything else) a seam. */
const rowsKind = (M: MatrixInfo, first: number, last: number): string => (M.interiors.has(`${first},${last}`) ? 'interiors' : 'seams');
/** The level whose x (or dx) a cycle vector is; any other vector is the caller's, on the finest level. */
const levelOfX = (x: number): number => vectorLevel.get(x) ?? 0;
/** Row pointers (n + 1 when the kernel reads row ends from them), diagPos and invDiag of rows first … last − 1. */
function rowsSmoother(t: Traffic, M: MatrixInfo, first: number, last: number, rowEnds: boolean, dp: number, inv: number): Traffic {
  const n = last - first;
  return t.matrix(M.csr.rowPtr.byteOffset + 4 * first, n > 0 ? 4 * (n + (rowEnds ? 1 : 0)) : 0).matrix(dp + 4 * first, 4 * n).matrix(inv + 8 * first, 8 * n);
}
/** colIdx and values of rows first … last − 1, whole. */
function rowsEntries(t: Traffic, M: MatrixInfo, first: number, last: number): Traffic {
  const lo = M.csr.rowPtr[first], hi = M.csr.rowPtr[last];
  return t.matrix(M.csr.colIdx.byteOffset + 4 * lo, 4 * (hi - lo)).matrix(M.csr.values.byteOffset + 8 * lo, 8 * (hi - lo));
}
/** Distinct entries, and distinct 64-byte lines of a vector at `base`, of the columns k of rows first … last − 1 that
 *  `keep` accepts. */
function distinctColumns(M: MatrixInfo, first: number, last: number, base: number, keep: (col: number, k: number, i: number) => boolean): { entries: number; lines: number } {
  const { rowPtr, colIdx } = M.csr;
  const cols = new Set<number>(), lines = new Set<number>();
  for (let i = first; i < last; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const c = colIdx[k];
      if (!keep(c, k, i)) continue;
      cols.add(c);
      lines.add(Math.floor((base + 8 * c) / LINE));
    }
  }
  return { entries: cols.size, lines: lines.size };
}

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
  zeroRows: ([first, last, x]) => new Traffic(levelOfX(x), 'zeroRows (seams)', last - first).vector(x + 8 * first, 8 * (last - first)),
  forwardSweepFromZeroWithResidualRows: ([first, last, rp, ci, va, dp, inv, b, x, r]) => {
    const M = info(rp), n = last - first;
    const t = rowsSmoother(new Traffic(M.level, `forwardSweepFromZeroWithResidualRows (${rowsKind(M, first, last)})`, n), M, first, last, false, dp, inv);
    const dpos = M.diagPos!;
    for (let i = first; i < last; i++) t.matrixEl += 12 * (dpos[i] - M.csr.rowPtr[i]);
    t.matrixLn += lowerLines(M.csr, dpos, ci, 4, first, last) + lowerLines(M.csr, dpos, va, 8, first, last);
    // Its scatter along the lower part: into its own rows (written before in the same call), and below its first row.
    const out = distinctColumns(M, first, last, r, (c, k, i) => k < dpos[i] && c < first);
    return t.vector(b + 8 * first, 8 * n).vector(x + 8 * first, 8 * n).vector(r + 8 * first, 8 * n).scattered(out.entries, out.lines);
  },
  seamSweepWithResidualRows: ([first, last, rp, , , dp, inv, b, x, r]) => {
    const M = info(rp), n = last - first;
    const t = rowsEntries(rowsSmoother(new Traffic(M.level, `seamSweepWithResidualRows (${rowsKind(M, first, last)})`, n), M, first, last, true, dp, inv), M, first, last);
    const out = distinctColumns(M, first, last, r, (c) => c < first || c >= last);
    return t.vector(b + 8 * first, 8 * n).vector(x + 8 * first, 8 * n).vector(x + 8 * first, 8 * n).vector(r + 8 * first, 8 * n)
      .scattered(out.entries, out.lines);
  },
  backwardSweepRows: ([first, last, rp, , , dp, inv, b, x]) => {
    const M = info(rp), n = last - first;
    return rowsEntries(rowsSmoother(new Traffic(M.level, `backwardSweepRows (${rowsKind(M, first, last)})`, n), M, first, last, true, dp, inv), M, first, last)
      .vector(b + 8 * first, 8 * n).vector(x + 8 * first, 8 * n).vector(x + 8 * first, 8 * n);
  },
  backwardSweepWithProductRows: ([first, last, low, rp, , , dp, inv, b, x, w]) => {
    const M = info(rp), n = last - first, dpos = M.diagPos!;
    const t = rowsEntries(rowsSmoother(new Traffic(M.level, `backwardSweepWithProductRows (${rowsKind(M, first, last)})`, n), M, first, last, true, dp, inv), M, first, last);
    // Its scatter: the upper part of each row, and the lower columns below `low`; those outside its own rows.
    const out = distinctColumns(M, first, last, w, (c, k, i) => (k > dpos[i] || c < low) && k !== dpos[i] && (c < first || c >= last));
    return t.vector(b + 8 * first, 8 * n).vector(x + 8 * first, 8 * n).vector(x + 8 * first, 8 * n).vector(w + 8 * first, 8 * n)
      .scattered(out.entries, out.lines);
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
/** The arena's kernels, each call timed and handed to the tally; a kernel without a byte model stops the run. The
 *  models are pure functions of the arguments, kept per argument list (the timed rounds repeat the counted calls). */
function instrumented(real: SparseKernels, tally: () => Tally): SparseKernels {
  const wrapped: Record<string, KernelFn> = {};
  const known = new Map<string, Traffic>();
  for (const [name, model] of Object.entries(MODELS)) {
    const f = (real as unknown as Record<string, KernelFn>)[name];
    const traffic = (a: number[]): Traffic => {
      const key = `${name}(${a.join(',')})`;
      let t = known.get(key);
      if (!t) { t = model(a); known.set(key, t); }
      return t;
    };
    wrapped[name] = (...a: number[]) => {
      const t0 = performance.now();
      const v = f(...a);
      const dt = performance.now() - t0;
      tally().record(() => traffic(a), dt);
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
// No team: the wrapper sees only this thread's calls (see the header).
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
const main = vecs(preconditioner), teamVecs = vecs(teamPreconditioner), copyVecs = vecs(plainCopy);
const hasProduct = !!preconditioner.withProduct && !!teamPreconditioner.withProduct && !!counted.withProduct;

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
// Timing. The cycles of amgSetup on 1 and 2 threads (the headline figures), then the copy plain and wrapped, all
// alternating.
const time = (f: () => void): number => { const t0 = performance.now(); f(); return performance.now() - t0; };
// The worker loads the seam task at the first job that names it; until then this thread takes every part. Cycles on
// 2 threads until the worker has taken a part (bounded; only when some level is seam-ordered), so that the warm-up
// rounds below start warm.
{
  const elsewhere0 = team.partsElsewhere, until = performance.now() + 30_000;
  const shared = levels.some((L) => L.seams);
  while (shared && team.workers > 0 && team.partsElsewhere === elsewhere0 && performance.now() < until) teamPreconditioner.apply(teamVecs.r, teamVecs.z);
}
const loadBeforeTiming = loads();
const t = {
  apply1: [] as number[], apply2: [] as number[], product1: [] as number[], product2: [] as number[],
  copyApply: [] as number[], wrappedApply: [] as number[], copyProduct: [] as number[], wrappedProduct: [] as number[],
};
/** Over the timed 2-thread cycles of each kind: parts handed to the team, and parts a worker computed. */
const share = { apply: { handed: 0, elsewhere: 0 }, withProduct: { handed: 0, elsewhere: 0 } };
const round = (rep: number | null): void => {
  const keep = (list: number[], v: number): void => { if (rep !== null) list.push(v); };
  const onTeam = (list: number[], s: { handed: number; elsewhere: number }, f: () => void): void => {
    const [h0, e0] = [partsHanded, team.partsElsewhere];
    keep(list, time(f));
    if (rep !== null) { s.handed += partsHanded - h0; s.elsewhere += team.partsElsewhere - e0; }
  };
  keep(t.apply1, time(() => preconditioner.apply(main.r, main.z)));
  onTeam(t.apply2, share.apply, () => teamPreconditioner.apply(teamVecs.r, teamVecs.z));
  if (hasProduct) {
    keep(t.product1, time(() => preconditioner.withProduct!.apply(main.r, main.z, main.w)));
    onTeam(t.product2, share.withProduct, () => teamPreconditioner.withProduct!.apply(teamVecs.r, teamVecs.z, teamVecs.w));
  }
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

// The same bits on 1 thread, on 2 and in the copy: one more cycle of each kind on the same r.
const sameBits = (u: Float64Array, v: Float64Array): boolean => {
  for (let i = 0; i < u.length; i++) if (!Object.is(u[i], v[i])) return false;
  return true;
};
const bitsChecks: string[] = [];
{
  const [h0, e0] = [partsHanded, team.partsElsewhere];
  preconditioner.apply(main.r, main.z);
  teamPreconditioner.apply(teamVecs.r, teamVecs.z);
  plainCopy.apply(copyVecs.r, copyVecs.z);
  bitsChecks.push(`apply: 2 threads ${sameBits(main.z, teamVecs.z) ? 'same' : 'DIFFERENT'}, copy ${sameBits(main.z, copyVecs.z) ? 'same' : 'DIFFERENT'}`);
  if (hasProduct) {
    const bx = [preconditioner.withProduct!.apply(main.r, main.z, main.w), teamPreconditioner.withProduct!.apply(teamVecs.r, teamVecs.z, teamVecs.w),
      plainCopy.withProduct!.apply(copyVecs.r, copyVecs.z, copyVecs.w)];
    const same = (u: { z: Float64Array; w: Float64Array }, b: number): string =>
      (sameBits(main.z, u.z) && sameBits(main.w, u.w) && Object.is(bx[0], b) ? 'same' : 'DIFFERENT');
    bitsChecks.push(`withProduct (z, A·z, r·z): 2 threads ${same(teamVecs, bx[1])}, copy ${same(copyVecs, bx[2])}`);
  }
  bitsChecks.push(`(the worker computed ${team.partsElsewhere - e0} of the ${partsHanded - h0} parts of these 2-thread cycles)`);
}

const bwAfter = measureBandwidth();
const allBw = [...bwBefore].map(([name, bw]) => ({ name, bw, when: 'before' })).concat([...bwAfter].map(([name, bw]) => ({ name, bw, when: 'after' })));
const fastest = allBw.reduce((a, b) => (b.bw > a.bw ? b : a));
const bw = fastest.bw;
console.log(`after the timings (GB/s): ${[...bwAfter].map(([name, v]) => `${name} ${fmt(v / GB, 2)}`).join('; ')}`);
console.log(`bandwidth taken for the bound: ${fmt(bw / GB, 2)} GB/s (${fastest.name}, ${fastest.when} the timings)`);

// Is it the memory? Kernels of the finest level, each alone: over the whole level (streamed from memory) and over
// its first PREFIX rows only, repeated (their data then stays in the caches). spmv has no row-to-row recurrence;
// the sweeps do (row i waits for x of the row before it). The seam-ordered kernels, when the finest level is
// seam-ordered, are run here over all its rows (or the prefix) in one call.
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
  if (L.seams) {
    cases.push(
      { name: 'forwardSweepFromZeroWithResidualRows', call: (n) => k.forwardSweepFromZeroWithResidualRows(0, n, rp, ci, va, dp, inv, b, x, y), args: (n) => [0, n, rp, ci, va, dp, inv, b, x, y] },
      { name: 'backwardSweepRows', call: (n) => k.backwardSweepRows(0, n, rp, ci, va, dp, inv, b, x), args: (n) => [0, n, rp, ci, va, dp, inv, b, x] },
    );
  }
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
    inCache.push(`  ${c.name.padEnd(38)} whole level ${fmt(1e6 * whole / n, 2)} ns/row (${fmt(bytes / (whole / 1000) / GB, 1)} GB/s), ` +
      `first ${p} rows in the cache ${fmt(1e6 * part / p, 2)} ns/row; at ${fmt(bw / GB, 1)} GB/s its bytes would take ${fmt(1e9 * bytes / bw / n, 2)} ns/row`);
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Report.
console.log(`\nP1 ${m}² squares: ${n0} unknowns; hierarchy (${levels.length} levels, coarsest solved by ${stats.coarseSolver}):`);
console.log('  level        n        nnz(A)  nnz(P to finer)  sweeps  coarse visits  visits per cycle  MB (A+P+diagPos+invDiag)  interiors');
/** Visits of level l in one counted cycle: its sweeps from zero (natural order), its interiors' sweeps from zero per
 *  part (seam order), or the coarsest level's dense solves. */
const visitsOf = (l: number): number => {
  const seams = levels[l].seams;
  const fromZero = tallies.apply.total((r) => r.calls, (r) => r.level === l && /^(forwardSweepFromZero(WithResidual)?|dense .*)$/.test(r.label));
  const interiors = tallies.apply.total((r) => r.calls, (r) => r.level === l && r.label.startsWith('forwardSweepFromZeroWithResidualRows'));
  return fromZero + (seams ? interiors / (seams.interiors.length / 2) : 0);
};
levels.forEach((L, l) => {
  const nnz = L.A.rowPtr[L.A.nRows], nnzP = L.P ? L.P.rowPtr[L.P.nRows] : 0;
  const bytes = 4 * (L.A.nRows + 1) + 12 * nnz + 12 * L.A.nRows + (L.P ? 4 * (L.P.nRows + 1) + 12 * nnzP : 0);
  const interior = L.seams ? `${fmt(100 * L.seams.interiorRows / L.A.nRows, 2)} %` : '-';
  console.log(`  ${String(l).padStart(5)} ${String(L.A.nRows).padStart(9)} ${String(nnz).padStart(12)} ${String(nnzP).padStart(15)} ` +
    `${String(L.sweeps).padStart(7)} ${String(L.coarseVisits).padStart(14)} ${String(visitsOf(l)).padStart(17)} ${fmt(bytes / MB, 2).padStart(25)} ${interior.padStart(10)}`);
});
const seamLevels = levels.map((L, l) => ({ l, L })).filter(({ L }) => L.seams);
const seamSummary = seamLevels.length === 0
  ? 'no level is seam-ordered (the team has nothing to share)'
  : `${seamLevels.length} of ${levels.length} levels seam-ordered (${seamLevels.map(({ l, L }) =>
    `level ${l}: ${L.seams!.interiors.length / 2} parts, interiors ${fmt(100 * L.seams!.interiorRows / L.A.nRows, 2)} % of ${L.A.nRows} rows`).join('; ')})`;
console.log(`  ${seamSummary}`);

interface Timings { one: number[]; two: number[]; copy: number[]; wrapped: number[]; share: { handed: number; elsewhere: number } }
interface Summary { lines: number; elements: number; finest: number; bound: number }
function report(kind: 'apply' | 'withProduct', tally: Tally, tm: Timings): Summary {
  const rows = [...tally.rows.values()].sort((a, b) => a.level - b.level || a.label.localeCompare(b.label));
  const lines = tally.total((r) => r.matrixLn + r.vectorLn), elements = tally.total((r) => r.matrixEl + r.vectorEl);
  const vectorsLn = tally.total((r) => r.vectorLn);
  const rowTime = (r: Row): number => median(r.times);
  const timedSum = tally.total(rowTime);
  console.log(`\n${kind === 'apply' ? 'preconditioner.apply(r, z)' : 'withProduct.apply(r, z, w) (last sweep also writes A·z)'}: ` +
    `${fmt(lines / MB)} MB per cycle in 64-byte lines (${fmt(elements / MB)} MB as elements; vectors ${fmt(100 * vectorsLn / lines)} %)`);
  console.log('  per kernel (level l: the kernels on A_l and the transfers between l and l+1), median over the wrapped cycles (1 thread):');
  console.log(`  level  ${'kernel'.padEnd(50)} calls   MB lines  MB elements   ms/cycle   GB/s  time/bound  ns/row`);
  for (const r of rows) {
    const ln = r.matrixLn + r.vectorLn, el = r.matrixEl + r.vectorEl, ms = rowTime(r);
    console.log(`  ${String(r.level).padStart(5)}  ${r.label.padEnd(50)} ${String(r.calls).padStart(5)} ${fmt(ln / MB, 2).padStart(10)} ${fmt(el / MB, 2).padStart(12)} ` +
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
  const measured = (label: string, v: number[]): void => console.log(`  measured, ${label}: best ${fmt(best(v), 2)} ms, median ${fmt(median(v), 2)} ms → ` +
    `time/bound ${fmt(best(v) / boundMs, 2)} (best), ${fmt(median(v) / boundMs, 2)} (median); against the element count ${fmt(best(v) / (1000 * elements / bw), 2)} (best)`);
  console.log(`  the cycles of amgSetup, ${ROUNDS} applications each after ${WARM} warm-up, alternating:`);
  measured('1 thread ', tm.one);
  measured(`${THREADS} threads`, tm.two);
  const { handed, elsewhere } = tm.share;
  console.log(`  on ${THREADS} threads: best ${fmt(best(tm.one) / best(tm.two), 2)}× as fast as on 1 (median ${fmt(median(tm.one) / median(tm.two), 2)}×); ` +
    `the worker computed ${elsewhere} of the ${handed} parts handed to the team (${handed > 0 ? fmt(100 * elsewhere / handed) : '-'} %)`);
  console.log(`  the copy (1 thread): plain ${fmt(median(tm.copy), 2)} ms, wrapped ${fmt(median(tm.wrapped), 2)} ms (median), its kernels' time summed per row ${fmt(timedSum, 2)} ms ` +
    `(the rest: the cycle's own JavaScript and the timers)`);
  return { lines, elements, finest, bound: boundMs };
}

const a = report('apply', tallies.apply, { one: t.apply1, two: t.apply2, copy: t.copyApply, wrapped: t.wrappedApply, share: share.apply });
const p = hasProduct
  ? report('withProduct', tallies.withProduct, { one: t.product1, two: t.product2, copy: t.copyProduct, wrapped: t.wrappedProduct, share: share.withProduct })
  : null;
if (!hasProduct) console.log('\nwithProduct is not offered for this matrix (its finest operator dropped round-off entries): not measured');

console.log(`\nthe same bits (after the timings, one more cycle on the same r): ${bitsChecks.join('; ')}`);

console.log('\nfinest-level kernels alone (best of 20): streamed from memory against the same code on rows that stay in the cache:');
for (const line of inCache) console.log(line);

const loadAtEnd = loads();
console.log(`\nload average (1/5/15 min): start ${loadAtStart}, before the timings ${loadBeforeTiming}, after them ${loadAfterTiming}, end ${loadAtEnd}`);

const bwNote = `${fastest.name}, best of ${REPS} × 384 MiB, ${fastest.when} the cycle timings; ` +
  `others ${allBw.filter((x) => x !== fastest && x.when === fastest.when).map((x) => `${x.name.replace(/, /, ' ')} ${fmt(x.bw / GB, 1)}`).join(', ')}`;
printFigure({ name: 'single-thread memory bandwidth (STREAM-like triad/copy, fastest)', value: bw / GB, unit: 'GB/s', note: bwNote });
printFigure({ name: `multigrid cycle bytes moved per apply (${n0} P1 unknowns, 64-byte lines)`, value: a.lines / MB, unit: 'MB',
  note: `finest level ${sig(a.finest / MB)} MB; ${sig(a.elements / MB)} MB as elements; ${seamSummary}` });
/** The issue's target: a cycle within this factor of the single-thread bandwidth bound of its bytes. */
const TARGET = 1.5;
const ratioFigure = (what: string, threads: number, v: number[], s: Summary, sh: { handed: number; elsewhere: number } | null): void => {
  const ratio = best(v) / s.bound;
  const worker = sh ? `; worker took ${sh.handed > 0 ? fmt(100 * sh.elsewhere / sh.handed) : '-'} % of ${sh.handed} parts` : '';
  printFigure({
    name: `multigrid cycle (${what}) on ${threads} thread${threads > 1 ? 's' : ''}, time / single-thread bandwidth bound (${n0} P1 unknowns)`,
    value: ratio, unit: '×', target: `≤ ${TARGET}`, met: ratio <= TARGET,
    note: `best ${sig(best(v))} ms, median ${sig(median(v))} ms (×${fmt(median(v) / s.bound, 2)}); bound ${sig(s.bound)} ms = ${sig(s.lines / MB)} MB / ${fmt(bw / GB, 1)} GB/s${worker}`,
  });
};
ratioFigure('apply', THREADS, t.apply2, a, share.apply);
ratioFigure('apply', 1, t.apply1, a, null);
if (p) {
  ratioFigure('withProduct, with A·z', THREADS, t.product2, p, share.withProduct);
  ratioFigure('withProduct, with A·z', 1, t.product1, p, null);
}
