import { join } from 'node:path';
import { mkdirSync } from 'node:fs';
import type { Mesh } from '../mesh/types.ts';
import type { DiscreteField } from '../norms/types.ts';
import type { PerCellErrors } from '../norms/errors.ts';
import { adoptCellMeasures, boundaryStrips, regionErrors, cellMeasures, type RegionErrors } from '../mesh/regions.ts';
import { startedTeam } from '../fem/team/team.ts';
import { sharedMesh } from '../fem/team/mesh.ts';
import { shared } from '../fem/team/shared.ts';
import { taskUrl } from '../files/task-url.ts';
import { SUMMARY_FIELDS, type LocalOrderTaskInput } from './local-order-task.ts';
import { localOrderData, type LocalOrderData } from './local-order-data.ts';
import { adoptPixelOwners, cellDensities, encodeErrorMap, pixelCount, rasterizeCells } from '../mesh/raster.ts';
import type { PixelTaskInput } from './pixel-task.ts';
import type { ParentTaskInput } from './parent-task.ts';
import { DEFAULT_TOLERANCE } from '../analysis/verdict.ts';
import { rawVtuDataBytes, writeVtuInBackground, vertexValues } from '../external/vtk/write.ts';
import { reserveBackgroundWrite } from '../files/background-write.ts';
import { readVtkFile } from '../external/vtk/read.ts';
import { meshFromArrays } from '../mesh/from-arrays.ts';
import { CELL_DIM, type CellKind } from '../mesh/types.ts';
import { levelFolder } from '../external/index.ts';
import { fileStem } from './names.ts';
import type { ErrorMapEntry } from './result.ts';

/** Where the error of one level lives, as a discretization measured it: ∫_K |e|² and ∫_K |∇e|² per cell of the
 *  discrete solution (its first field), the field itself and the exact solution's value, for the files and maps. */
export interface LevelErrorCells {
  perCell: PerCellErrors;
  field: DiscreteField;
  /** u at a point (the first component of a vector field). */
  exact: (x: number, y: number, z: number) => number;
  /** The norm names the per-cell values belong to ('L2' and 'H1semi', or 'L2_u' and 'H1semi_u' for a system). */
  norms: { L2: string; H1semi: string };
  /** The mesh the cells belong to when it is not the level's own (an external code's, read from its VTK file). */
  mesh?: Mesh;
  /** u at the mesh's vertices when the level has it already, evaluated as the error file would (the coefficients of a
   *  P1 interpolant, whose nodes are the mesh's own coordinates): the file takes them instead of evaluating u again
   *  (1M evaluations at 1024² P1 squares). */
  exactAtVertices?: Float64Array;
}

/** What a level keeps of its error cells: the errors per region (small, in the level's row) and, on the finest
 *  level, the maps for the report. */
export interface LevelWhere {
  regions?: RegionErrors;
  maps?: ErrorMapEntry[];
  /** The finest two levels' mesh and ∫_K |e|² per cell, handed to the study (src/study/runner.ts addLevel) for the
   *  local orders; never written (levels may come from other workers, so the pair meets only there). */
  cellErrors?: LevelCellErrors;
}

/** A level's mesh with its ∫_K |e|² per cell, for the local orders of the pair of finest levels; the finest one's
 *  may carry the pair's local orders being computed already (localOrdersAhead). */
export interface LevelCellErrors { mesh: Mesh; L2: Float64Array; norm: string; h: number; ahead?: PendingLocalOrders }

/** The coarser level of the finest pair with what its local orders are judged against (runner.ts hands it to the
 *  finest level: LevelEnvironment.localOrderPair). */
export interface LocalOrderPair { coarse: LevelCellErrors; expected: number | null; tolerance: number }

/** The local orders of a pair of levels, being computed on another thread. */
export interface PendingLocalOrders {
  pair: LocalOrderPair;
  fine: Mesh;
  /** The orders and summary (null: not nested): the worker's, or (when no worker computed them) computed here. */
  take(): LocalOrderData | null;
}

const LOCAL_ORDER_TASK = taskUrl(import.meta.url, 'local-order-task');

const PIXEL_TASK = taskUrl(import.meta.url, 'pixel-task');
const pixelsAhead = new WeakMap<Mesh, { settle(): boolean; owner: Int32Array }>();

/** Starts locating the pixels of a mesh's map (pixelOwners) on the cell team's worker: for the finest level's maps and
 *  the local-order map of the level before it, at the finest level's start (level.ts), when the worker is idle while
 *  this thread builds the matrix pattern; adoptPixelsAhead takes the result before the maps are drawn (about 45 ms of
 *  this thread for 2M triangles, 15 ms for 524k). The same function on the same arrays, so the same pixels. Does
 *  nothing without a running team or for a 1D mesh. */
export function pixelOwnersAhead(mesh: Mesh): void {
  const team = startedTeam();
  const n = pixelCount(mesh);
  if (!team || team.workers === 0 || n === 0 || pixelsAhead.has(mesh)) return;
  const input: PixelTaskInput = { mesh: sharedMesh(mesh), owner: new Int32Array(new SharedArrayBuffer(4 * n)) };
  const job = team.background(PIXEL_TASK, input);
  pixelsAhead.set(mesh, { settle: () => job.settle(), owner: input.owner });
}

/** The pixels located ahead for this mesh (pixelOwnersAhead), handed to pixelOwners; without them (none started, or
 *  no worker took the job) pixelOwners locates them itself when a map is drawn. */
export function adoptPixelsAhead(mesh: Mesh): void {
  const pending = pixelsAhead.get(mesh);
  if (!pending) return;
  pixelsAhead.delete(mesh);
  if (pending.settle()) adoptPixelOwners(mesh, pending.owner);
}

const PARENT_TASK = taskUrl(import.meta.url, 'parent-task');
const parentsAhead = new WeakMap<Mesh, { coarse: Mesh; settle(): boolean; parent: Int32Array; nested: Int32Array; fineMeasures: Float64Array }>();

/** Starts locating the finest level's cells in the coarser level's (parentCells, for the pair's local orders) on the
 *  cell team's worker at the finest level's start (level.ts): the worker is idle while this thread sets up that
 *  level's multigrid (about 0.35 s at 1024² P1 squares), and the location took 0.14–0.2 s of the local-order task
 *  that the run waited for at its end. takeParentsAhead hands the result to localOrdersAhead. Does nothing without a
 *  running team. */
export function parentCellsAhead(coarse: Mesh, fine: Mesh): void {
  const team = startedTeam();
  if (!team || team.workers === 0 || parentsAhead.has(fine)) return;
  const input: ParentTaskInput = {
    coarse: sharedMesh(coarse), fine: sharedMesh(fine),
    parent: new Int32Array(new SharedArrayBuffer(4 * fine.nCells)), nested: new Int32Array(new SharedArrayBuffer(4)),
    fineMeasures: new Float64Array(new SharedArrayBuffer(8 * fine.nCells)),
  };
  const job = team.background(PARENT_TASK, input);
  parentsAhead.set(fine, { coarse, settle: () => job.settle(), parent: input.parent, nested: input.nested, fineMeasures: input.fineMeasures });
}

/** The parents located ahead for this pair (parentCellsAhead), or null (none started, another pair, or no worker took
 *  the job: then nobody will); the fine mesh's cell measures, computed with them, are adopted (cellMeasures). */
function takeParentsAhead(coarse: Mesh, fine: Mesh): { parent: Int32Array; nested: boolean } | null {
  const pending = parentsAhead.get(fine);
  if (!pending) return null;
  parentsAhead.delete(fine);
  if (pending.coarse !== coarse || !pending.settle()) return null;
  adoptCellMeasures(fine, pending.fineMeasures);
  return { parent: pending.parent, nested: pending.nested[0] === 1 };
}

/** Whether the local orders of a pair of levels are taken: the fine level's cells are smaller (a ladder in Δt keeps
 *  one mesh). */
export function pairRefines(coarseH: number, fineH: number): boolean {
  return coarseH > fineH * (1 + 1e-9);
}

/**
 * Runs the local-order task once on the second finest level against itself, on the cell team's worker, and throws
 * the result away, so that the worker's first run of this code is not the finest pair's. Cold, the worker took
 * 0.6–0.7 s for the 1024² P1 ladder's pair, longer than the main thread has other work (0.35–0.5 s) while the libuv
 * threads write the error file beside it; warm, half that (measured). Called once that level's errors are integrated
 * (level.ts): the worker, idle otherwise, runs it while the main thread writes that level's error file and maps.
 */
export function warmLocalOrders(mesh: Mesh, L2: Float64Array): void {
  const team = startedTeam();
  if (!team || team.workers === 0) return;
  team.background(LOCAL_ORDER_TASK, localOrderTaskInput(mesh, mesh, L2, L2, 2, 2, 0.1, false, null));
}

/** The local-order task's input: the meshes and errors in shared memory, the coarse mesh's measures (this thread has
 *  them from that level's files) and, with `fineMeasures`, the fine mesh's (this thread needs them next for the error
 *  file's densities), shared instead of computed twice; its outputs. */
function localOrderTaskInput(
  coarse: Mesh, fine: Mesh, coarseL2: Float64Array, fineL2: Float64Array, ratio: number, expected: number | null, tolerance: number, fineMeasures: boolean,
  nest: LocalOrderTaskInput['nest'],
): LocalOrderTaskInput {
  return {
    coarse: sharedMesh(coarse), fine: sharedMesh(fine), coarseL2: shared(coarseL2), fineL2: shared(fineL2),
    coarseMeasures: shared(cellMeasures(coarse)), fineMeasures: fineMeasures ? shared(cellMeasures(fine)) : null, nest,
    ratio, expected: expected ?? Number.NaN, tolerance,
    orders: new Float64Array(new SharedArrayBuffer(8 * coarse.nCells)), numbers: new Float64Array(new SharedArrayBuffer(8 * (2 + SUMMARY_FIELDS.length))),
  };
}

/**
 * Starts computing the local orders of the finest pair (localOrderData: locating the finest cells in the coarser
 * level's, the orders, their quantiles) on the cell team's worker, which is idle while this thread writes the finest
 * level's error file and maps and analyses the study (about 0.3 s at 1024² P1 squares); localOrderMap then takes
 * the result instead of computing it (about 0.2 s on this thread for 2M triangles in 524k). The same functions on
 * the same arrays, so the same bits. Null when no team is running (small studies: the team starts with the first
 * large level).
 */
export function localOrdersAhead(pair: LocalOrderPair, fine: Mesh, fineL2: Float64Array, fineH: number): PendingLocalOrders | null {
  const team = startedTeam();
  if (!team || team.workers === 0) return null;
  const { coarse } = pair;
  const nest = takeParentsAhead(coarse.mesh, fine);
  const input = localOrderTaskInput(coarse.mesh, fine, coarse.L2, fineL2, coarse.h / fineH, pair.expected, pair.tolerance, true, nest);
  const job = team.background(LOCAL_ORDER_TASK, input);
  const here = (): LocalOrderData | null => localOrderData(coarse.mesh, fine, coarse.L2, fineL2, input.ratio, pair.expected, pair.tolerance, nest ?? undefined);
  return {
    pair, fine,
    take() {
      if (!job.settle()) return here();
      const n = input.numbers;
      if (n[0] !== 1) return null;
      if (n[1] !== 1) return { orders: input.orders, summary: null };
      const [covered, p05, median, p95, below, above] = SUMMARY_FIELDS.map((_, i) => n[2 + i]!);
      const share = (v: number): number | null => (pair.expected === null ? null : v);
      return { orders: input.orders, summary: { covered: covered!, p05: p05!, median: median!, p95: p95!, below: share(below!), above: share(above!), expected: pair.expected, tolerance: pair.tolerance } };
    },
  };
}

export interface WhereOptions {
  study: string;
  index: number;
  /** Levels the study runs (the finest two are written and mapped). */
  total: number;
  h: number;
  /** The run's output folder, or undefined to write no files (tests through runStudy, for example). */
  out?: string;
  /** The finest pair's local orders being computed (localOrdersAhead), kept with the finest level's cell errors. */
  ahead?: PendingLocalOrders;
}

/**
 * Turns a level's error cells into the study's record of where the error lives:
 * - the errors in each boundary strip and the interior (src/mesh/regions.ts), on every level with boundary tags;
 * - on the finest two levels, `level-k/errors.vtu` (the mesh, u_h and u at the vertices, u − u_h, and the cell
 *   densities √(∫_K e² / |K|) and √(∫_K |∇e|² / |K|));
 * - on the finest level, the density maps of both norms;
 * - on the finest two, their mesh and errors per cell for the local orders (localOrderMap, once both are in).
 */
export function recordWhere(mesh: Mesh, cells: LevelErrorCells, o: WhereOptions): LevelWhere {
  const out: LevelWhere = {};
  const { perCell } = cells;
  const finestTwo = o.index >= o.total - 2, finest = o.index === o.total - 1;
  // The densities per cell, once for the file and the maps; the file first, so that its background write (about
  // 115 MB at 1024² P1 squares, which the run waits for at its end) starts as early as it can.
  const densities = finestTwo && (o.out !== undefined || finest) ? { L2: cellDensities(mesh, perCell.L2), H1semi: cellDensities(mesh, perCell.H1semi) } : null;
  if (densities && o.out !== undefined) writeLevelVtu(mesh, cells, densities, join(o.out, fileStem(o.study)), o.index);
  if (mesh.tagNames.length > 0 && mesh.dim > 1) out.regions = regionErrors(mesh, boundaryStrips(mesh), perCell.L2, perCell.H1semi);
  if (!finestTwo) return out;
  if (densities && finest) {
    adoptPixelsAhead(mesh);
    out.maps = ([[cells.norms.L2, densities.L2], [cells.norms.H1semi, densities.H1semi]] as const)
      .map(([norm, values]): ErrorMapEntry => ({ level: o.index, norm, what: 'density', map: encodeErrorMap(rasterizeCells(mesh, values)) }));
  }
  out.cellErrors = { mesh, L2: perCell.L2, norm: cells.norms.L2, h: o.h, ...(o.ahead ? { ahead: o.ahead } : {}) };
  return out;
}

/** The local order of each cell of the coarser of the two finest levels, from its error and its children's on the
 *  finest (log(e_K / e_children) / log(h_coarse / h_fine)), as a map for the report with its summary (quantiles and
 *  the shares of the area off the expected order's band ±tolerance); null when the meshes are the same (a ladder in
 *  Δt) or not nested. */
export function localOrderMap(
  coarse: LevelCellErrors, fine: LevelCellErrors, coarseIndex: number, expected: number | null = null, tolerance = DEFAULT_TOLERANCE,
): ErrorMapEntry | null {
  if (!pairRefines(coarse.h, fine.h)) return null;
  const ahead = fine.ahead;
  const same = ahead && ahead.pair.coarse === coarse && ahead.fine === fine.mesh && ahead.pair.expected === expected && ahead.pair.tolerance === tolerance;
  const data = same ? ahead.take() : localOrderData(coarse.mesh, fine.mesh, coarse.L2, fine.L2, coarse.h / fine.h, expected, tolerance);
  if (!data) return null;
  const { orders, summary } = data;
  adoptPixelsAhead(coarse.mesh);
  return { level: coarseIndex, norm: coarse.norm, what: 'local-order', map: encodeErrorMap(rasterizeCells(coarse.mesh, orders)), ...(summary ? { summary } : {}) };
}

/** The linear VTK cell types writeVtu writes, by id (vtkCellType.h: VTK_LINE 3, VTK_TRIANGLE 5, VTK_QUAD 9,
 *  VTK_TETRA 10, VTK_HEXAHEDRON 12), in rungs's vertex order (see src/external/vtk/write.ts). */
const WRITTEN_KINDS: Readonly<Record<number, CellKind>> = { 3: 'interval', 5: 'triangle', 9: 'quadrilateral', 10: 'tetrahedron', 12: 'hexahedron' };

/**
 * A level's mesh and ∫_K |e|² per cell read back from the `errors.vtu` an earlier run wrote for it (writeLevelVtu),
 * for a level that `--resume` reuses: its cell errors were not kept with its record, and the local orders need them.
 * ∫_K e² = density² · |K| (the file's `<norm>_density` array, the first whose name starts with 'L2'), equal to what
 * was written up to two roundings. Null, with the reason, when the file is missing or not one rungs wrote.
 */
export function readLevelCellErrors(studyDir: string, index: number, h: number): { cells: LevelCellErrors } | { missing: string } {
  const file = join(levelFolder(studyDir, index), 'errors.vtu');
  let grid;
  try {
    grid = readVtkFile(file);
  } catch (err) {
    return { missing: `${file} could not be read (${err instanceof Error ? err.message : String(err)})` };
  }
  const density = grid.cellData.find((a) => a.name.startsWith('L2') && a.name.endsWith('_density') && a.components === 1);
  const kind = grid.nCells > 0 ? WRITTEN_KINDS[grid.types[0]!] : undefined;
  if (!density || !kind || grid.types.some((t) => WRITTEN_KINDS[t] !== kind)) return { missing: `${file} is not an errors.vtu rungs wrote (no L2 density per cell, or cells of another kind)` };
  const mesh = meshFromArrays({ cellKind: kind, coords: vtkCoords(grid.points, grid.nPoints, kind), cells: grid.connectivity }, file);
  const measure = cellMeasures(mesh);
  const L2 = new Float64Array(mesh.nCells);
  for (let c = 0; c < L2.length; c++) L2[c] = density.values[c]! * density.values[c]! * measure[c]!;
  return { cells: { mesh, L2, norm: density.name.slice(0, -'_density'.length), h } };
}

/** The first dim of VTK's three coordinates per point. */
function vtkCoords(points: Float64Array, n: number, kind: CellKind): Float64Array {
  const dim = CELL_DIM[kind];
  const out = new Float64Array(n * dim);
  for (let v = 0; v < n; v++) for (let d = 0; d < dim; d++) out[v * dim + d] = points[3 * v + d]!;
  return out;
}

/** Error files of meshes above this many cells are written raw (appended bytes), smaller ones as ASCII text. */
const RAW_ERROR_FILE_CELLS = 200_000;

/** The point arrays (u_h, u, error) and cell arrays (the two densities) writeLevelVtu writes, for a scalar u_h. */
const ERROR_FILE_ARRAYS = { point: [1, 1, 1], cell: [1, 1] } as const;

/**
 * Reserves the space of a level's error file (writeLevelVtu) at the level's start, while its solution is still to be
 * computed (src/files/background-write.ts, reserveBackgroundWrite: fresh page-cache pages cost about 2.5 ms per MB on
 * the machines rungs is measured on, and the file's write at the end of the 1024² P1 level waited 0.2–0.35 s for
 * them). For raw files only (the large ones); the size is the appended data's for a scalar u_h, no more than the file
 * will hold (its XML text comes on top, a vector u_h writes more), so that the write need not cut the file.
 */
export function reserveLevelVtu(mesh: Mesh, studyDir: string, index: number): void {
  if (mesh.nCells <= RAW_ERROR_FILE_CELLS) return;
  const dir = levelFolder(studyDir, index);
  mkdirSync(dir, { recursive: true });
  reserveBackgroundWrite(join(dir, 'errors.vtu'), rawVtuDataBytes(mesh, ERROR_FILE_ARRAYS.point, ERROR_FILE_ARRAYS.cell));
}

/** `<study>/level-k/errors.vtu`, ASCII (exact round trip) below 200k cells, raw appended bytes above (ASCII 4.2 s,
 *  base64 1.4 s on 2M cells; raw: docs/performance-history.md). Written in the background (the kernel's copy of
 *  128 MB takes about 0.4 s of a core): whoever runs the level settles it (settleBackgroundWrites) before relying on
 *  the file. `densities` are the cell densities of the L2 and H1-seminorm errors (cellDensities). */
function writeLevelVtu(mesh: Mesh, cells: LevelErrorCells, densities: { L2: Float64Array; H1semi: Float64Array }, studyDir: string, index: number): void {
  const dir = levelFolder(studyDir, index);
  mkdirSync(dir, { recursive: true });
  const uh = vertexValues(cells.field);
  const nv = mesh.coords.length / mesh.dim;
  const known = cells.exactAtVertices && cells.exactAtVertices.length === nv ? cells.exactAtVertices : null;
  const u = known ?? new Float64Array(nv), err = new Float64Array(nv);
  for (let v = 0; v < nv; v++) {
    if (!known) {
      const x = mesh.coords[v * mesh.dim]!, y = mesh.dim > 1 ? mesh.coords[v * mesh.dim + 1]! : 0, z = mesh.dim > 2 ? mesh.coords[v * mesh.dim + 2]! : 0;
      u[v] = cells.exact(x, y, z);
    }
    err[v] = u[v]! - uh[v * (uh.length / nv)]!;
  }
  const components = uh.length / nv;
  writeVtuInBackground(join(dir, 'errors.vtu'), {
    mesh,
    pointData: { u_h: components === 1 ? uh : { values: uh, components }, u: u, error: err },
    cellData: { [`${cells.norms.L2}_density`]: densities.L2, [`${cells.norms.H1semi}_density`]: densities.H1semi },
    format: mesh.nCells > RAW_ERROR_FILE_CELLS ? 'raw' : 'ascii',
  });
}

/** Halvings of the distance over which singularityTest watches the gradient grow, and the growth it needs. */
const SINGULAR_HALVINGS = 4;
const SINGULAR_GROWTH = 1.5;

/**
 * Whether an exact solution is singular at a point: its gradient grows toward it. Along 8 directions in 2D (14 in
 * 3D: the axes and the cube's diagonals), |∇u| is taken at distances h, h/2, …, h/2^SINGULAR_HALVINGS from the point;
 * the solution is singular there when along some direction those values are finite and the last is at least
 * SINGULAR_GROWTH times the first. A smooth u has |∇u(p + r d)| → |∇u(p)|, so the ratio tends to 1 (1 + O(h)); a
 * gradient singularity |∇u| ∼ r^(α−1), 0 < α < 1 (u ∼ r^(2/3) at a re-entrant corner of angle 3π/2: Grisvard 1985),
 * grows by 2^((1−α)·SINGULAR_HALVINGS), which is 2.5 for α = 2/3 and still 1.5 for α = 0.85. Singularities of
 * higher derivatives only (u ∼ r^α with α > 1) are not detected. Directions that leave the domain are harmless: the
 * growth is measured toward the point either way.
 */
export function singularityTest(grad: (x: number, y: number, z: number, out: Float64Array) => void, dim: number, h: number): (at: number[]) => boolean {
  const g = new Float64Array(dim);
  const dirs: number[][] = dim === 1 ? [[1], [-1]]
    : dim === 2 ? Array.from({ length: 8 }, (_, k) => [Math.cos((k * Math.PI) / 4), Math.sin((k * Math.PI) / 4)])
      : [[1, 0, 0], [-1, 0, 0], [0, 1, 0], [0, -1, 0], [0, 0, 1], [0, 0, -1],
        ...[-1, 1].flatMap((a) => [-1, 1].flatMap((b) => [-1, 1].map((c) => [a, b, c].map((x) => x / Math.sqrt(3)))))];
  const norm = (p: number[]): number => {
    grad(p[0]!, p[1] ?? 0, p[2] ?? 0, g);
    let s = 0;
    for (let d = 0; d < dim; d++) s += g[d]! * g[d]!;
    return Math.sqrt(s);
  };
  return (at) => dirs.some((d) => {
    const near = norm(at.map((x, i) => x + (h / 2 ** SINGULAR_HALVINGS) * d[i]!));
    const far = norm(at.map((x, i) => x + h * d[i]!));
    return Number.isFinite(near) && Number.isFinite(far) && far > 0 && near >= SINGULAR_GROWTH * far;
  });
}
