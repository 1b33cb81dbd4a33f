import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { CellKind, Mesh } from '../../src/mesh/types.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { interpolateVector, vectorLagrangeField } from '../../src/fem/field/vector-field.ts';
import { readVtkFile } from '../../src/external/vtk/read.ts';
import { parseXml, childrenNamed, type XmlElement } from '../../src/external/vtk/xml.ts';
import { vertexValues, vtuBytes, VTU_CELL_TYPE, writeVtu, type VtuFormat } from '../../src/external/vtk/write.ts';
import { RungsInputError } from '../../src/errors.ts';

const root = mkdtempSync(join(tmpdir(), 'rungs-vtu-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

// Meshes of every cell kind, with their vertices moved off the grid so that coordinates use all their bits.
const meshes: Record<CellKind, () => Mesh> = {
  interval: () => perturbMesh(intervalMesh(0.1, 2.3, 7), { fraction: 0.3, seed: 1 }),
  triangle: () => perturbMesh(rectangleMesh({ x: [0, 1.5], y: [0, 1], nx: 4, ny: 3, cells: 'triangles' }), { fraction: 0.3, seed: 2 }),
  quadrilateral: () => perturbMesh(rectangleMesh({ x: [0, 1], y: [-1, 1], nx: 3, ny: 4, cells: 'quadrilaterals' }), { fraction: 0.25, seed: 3 }),
  tetrahedron: () => perturbMesh(boxMesh({ x: [0, 1], y: [0, 1], z: [0, 2], nx: 2, ny: 2, nz: 3, cells: 'tetrahedra' }), { fraction: 0.2, seed: 4 }),
  hexahedron: () => perturbMesh(boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 2, ny: 3, nz: 2, cells: 'hexahedra' }), { fraction: 0.2, seed: 5 }),
};
const kinds = Object.keys(meshes) as CellKind[];
/** 200 × 200 squares in triangles: a file of several MiB, longer than the writer's 4 MiB buffer and its base64
 *  scratch, so that pieces are handed on in the middle of arrays. */
const large = () => perturbMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 200, ny: 200, cells: 'triangles' }), { fraction: 0.3, seed: 9 });

/** A kiln rod's temperature and its gradient-like vector at the vertices, and an error density per cell (invented
 *  values with all their bits used, some negative, one -0 and some tiny). */
function dataOf(mesh: Mesh) {
  const { dim, coords, nVertices, nCells } = mesh;
  const temperature = new Float64Array(nVertices);
  const flux = new Float64Array(nVertices * 3);
  for (let v = 0; v < nVertices; v++) {
    const x = coords[v * dim], y = dim > 1 ? coords[v * dim + 1] : 0;
    temperature[v] = 1200 * Math.exp(-x) * Math.cos(y) - 1 / 3;
    flux[3 * v] = Math.sin(7 * x); flux[3 * v + 1] = -y / 7; flux[3 * v + 2] = v === 0 ? -0 : 1e-300 * v;
  }
  const density = new Float64Array(nCells).map((_, c) => Math.PI ** -(c % 40) / 1e9);
  return { temperature, flux: { values: flux, components: 3 }, density };
}

/** The numbers of a DataArray written in ASCII, read back with Number (the parse that rungs's own reader uses). */
function asciiArray(text: string, el: XmlElement): number[] {
  return Buffer.from(text, 'utf8').subarray(el.textStart, el.textEnd).toString('utf8').trim().split(/\s+/).map(Number);
}

/** Indices where two arrays differ in their bits (Object.is: -0 differs from 0). */
function bitDiffs(a: ArrayLike<number>, b: ArrayLike<number>): string[] {
  const out: string[] = [];
  if (a.length !== b.length) return [`length ${a.length} vs ${b.length}`];
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) out.push(`${i}: ${a[i]} vs ${b[i]}`);
  return out.slice(0, 5);
}

describe('writeVtu, read back with rungs\'s own reader (ASCII)', () => {
  // Round trip: ECMAScript's Number::toString gives the shortest decimal that reads back as the same double
  // (ECMA-262, Number::toString, note on round-tripping; Steele & White 1990), so every value must come back bit for
  // bit, -0 included (written as "-0").
  for (const kind of kinds) {
    it(`${kind}: points, cells, point data bit for bit, cell data bit for bit`, () => {
      const mesh = meshes[kind]();
      const { temperature, flux, density } = dataOf(mesh);
      const file = join(root, `rod-${kind}.vtu`);
      writeVtu(file, { mesh, pointData: { temperature, flux }, cellData: { 'error density L2': density } });
      const grid = readVtkFile(file);
      expect([grid.nPoints, grid.nCells]).toEqual([mesh.nVertices, mesh.nCells]);
      const points = new Float64Array(mesh.nVertices * 3);
      for (let v = 0; v < mesh.nVertices; v++) for (let d = 0; d < mesh.dim; d++) points[3 * v + d] = mesh.coords[v * mesh.dim + d];
      expect(bitDiffs(grid.points, points)).toEqual([]);
      const vpc = mesh.verticesPerCell;
      expect(Array.from(grid.offsets)).toEqual(Array.from({ length: mesh.nCells + 1 }, (_, c) => c * vpc));
      expect(Array.from(grid.connectivity)).toEqual(Array.from(mesh.cells));
      // VTK's linear cell numbers (vtkCellType.h: VTK_LINE 3, VTK_TRIANGLE 5, VTK_QUAD 9, VTK_TETRA 10,
      // VTK_HEXAHEDRON 12; "VTK File Formats", Kitware).
      const vtkNumber = { interval: 3, triangle: 5, quadrilateral: 9, tetrahedron: 10, hexahedron: 12 }[kind];
      expect(VTU_CELL_TYPE[kind]).toBe(vtkNumber);
      expect(grid.types.every((t) => t === vtkNumber)).toBe(true);
      expect(grid.pointData.map((p) => [p.name, p.components])).toEqual([['temperature', 1], ['flux', 3]]);
      expect(bitDiffs(grid.pointData[0].values, temperature)).toEqual([]);
      expect(bitDiffs(grid.pointData[1].values, flux.values)).toEqual([]);
      expect(grid.cellData.map((p) => [p.name, p.components])).toEqual([['error density L2', 1]]);
      expect(bitDiffs(grid.cellData[0].values, density)).toEqual([]);
      // The same cell data read from the file with the XML scanner alone, as text.
      const text = readFileSync(file, 'utf8');
      const piece = childrenNamed(childrenNamed(parseXml(text, file), 'UnstructuredGrid')[0], 'Piece')[0];
      const cellArrays = childrenNamed(childrenNamed(piece, 'CellData')[0], 'DataArray');
      expect(cellArrays.map((a) => a.attrs.Name)).toEqual(['error density L2']);
      expect(bitDiffs(asciiArray(text, cellArrays[0]), density)).toEqual([]);
    });
  }

  it('a file longer than the writer\'s buffer: the same bytes in memory and on disk, read back bit for bit', () => {
    const mesh = large();
    const { temperature, flux, density } = dataOf(mesh);
    const file = join(root, 'large.vtu');
    const input = { mesh, pointData: { temperature, flux }, cellData: { density } };
    writeVtu(file, input);
    const onDisk = readFileSync(file);
    expect(onDisk.length).toBeGreaterThan(4 << 20);
    expect(Buffer.compare(onDisk, Buffer.from(vtuBytes(input)))).toBe(0);
    const grid = readVtkFile(file);
    expect(Array.from(grid.connectivity).every((v, i) => v === mesh.cells[i])).toBe(true);
    expect(bitDiffs(grid.pointData[0].values, temperature)).toEqual([]);
    expect(bitDiffs(grid.pointData[1].values, flux.values)).toEqual([]);
  }, 60_000);

  it('replaces an existing file atomically and leaves no temporary file', () => {
    const dir = mkdtempSync(join(root, 'atomic-'));
    const file = join(dir, 'tile.vtu');
    writeFileSync(file, 'old');
    const mesh = meshes.triangle();
    writeVtu(file, { mesh, cellData: { d: dataOf(mesh).density } });
    expect(readFileSync(file, 'utf8').startsWith('<?xml')).toBe(true);
    expect(readdirSync(dir)).toEqual(['tile.vtu']);
  });

  it('refuses data that does not fit the mesh, non-finite values in ASCII and unknown formats', () => {
    const mesh = meshes.triangle();
    const file = join(root, 'bad.vtu');
    expect(() => writeVtu(file, { mesh, pointData: { t: new Float64Array(mesh.nVertices + 1) } })).toThrow(RungsInputError);
    expect(() => writeVtu(file, { mesh, cellData: { d: new Float64Array(mesh.nCells * 2 - 1) } }))
      .toThrow(/cellData "d" has 47 values for 24 cells/);
    expect(() => writeVtu(file, { mesh, pointData: { t: { values: new Float64Array(mesh.nVertices * 2), components: 3 } } }))
      .toThrow(/with components = 3/);
    const nan = new Float64Array(mesh.nCells); nan[5] = NaN;
    expect(() => writeVtu(file, { mesh, cellData: { d: nan } })).toThrow(/holds NaN at index 5.*format: 'binary'/);
    expect(() => writeVtu(file, { mesh, format: 'base85' as VtuFormat })).toThrow(/format must be 'ascii', 'binary', 'raw', got "base85"/);
    expect(existsSync(file)).toBe(false);
  });
});

describe('vertexValues', () => {
  // Lagrange spaces of degree k reproduce polynomials of degree ≤ k, so the interpolant's values at the vertices are
  // those of the polynomial (common practice, no source); checked to 1e-13 (evaluation round-off).
  const quadratic = (x: number, y: number, z: number) => 2 * x * x - x * y + 3 * z * y - y + 0.5;
  for (const [kind, degree] of [['triangle', 2], ['tetrahedron', 2], ['hexahedron', 2], ['quadrilateral', 2], ['interval', 3]] as const) {
    it(`of a P/Q${degree} field on ${kind} cells are the function's values at the vertices`, () => {
      const mesh = meshes[kind]();
      const sp = lagrangeSpace(mesh, degree);
      const { dim, coords } = mesh;
      const at = (v: number) => [coords[v * dim], dim > 1 ? coords[v * dim + 1] : 0, dim > 2 ? coords[v * dim + 2] : 0] as const;
      const field = lagrangeField(sp, interpolate(sp, quadratic));
      // rungs's own field gives its vertex coefficients; any other field (a copy of it is one) is evaluated per cell.
      const scalar = vertexValues(field);
      const evaluated = vertexValues({ ...field });
      const vector = vertexValues(vectorLagrangeField(sp, 2, interpolateVector(sp, 2, (x, y, z, out) => { out[0] = quadratic(x, y, z); out[1] = -x; })));
      const bad: string[] = [];
      for (let v = 0; v < mesh.nVertices; v++) {
        const [x, y, z] = at(v);
        if (Math.abs(scalar[v] - quadratic(x, y, z)) > 1e-13 || Math.abs(evaluated[v] - scalar[v]) > 1e-13) bad.push(`scalar ${v}`);
        if (Math.abs(vector[2 * v] - quadratic(x, y, z)) > 1e-13 || Math.abs(vector[2 * v + 1] + x) > 1e-13) bad.push(`vector ${v}`);
      }
      expect([scalar.length, vector.length]).toEqual([mesh.nVertices, 2 * mesh.nVertices]);
      expect(bad).toEqual([]);
    });
  }
});

/** Debian's python3 first (python3-vtk9 installs into its dist-packages), then whatever python3 is on the path. */
function pythonWithVtk(): string | null {
  for (const py of ['/usr/bin/python3', 'python3']) {
    const r = spawnSync(py, ['-c', 'import vtk'], { encoding: 'utf8' });
    if (r.status === 0) return py;
  }
  return null;
}
const python = pythonWithVtk();

// Read with VTK itself (vtkXMLUnstructuredGridReader from Debian's python3-vtk9): counts, cell types, connectivity,
// every point and value, and each cell's size from vtkCellSizeFilter summed to the domain's measure (the cells tile
// the domain: a cell whose nodes are out of VTK's order folds and gives another size). Values travel as JSON floats,
// which Python writes with repr (the shortest round-tripping decimal, Python 3.1+), so they compare bit for bit.
const SCRIPT = String.raw`
import json, sys, vtk
from vtk.util.numpy_support import vtk_to_numpy
out = []
for f in sys.argv[1:]:
    r = vtk.vtkXMLUnstructuredGridReader()
    r.SetFileName(f)
    r.Update()
    g = r.GetOutput()
    sizes = vtk.vtkCellSizeFilter()
    sizes.SetInputData(g)
    sizes.Update()
    s = sizes.GetOutput().GetCellData()
    measure = sum(float(sum(vtk_to_numpy(s.GetArray(n)))) for n in ('Length', 'Area', 'Volume'))
    def arrays(d):
        return {d.GetArrayName(i): [d.GetArray(i).GetNumberOfComponents(), [float(v) for v in vtk_to_numpy(d.GetArray(i)).ravel()]] for i in range(d.GetNumberOfArrays())}
    cells = g.GetCells()
    out.append({
        'points': g.GetNumberOfPoints(), 'cells': g.GetNumberOfCells(),
        'types': sorted(set(g.GetCellType(i) for i in range(g.GetNumberOfCells()))),
        'connectivity': [int(v) for v in vtk_to_numpy(cells.GetConnectivityArray())],
        'xyz': [float(v) for v in vtk_to_numpy(g.GetPoints().GetData()).ravel()],
        'pointData': arrays(g.GetPointData()), 'cellData': arrays(g.GetCellData()), 'measure': measure,
    })
print(json.dumps(out))
`;

interface VtkSeen {
  points: number; cells: number; types: number[]; connectivity: number[]; xyz: number[]; measure: number;
  pointData: Record<string, [number, number[]]>; cellData: Record<string, [number, number[]]>;
}

describe.skipIf(!python)(`writeVtu read by VTK's own reader${python ? '' : ' (skipped: no python3 with `import vtk`; install Debian\'s python3-vtk9 to run it)'}`, () => {
  // Measure of each domain (exact: the perturbation keeps boundary vertices on the boundary): interval length 2.2,
  // rectangles 1.5 × 1 and 1 × 2, boxes 1 × 1 × 2 and 1.
  const measure: Record<CellKind, number> = { interval: 2.2, triangle: 1.5, quadrilateral: 2, tetrahedron: 2, hexahedron: 1 };
  for (const format of ['ascii', 'binary', 'raw'] as const) {
    it(`${format}: every cell kind, counts, types, nodes and values bit for bit, cells tiling the domain`, () => {
      const written = kinds.map((kind) => {
        const mesh = meshes[kind]();
        const data = dataOf(mesh);
        const file = join(root, `vtk-${format}-${kind}.vtu`);
        writeVtu(file, { mesh, format, pointData: { temperature: data.temperature, flux: data.flux }, cellData: { density: data.density } });
        return { kind, mesh, data, file };
      });
      const r = spawnSync(python!, ['-c', SCRIPT, ...written.map((w) => w.file)], { encoding: 'utf8', maxBuffer: 1 << 26 });
      expect(r.stderr.includes('ERR|') ? r.stderr : '').toBe('');
      expect(r.status).toBe(0);
      const seen = JSON.parse(r.stdout) as VtkSeen[];
      const problems: string[] = [];
      written.forEach(({ kind, mesh, data, file }, i) => {
        const s = seen[i];
        const say = (what: string, ok: boolean) => { if (!ok) problems.push(`${kind} (${file}): ${what}`); };
        say(`counts ${s.points}, ${s.cells}`, s.points === mesh.nVertices && s.cells === mesh.nCells);
        say(`types ${s.types.join(',')}`, s.types.length === 1 && s.types[0] === VTU_CELL_TYPE[kind]);
        say('connectivity', bitDiffs(s.connectivity, mesh.cells).length === 0);
        const xyz = new Float64Array(mesh.nVertices * 3);
        for (let v = 0; v < mesh.nVertices; v++) for (let d = 0; d < mesh.dim; d++) xyz[3 * v + d] = mesh.coords[v * mesh.dim + d];
        say('points', bitDiffs(s.xyz, xyz).length === 0);
        say('temperature', s.pointData.temperature?.[0] === 1 && bitDiffs(s.pointData.temperature[1], data.temperature).length === 0);
        // The -0 in flux survives both formats: Python's json writes -0.0, which JSON.parse reads as -0.
        say('flux', s.pointData.flux?.[0] === 3 && bitDiffs(s.pointData.flux[1], data.flux.values).length === 0);
        say('density', s.cellData.density?.[0] === 1 && bitDiffs(s.cellData.density[1], data.density).length === 0);
        say(`measure ${s.measure} vs ${measure[kind]}`, Math.abs(s.measure - measure[kind]) < 1e-12);
      });
      expect(problems).toEqual([]);
    }, 60_000);
  }

  it.each(['binary', 'raw'] as const)('%s, a file longer than the writer\'s buffer: read by VTK bit for bit', (format) => {
    const mesh = large();
    const { temperature, flux, density } = dataOf(mesh);
    const file = join(root, `large-${format}.vtu`);
    writeVtu(file, { mesh, format, pointData: { temperature, flux }, cellData: { density } });
    expect(readFileSync(file).length).toBeGreaterThan(4 << 20);
    const r = spawnSync(python!, ['-c', SCRIPT, file], { encoding: 'utf8', maxBuffer: 1 << 28 });
    expect(r.status).toBe(0);
    const [s] = JSON.parse(r.stdout) as VtkSeen[];
    expect([s.points, s.cells]).toEqual([mesh.nVertices, mesh.nCells]);
    expect(bitDiffs(s.connectivity, mesh.cells)).toEqual([]);
    expect(bitDiffs(s.pointData.temperature[1], temperature)).toEqual([]);
    expect(bitDiffs(s.pointData.flux[1], flux.values)).toEqual([]);
    expect(bitDiffs(s.cellData.density[1], density)).toEqual([]);
    expect(Math.abs(s.measure - 1)).toBeLessThan(1e-12); // the unit square's area
  }, 60_000);

  it.each(['binary', 'raw'] as const)('%s keeps NaN and infinities', (format) => {
    const mesh = meshes.hexahedron();
    const d = new Float64Array(mesh.nCells); d[0] = NaN; d[1] = Infinity; d[2] = -Infinity;
    const file = join(root, `nan-${format}.vtu`);
    writeVtu(file, { mesh, format, cellData: { d } });
    const script = 'import sys, vtk\nr = vtk.vtkXMLUnstructuredGridReader()\nr.SetFileName(sys.argv[1])\nr.Update()\n' +
      'a = r.GetOutput().GetCellData().GetArray("d")\nprint(" ".join(repr(a.GetValue(i)) for i in range(4)))';
    const r = spawnSync(python!, ['-c', script, file], { encoding: 'utf8' });
    expect(r.stdout.trim()).toBe('nan inf -inf 0.0');
  }, 60_000);
});
