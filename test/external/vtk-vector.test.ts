// VTK files of systems: point arrays with several components (legacy VECTORS and SCALARS name type n, VTU
// NumberOfComponents), read into the fields of a system on one mesh (gridToFields): vector fields, a 2D vector
// written with three components, a pressure of degree 1 on the corners of quadratic cells; and the bad input.
import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { parseVtkText } from '../../src/external/vtk/read.ts';
import { gridToField, gridToFields, VALUE_ROUND_OFF, type VtkFieldRequest } from '../../src/external/vtk/to-field.ts';
import type { LevelRef } from '../../src/external/where.ts';
import { fieldErrors } from '../../src/norms/field-errors.ts';
import { errorNorms } from '../../src/norms/errors.ts';
import type { ExactField } from '../../src/norms/types.ts';
import { kuhnCubeMesh } from './cube-mesh.ts';
import { nodalGrid, type NodalGrid } from './vtk-writers.ts';

interface PointArray { name: string; components: number; values: number[]; vectors?: boolean }

/** Legacy ASCII VTK of a grid with several point arrays: 3-component arrays as VECTORS (unless vectors: false),
 *  others as SCALARS name double n. */
function legacyText(g: NodalGrid, arrays: PointArray[]): string {
  const out = ['# vtk DataFile Version 3.0', 'system', 'ASCII', 'DATASET UNSTRUCTURED_GRID', `POINTS ${g.points.length} double`];
  out.push(...g.points.map((p) => p.join(' ')));
  out.push(`CELLS ${g.cells.length} ${g.cells.reduce((s, c) => s + c.length + 1, 0)}`, ...g.cells.map((c) => `${c.length} ${c.join(' ')}`));
  out.push(`CELL_TYPES ${g.cells.length}`, ...g.cells.map(() => String(g.type)), `POINT_DATA ${g.points.length}`);
  for (const a of arrays) {
    out.push(a.components === 3 && a.vectors !== false ? `VECTORS ${a.name} double` : `SCALARS ${a.name} double ${a.components}`);
    if (!(a.components === 3 && a.vectors !== false)) out.push('LOOKUP_TABLE default');
    for (let p = 0; p < g.points.length; p++) out.push(a.values.slice(p * a.components, (p + 1) * a.components).join(' '));
  }
  return out.join('\n') + '\n';
}

/** VTK XML with one DataArray per point array (NumberOfComponents as given). */
function vtuText(g: NodalGrid, arrays: PointArray[]): string {
  let end = 0;
  const ends = g.cells.map((c) => (end += c.length));
  return [
    '<?xml version="1.0"?>', '<VTKFile type="UnstructuredGrid" version="1.0">', '<UnstructuredGrid>',
    `<Piece NumberOfPoints="${g.points.length}" NumberOfCells="${g.cells.length}">`, '<PointData>',
    ...arrays.flatMap((a) => [`<DataArray type="Float64" Name="${a.name}" NumberOfComponents="${a.components}" format="ascii">`, a.values.join(' '), '</DataArray>']),
    '</PointData>', '<Points>', '<DataArray type="Float64" NumberOfComponents="3" format="ascii">', g.points.map((p) => p.join(' ')).join('\n'), '</DataArray>', '</Points>',
    '<Cells>', '<DataArray type="Int64" Name="connectivity" format="ascii">', g.cells.map((c) => c.join(' ')).join('\n'), '</DataArray>',
    '<DataArray type="Int64" Name="offsets" format="ascii">', ends.join(' '), '</DataArray>',
    '<DataArray type="UInt8" Name="types" format="ascii">', g.cells.map(() => String(g.type)).join(' '), '</DataArray>', '</Cells>',
    '</Piece>', '</UnstructuredGrid>', '</VTKFile>',
  ].join('\n') + '\n';
}

/** Values of f at every point of the grid, `components` per point (f writes into out). */
function sample(g: NodalGrid, components: number, f: (x: number, y: number, z: number, out: number[]) => void): number[] {
  const out: number[] = [];
  const buf = [0, 0, 0];
  for (const [x, y, z] of g.points) { buf.fill(0); f(x!, y!, z!, buf); out.push(...buf.slice(0, components)); }
  return out;
}

const level: LevelRef = { study: 'glaze-ext', index: 1, n: 4 };
const square = (n: number) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' });
const stokesFields: VtkFieldRequest[] = [{ name: 'u', kind: 'vector', array: 'velocity' }, { name: 'p', kind: 'scalar', array: 'pressure', degree: 1 }];

/** An exact field with its gradient, from closed forms. */
const exactField = (components: number, value: (x: number, y: number, z: number, o: Float64Array) => void, grad: (x: number, y: number, z: number, o: Float64Array) => void): ExactField =>
  ({ components, value, grad });

// u = (x² + y, xy − y²) lies in P2 and p = 1 + 2x − 3y in P1: their errors in those spaces are zero (closed form).
const quadU = (x: number, y: number, _z: number, o: number[] | Float64Array) => { o[0] = x * x + y; o[1] = x * y - y * y; };
const quadUExact = exactField(2, quadU, (x, y, _z, g) => { g[0] = 2 * x; g[1] = 1; g[2] = y; g[3] = x - 2 * y; });
const linP = (x: number, y: number) => 1 + 2 * x - 3 * y;
const linPExact = exactField(1, (x, y, _z, o) => { o[0] = linP(x, y); }, (_x, _y, _z, g) => { g[0] = 2; g[1] = -3; });

function refused(run: () => unknown): RungsInputError {
  try { run(); } catch (err) { expect(err).toBeInstanceOf(RungsInputError); return err as RungsInputError; }
  throw new Error('expected a RungsInputError');
}

describe('the readers keep point arrays with several components', () => {
  const g = nodalGrid(square(1), 1, () => 0);
  const vel = sample(g, 3, (x, y, _z, o) => { o[0] = x + 0.25; o[1] = 0.5 - y; o[2] = 0; });
  it('legacy VECTORS as three components and SCALARS name type 2 as two, in the order written', () => {
    const text = legacyText(g, [{ name: 'velocity', components: 3, values: vel }, { name: 'shear', components: 2, values: [1, 2, 3, 4, 5, 6, 7, 8] }]);
    const grid = parseVtkText(text, 'solution.vtk');
    expect(grid.pointData.map((a) => [a.name, a.components])).toEqual([['velocity', 3], ['shear', 2]]);
    expect(Array.from(grid.pointData[0]!.values)).toEqual(vel);
    expect(Array.from(grid.pointData[1]!.values)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
  });
  it('VECTORS of CELL_DATA are skipped, and a VECTORS section cut short is refused naming it', () => {
    const cellData = legacyText(g, [{ name: 'velocity', components: 3, values: vel }]) + 'CELL_DATA 2\nVECTORS flux double\n1 0 0\n0 1 0\n';
    expect(parseVtkText(cellData, 'solution.vtk').pointData.map((a) => a.name)).toEqual(['velocity']);
    const cut = legacyText(g, [{ name: 'velocity', components: 3, values: vel }]).split('\n').slice(0, -3).join('\n') + '\n';
    expect(() => parseVtkText(cut, 'solution.vtk')).toThrow(/solution\.vtk line \d+: .*VECTORS velocity/);
  });
  it('VTU DataArrays with NumberOfComponents 2 and 3', () => {
    const text = vtuText(g, [{ name: 'velocity', components: 3, values: vel }, { name: 'v2', components: 2, values: sample(g, 2, (x, y, _z, o) => { o[0] = x; o[1] = y; }) }]);
    const grid = parseVtkText(text, 'solution.vtu');
    expect(grid.pointData.map((a) => [a.name, a.components])).toEqual([['velocity', 3], ['v2', 2]]);
    expect(Array.from(grid.pointData[0]!.values)).toEqual(vel);
  });
});

describe('gridToFields: the fields of a system on one mesh', () => {
  const mesh = square(3);
  const g = nodalGrid(mesh, 2, () => 0);
  const velocity3 = sample(g, 3, (x, y, z, o) => { quadU(x, y, z, o); o[2] = 0; });
  const pressure = sample(g, 1, (x, y, _z, o) => { o[0] = linP(x, y); });

  it.each(['vtk', 'vtu'])('P2 velocity (three components, z = 0) and the P1 pressure at every node reproduce fields of P2 × P1 exactly (%s)', (kind) => {
    const arrays = [{ name: 'velocity', components: 3, values: velocity3 }, { name: 'pressure', components: 1, values: pressure }];
    const text = kind === 'vtk' ? legacyText(g, arrays) : vtuText(g, arrays);
    const v = gridToFields(parseVtkText(text, `solution.${kind}`), { fields: stokesFields, degree: 2 });
    const [u, p] = v.fields;
    expect([u!.components, u!.degree, u!.fromCorners, p!.components, p!.degree, p!.fromCorners]).toEqual([2, 2, false, 1, 1, true]);
    // P2 nodes of a 3 × 3 square mesh: (2·3 + 1)² = 49; P1 nodes: 16; unknowns 2·49 + 16.
    expect([u!.space.nDofs, p!.space.nDofs, v.dofs]).toEqual([49, 16, 2 * 49 + 16]);
    // Closed form: u ∈ P2², p ∈ P1, so every error is zero up to round-off (common practice, no source).
    const [eu] = fieldErrors([u!.field], quadUExact, { divergence: true });
    const [ep] = fieldErrors([p!.field], linPExact);
    for (const e of [eu!.L2, eu!.H1semi, eu!.div!, eu!.maxNodal, ep!.L2, ep!.H1semi]) expect(e).toBeLessThan(1e-13);
  });

  it('a vector field\'s errors are those of its components read one by one (L2² and H1² add over components, by definition)', () => {
    const fx = (x: number, y: number) => Math.sin(Math.PI * x) * y * y, fy = (x: number, y: number) => x * Math.cos(y);
    const exact = exactField(2, (x, y, _z, o) => { o[0] = fx(x, y); o[1] = fy(x, y); }, (x, y, _z, o) => {
      o[0] = Math.PI * Math.cos(Math.PI * x) * y * y; o[1] = 2 * Math.sin(Math.PI * x) * y; o[2] = Math.cos(y); o[3] = -x * Math.sin(y);
    });
    const arrays = [
      { name: 'velocity', components: 3, values: sample(g, 3, (x, y, _z, o) => { o[0] = fx(x, y); o[1] = fy(x, y); }) },
      { name: 'ux', components: 1, values: sample(g, 1, (x, y, _z, o) => { o[0] = fx(x, y); }) },
      { name: 'uy', components: 1, values: sample(g, 1, (x, y, _z, o) => { o[0] = fy(x, y); }) },
    ];
    const grid = parseVtkText(legacyText(g, arrays), 'solution.vtk');
    const [ev] = fieldErrors([gridToFields(grid, { fields: [{ name: 'u', kind: 'vector', array: 'velocity' }] }).fields[0]!.field], exact);
    const ex = errorNorms(gridToField(grid, { field: 'ux' }).field, { u: fx, grad: (x, y, _z, o) => { o[0] = Math.PI * Math.cos(Math.PI * x) * y * y; o[1] = 2 * Math.sin(Math.PI * x) * y; } });
    const ey = errorNorms(gridToField(grid, { field: 'uy' }).field, { u: fy, grad: (x, y, _z, o) => { o[0] = Math.cos(y); o[1] = -x * Math.sin(y); } });
    expect(Math.abs(ev!.L2 - Math.hypot(ex.L2, ey.L2))).toBeLessThan(1e-14 * ev!.L2 + 1e-300);
    expect(Math.abs(ev!.H1semi - Math.hypot(ex.H1semi, ey.H1semi))).toBeLessThan(1e-13 * ev!.H1semi);
  });

  it('a pressure taken from the corners of P2 cells is the P1 field of the same corners written on linear cells', () => {
    const pf = (x: number, y: number) => Math.cos(Math.PI * x) * Math.cos(Math.PI * y);
    const exact = exactField(1, (x, y, _z, o) => { o[0] = pf(x, y); }, (x, y, _z, o) => { o[0] = -Math.PI * Math.sin(Math.PI * x) * Math.cos(Math.PI * y); o[1] = -Math.PI * Math.cos(Math.PI * x) * Math.sin(Math.PI * y); });
    // The P1 interpolant at every node of the quadratic cells: a mid-edge point holds the average of its edge's corners.
    const linear = nodalGrid(mesh, 1, (x, y) => pf(x, y));
    const corners = new Map(linear.points.map((p, i) => [p.join(','), linear.values[i]!]));
    const atNodes = g.points.map((p) => corners.get(p.join(',')) ?? Number.NaN);
    for (const c of g.cells) for (const [k, a, b] of [[3, 0, 1], [4, 1, 2], [5, 2, 0]] as const) atNodes[c[k]!] = 0.5 * (atNodes[c[a]!]! + atNodes[c[b]!]!);
    const v = gridToFields(parseVtkText(legacyText(g, [{ name: 'velocity', components: 3, values: velocity3 }, { name: 'pressure', components: 1, values: atNodes }]), 's.vtk'), { fields: stokesFields });
    const p1 = gridToFields(parseVtkText(legacyText(linear, [{ name: 'pressure', components: 1, values: linear.values }]), 'p1.vtk'), { fields: [{ name: 'p', kind: 'scalar' }] });
    const [a] = fieldErrors([v.fields[1]!.field], exact);
    const [b] = fieldErrors([p1.fields[0]!.field], exact);
    // One function, two files: the same integrals to round-off (common practice, no source).
    expect(Math.abs(a!.L2 - b!.L2)).toBeLessThan(1e-14);
    expect(Math.abs(a!.H1semi - b!.H1semi)).toBeLessThan(1e-13);
  });

  it('P2 tetrahedra: a three-component velocity in P2³ and a P1 pressure from the corners, reproduced exactly', () => {
    const tet: Mesh = kuhnCubeMesh(2);
    const gt = nodalGrid(tet, 2, () => 0);
    const f = (x: number, y: number, z: number, o: number[] | Float64Array) => { o[0] = x * y; o[1] = y * z - x; o[2] = z * z; };
    const lp = (x: number, y: number, z: number) => 2 - x + y + 4 * z;
    const v = gridToFields(parseVtkText(vtuText(gt, [
      { name: 'velocity', components: 3, values: sample(gt, 3, f) },
      { name: 'pressure', components: 1, values: sample(gt, 1, (x, y, z, o) => { o[0] = lp(x, y, z); }) },
    ]), 'brick.vtu'), { fields: stokesFields, degree: 2 });
    const [eu] = fieldErrors([v.fields[0]!.field], exactField(3, f, (x, y, z, gr) => { gr.fill(0); gr[0] = y; gr[1] = x; gr[3] = -1; gr[4] = z; gr[5] = y; gr[8] = 2 * z; }), { divergence: true });
    const [ep] = fieldErrors([v.fields[1]!.field], exactField(1, (x, y, z, o) => { o[0] = lp(x, y, z); }, (_x, _y, _z, gr) => { gr[0] = -1; gr[1] = 1; gr[2] = 4; }));
    // Closed form: (xy, yz − x, z²) ∈ P2³ and 2 − x + y + 4z ∈ P1, so the errors vanish up to round-off (common practice, no source).
    for (const e of [eu!.L2, eu!.H1semi, eu!.div!, ep!.L2, ep!.H1semi]) expect(e).toBeLessThan(1e-13);
  });

  it('cells written with the opposite orientation give the same fields (mid nodes following their edges)', () => {
    const flipped = nodalGrid(mesh, 2, () => 0, new Set([0, 3, 4, 9]));
    const arrays = (gg: NodalGrid) => [{ name: 'velocity', components: 3, values: sample(gg, 3, (x, y, z, o) => { o[0] = Math.exp(x) * y; o[1] = Math.sin(3 * y); o[2] = 0; }) },
      { name: 'pressure', components: 1, values: sample(gg, 1, (x, y, _z, o) => { o[0] = linP(x, y); }) }];
    const exact = exactField(2, (x, y, _z, o) => { o[0] = Math.exp(x) * y; o[1] = Math.sin(3 * y); }, (x, y, _z, o) => { o[0] = Math.exp(x) * y; o[1] = Math.exp(x); o[2] = 0; o[3] = 3 * Math.cos(3 * y); });
    const read = (gg: NodalGrid) => fieldErrors([gridToFields(parseVtkText(legacyText(gg, arrays(gg)), 'f.vtk'), { fields: stokesFields }).fields[0]!.field], exact)[0]!;
    // The same nodal values on the same cells, listed the other way round: one function, the same integrals to
    // round-off (common practice, no source).
    const [a, b] = [read(g), read(flipped)];
    expect(Math.abs(a.L2 - b.L2)).toBeLessThan(1e-14 * a.L2);
    expect(Math.abs(a.H1semi - b.H1semi)).toBeLessThan(1e-13 * a.H1semi);
  });

  it('a field named like its array needs no name; two components in 2D are read as they are', () => {
    const v = gridToFields(parseVtkText(vtuText(g, [{ name: 'u', components: 2, values: sample(g, 2, quadU) }]), 'u.vtu'), { fields: [{ name: 'u', kind: 'vector' }] });
    expect(v.fields[0]!.array).toBe('u');
    expect(fieldErrors([v.fields[0]!.field], quadUExact)[0]!.L2).toBeLessThan(1e-13);
  });

  it('a third component at round-off (below VALUE_ROUND_OFF of the largest in-plane value) is accepted', () => {
    const noisy = velocity3.map((v, i) => (i % 3 === 2 ? 0.5 * VALUE_ROUND_OFF * 2 : v)); // |u| reaches 2 on the square
    expect(() => gridToFields(parseVtkText(legacyText(g, [{ name: 'velocity', components: 3, values: noisy }, { name: 'pressure', components: 1, values: pressure }]), 'n.vtk'), { fields: stokesFields })).not.toThrow();
  });
});

describe('bad input of systems: every message names the level, the file, the array and what would be valid', () => {
  const mesh = square(2);
  const g = nodalGrid(mesh, 2, () => 0);
  const velocity3 = sample(g, 3, (x, y, z, o) => { quadU(x, y, z, o); o[2] = 0; });
  const pressure = sample(g, 1, (x, y, _z, o) => { o[0] = linP(x, y); });
  const file = 'out/level-2/solution.vtk';
  const read = (arrays: PointArray[], fields: VtkFieldRequest[] = stokesFields, degree?: number, grid = g) =>
    refused(() => gridToFields(parseVtkText(legacyText(grid, arrays), file, level), { fields, degree, level })).message;
  const start = new RegExp(`^study 'glaze-ext' level 2 \\(n = 4\\): ${file.replace(/[./]/g, '\\$&')} line \\d+: `);

  it('a missing array, named or found by the field\'s name', () => {
    const m = read([{ name: 'velocity', components: 3, values: velocity3 }]);
    expect(m).toMatch(start);
    expect(m).toMatch(/no point data named 'pressure' for field p \(scalar\); the file has 'velocity' \(3 components\)/);
    const m2 = read([{ name: 'vel', components: 3, values: velocity3 }, { name: 'pressure', components: 1, values: pressure }], [{ name: 'u', kind: 'vector' }, { name: 'p', kind: 'scalar', array: 'pressure', degree: 1 }]);
    expect(m2).toMatch(/no point data named 'u' for field u \(a vector of this 2-dimensional mesh\); the file has 'vel' \(3 components\), 'pressure': name its array with fields: \{ u: '<array>' \}/);
  });

  it('the wrong number of components: a scalar array for a vector, a vector for the pressure, two components in 3D', () => {
    expect(read([{ name: 'velocity', components: 1, values: pressure }, { name: 'pressure', components: 1, values: pressure }]))
      .toMatch(/point data 'velocity' has 1 component, but field u \(a vector of this 2-dimensional mesh\) on VTK_QUADRATIC_TRIANGLE cells needs 2 components, or 3 with the third zero/);
    expect(read([{ name: 'velocity', components: 3, values: velocity3 }, { name: 'pressure', components: 3, values: velocity3 }]))
      .toMatch(/point data 'pressure' has 3 components, but field p \(scalar\) on VTK_QUADRATIC_TRIANGLE cells needs a one-component array \(SCALARS name type 1/);
    const gt = nodalGrid(kuhnCubeMesh(1), 2, () => 0);
    expect(read([{ name: 'velocity', components: 2, values: sample(gt, 2, () => {}) }, { name: 'pressure', components: 1, values: sample(gt, 1, () => {}) }], stokesFields, 2, gt))
      .toMatch(/point data 'velocity' has 2 components, but field u \(a vector of this 3-dimensional mesh\) on VTK_QUADRATIC_TETRA cells needs three components \(VECTORS name type, or NumberOfComponents="3"\)/);
  });

  it('a third component that is not zero in 2D', () => {
    const bent = velocity3.map((v, i) => (i === 3 * 7 + 2 ? 0.3 : v));
    const m = read([{ name: 'velocity', components: 3, values: bent }, { name: 'pressure', components: 1, values: pressure }]);
    expect(m).toMatch(start);
    expect(m).toMatch(/point data 'velocity' \(field u\) has z component 0\.3 at point 7 \([^)]*\); a vector field of this 2-dimensional mesh has 2 components, and a written z component must be zero to round-off/);
  });

  it('a pressure that is not P1 on the corners (a mid-edge value off the average), and the quadratic field it is when declared so', () => {
    const c = g.cells[0]!;
    const off = pressure.slice();
    off[c[3]!] = off[c[3]!]! + 0.01;  // the mid-edge node of edge (0, 1) of cell 1
    const arrays = [{ name: 'velocity', components: 3, values: velocity3 }, { name: 'pressure', components: 1, values: off }];
    const m = read(arrays);
    expect(m).toMatch(new RegExp(`point data 'pressure' \\(field p, degree 1\\) is not a degree-1 field on the corners of the VTK_QUADRATIC_TRIANGLE cells: point ${c[3]} .* holds ${off[c[3]!]}, but the degree-1 interpolation of its cell's corners there \\(the average of points ${Math.min(c[0]!, c[1]!)} and ${Math.max(c[0]!, c[1]!)}\\) is ${pressure[c[3]!]}`));
    expect(m).toMatch(/or measure the degree-2 field the file holds with fields: \{ p: \{ array: 'pressure', degree: 2 \} \}/);
    const asP2 = gridToFields(parseVtkText(legacyText(g, arrays), file, level), { fields: [stokesFields[0]!, { ...stokesFields[1]!, degree: 2 }], level });
    expect([asP2.fields[1]!.degree, asP2.fields[1]!.fromCorners, asP2.fields[1]!.space.nDofs]).toEqual([2, false, 25]);
  });

  it('a field of higher degree than the cells, and cells of another degree than the study\'s', () => {
    const lin = nodalGrid(mesh, 1, () => 0);
    const arrays = [{ name: 'velocity', components: 3, values: sample(lin, 3, () => {}) }, { name: 'pressure', components: 1, values: sample(lin, 1, () => {}) }];
    expect(read(arrays, [stokesFields[0]!, { ...stokesFields[1]!, degree: 2 }], undefined, lin)).toMatch(/field p has degree 2, but the cells are VTK_TRIANGLE \(degree 1\)/);
    expect(read(arrays, stokesFields, 2, lin)).toMatch(/the study declares degree 2, but the cells are VTK_TRIANGLE \(degree 1\)/);
  });
});
