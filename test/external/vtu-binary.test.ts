// Binary, compressed and appended .vtu files, read with rungs's reader (src/external/vtk/vtu.ts, binary.ts) and
// checked against files written by VTK's own vtkXMLUnstructuredGridWriter (Debian's python3-vtk9, VTK 9.1) in every
// data mode it has, and against the values VTK held in memory when it wrote them; rungs's own binary writer read
// back bit for bit; damaged files refused with messages that name the file and the line or byte.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { deflateSync } from 'node:zlib';
import { afterAll, describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { readVtkFile } from '../../src/external/vtk/read.ts';
import { DEFLATE_MAX_RATIO } from '../../src/external/vtk/binary.ts';
import type { VtkGrid } from '../../src/external/vtk/grid.ts';
import { writeVtu } from '../../src/external/vtk/write.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

const root = mkdtempSync(join(tmpdir(), 'rungs-vtu-binary-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** The bytes of a typed array, so that NaN payloads and -0 compare too. */
const bytesOf = (a: Float64Array | Int32Array): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

/** What differs between two grids, bit for bit (points, cells, every point and cell array); [] when nothing does. */
function gridDiffs(a: VtkGrid, b: VtkGrid): string[] {
  const out: string[] = [];
  const same = (what: string, x: Float64Array | Int32Array, y: Float64Array | Int32Array) => {
    if (x.length !== y.length || Buffer.compare(bytesOf(x), bytesOf(y)) !== 0) out.push(what);
  };
  if (a.nPoints !== b.nPoints || a.nCells !== b.nCells) out.push(`counts ${a.nPoints}/${a.nCells} vs ${b.nPoints}/${b.nCells}`);
  same('points', a.points, b.points);
  same('offsets', a.offsets, b.offsets);
  same('connectivity', a.connectivity, b.connectivity);
  same('types', a.types, b.types);
  for (const [section, xs, ys] of [['point', a.pointData, b.pointData], ['cell', a.cellData, b.cellData]] as const) {
    if (xs.map((p) => `${p.name}/${p.components}`).join() !== ys.map((p) => `${p.name}/${p.components}`).join()) out.push(`${section} data names`);
    else xs.forEach((p, i) => same(`${section} data ${p.name}`, p.values, ys[i]!.values));
  }
  return out;
}

/** The RungsInputError reading a file raises. */
function problem(file: string, chunkBytes?: number): RungsInputError {
  try {
    readVtkFile(file, undefined, { chunkBytes });
  } catch (err) {
    expect(err).toBeInstanceOf(RungsInputError);
    return err as RungsInputError;
  }
  throw new Error(`expected a RungsInputError reading ${file}`);
}

const python = ['/usr/bin/python3', 'python3'].find((py) => spawnSync(py, ['-c', 'import vtk'], { encoding: 'utf8' }).status === 0);

// Two grids of a kiln tile and rod: triangles (40 × 40 squares, so that the 3-component array fills more than one
// of VTK's default 32 KiB compression blocks) and tetrahedra (six per cube of a 2 × 2 × 3 box). Point arrays: the
// temperature (Float64) and a heat flux (3 × Float64); cell array: an error density (Float32). The values use all
// their bits, and none is -0 (VTK 9.1's ASCII writer writes -0 as "0", seen in its files). Every data mode of vtkXMLWriter is written: ASCII; binary (inline base64) and appended (raw or
// base64, EncodeAppendedDataOff/On), each without compression and with ZLib, with UInt32 and UInt64 headers; and,
// in a few of them, big-endian data and small compression blocks (8 bytes: every Float64 array ends on a full
// block, whose last-block size VTK writes as 0; 24 bytes: a partial last block).
const SCRIPT = String.raw`
import sys, json, math, vtk
out = sys.argv[1]
def triangles():
    n = 40
    pts = [(i / n + 0.01 * math.sin(7 * i + 3 * j), j / n * 0.8, 0.0) for j in range(n + 1) for i in range(n + 1)]
    cells = []
    for j in range(n):
        for i in range(n):
            a = j * (n + 1) + i
            cells += [(vtk.VTK_TRIANGLE, (a, a + 1, a + n + 2)), (vtk.VTK_TRIANGLE, (a, a + n + 2, a + n + 1))]
    return pts, cells
def tetrahedra():
    nx, ny, nz = 2, 2, 3
    idx = lambda i, j, k: (k * (ny + 1) + j) * (nx + 1) + i
    pts = [(i / nx, j / ny * 1.5, k / nz * 2.0 + 0.001 * i * j) for k in range(nz + 1) for j in range(ny + 1) for i in range(nx + 1)]
    cells = []
    perms = [(0, 1, 2), (0, 2, 1), (1, 0, 2), (1, 2, 0), (2, 0, 1), (2, 1, 0)]
    for k in range(nz):
        for j in range(ny):
            for i in range(nx):
                for p in perms:
                    c = [i, j, k]
                    path = [idx(*c)]
                    for axis in p:
                        c[axis] += 1
                        path.append(idx(*c))
                    cells.append((vtk.VTK_TETRA, tuple(path)))
    return pts, cells
def grid(pts, cells):
    p = vtk.vtkPoints(); p.SetDataTypeToDouble()
    for x in pts: p.InsertNextPoint(*x)
    g = vtk.vtkUnstructuredGrid(); g.SetPoints(p)
    for t, ids in cells:
        l = vtk.vtkIdList()
        for i in ids: l.InsertNextId(i)
        g.InsertNextCell(t, l)
    t = vtk.vtkDoubleArray(); t.SetName('temperature')
    f = vtk.vtkDoubleArray(); f.SetName('heat flux'); f.SetNumberOfComponents(3)
    for k, (x, y, z) in enumerate(pts):
        t.InsertNextValue(1200 * math.exp(-x) * math.cos(y) - 1 / 3 + z)
        f.InsertNextTuple3(math.sin(7 * x) / 3, (0.3 - y) / 7, 1e-300 * (k + 1))
    d = vtk.vtkFloatArray(); d.SetName('error density')
    for c in range(len(cells)): d.InsertNextValue(math.pi ** -(c % 40) / 1e3)
    g.GetPointData().AddArray(t); g.GetPointData().AddArray(f); g.GetCellData().AddArray(d)
    return g
modes = [('ascii', 'Ascii', None, 'UInt32', None, None, None)]
for header in ('UInt32', 'UInt64'):
    for comp in ('None', 'ZLib'):
        modes.append(('binary-%s-%s' % (comp, header), 'Binary', comp, header, None, None, None))
        for enc in ('Off', 'On'):
            modes.append(('appended-%s-%s-%s' % ('base64' if enc == 'On' else 'raw', comp, header), 'Appended', comp, header, enc, None, None))
modes += [
    ('binary-ZLib-UInt64-big', 'Binary', 'ZLib', 'UInt64', None, 'Big', None),
    ('appended-raw-None-UInt32-big', 'Appended', 'None', 'UInt32', 'Off', 'Big', None),
    ('appended-raw-ZLib-UInt32-big', 'Appended', 'ZLib', 'UInt32', 'Off', 'Big', None),
    ('binary-ZLib-UInt32-blocks8', 'Binary', 'ZLib', 'UInt32', None, None, 8),
    ('appended-raw-ZLib-UInt64-blocks24', 'Appended', 'ZLib', 'UInt64', 'Off', None, 24),
    ('appended-base64-ZLib-UInt32-blocks24', 'Appended', 'ZLib', 'UInt32', 'On', None, 24),
]
result = {'version': vtk.vtkVersion.GetVTKVersion(), 'grids': {}}
for gname, make in (('triangles', triangles), ('tetrahedra', tetrahedra)):
    pts, cells = make()
    g = grid(pts, cells)
    files = {}
    for name, mode, comp, header, enc, order, block in modes:
        w = vtk.vtkXMLUnstructuredGridWriter()
        path = '%s/%s-%s.vtu' % (out, gname, name)
        w.SetFileName(path); w.SetInputData(g)
        getattr(w, 'SetDataModeTo' + mode)()
        if comp: getattr(w, 'SetCompressorTypeTo' + comp)()
        getattr(w, 'SetHeaderTypeTo' + header)()
        if enc: getattr(w, 'EncodeAppendedData' + enc)()
        if order: w.SetByteOrderToBigEndian()
        if block: w.SetBlockSize(block)
        if w.Write() != 1: raise SystemExit('ERR| writing ' + path)
        files[name] = path
    arr = lambda a: [a.GetValue(i) for i in range(a.GetNumberOfValues())]
    result['grids'][gname] = {
        'files': files,
        'points': [c for p in pts for c in p],
        'connectivity': [i for _, ids in cells for i in ids],
        'types': [t for t, _ in cells],
        'temperature': arr(g.GetPointData().GetArray('temperature')),
        'flux': arr(g.GetPointData().GetArray('heat flux')),
        'density': arr(g.GetCellData().GetArray('error density')),
    }
print(json.dumps(result))
`;

interface Written {
  version: string;
  grids: Record<string, {
    files: Record<string, string>;
    points: number[]; connectivity: number[]; types: number[]; temperature: number[]; flux: number[]; density: number[];
  }>;
}

describe.skipIf(!python)(`.vtu files written by VTK's own writer in every data mode${python ? '' : ' (skipped: no python3 with `import vtk`; install Debian\'s python3-vtk9 to run it)'}`, () => {
  const dir = mkdtempSync(join(root, 'vtk-'));
  const run = python ? spawnSync(python, ['-c', SCRIPT, dir], { encoding: 'utf8', maxBuffer: 1 << 26 }) : null;
  const written = run && run.status === 0 ? (JSON.parse(run.stdout) as Written) : null;

  it('VTK wrote every file', () => {
    expect(run?.stderr.includes('ERR|') ? run.stderr : '').toBe('');
    expect(run?.status).toBe(0);
    expect(Object.keys(written!.grids.triangles!.files).length).toBe(19);
  });

  for (const gname of ['triangles', 'tetrahedra']) {
    it(`${gname}: the ASCII file holds what VTK held in memory, bit for bit (Float32 values as their doubles)`, () => {
      const w = written!.grids[gname]!;
      const g = readVtkFile(w.files.ascii!);
      const f64 = (a: number[]) => new Float64Array(a);
      const nCells = w.types.length, vpc = w.connectivity.length / nCells;
      const expected: VtkGrid = {
        ...g,
        nPoints: w.points.length / 3, points: f64(w.points), nCells,
        offsets: Int32Array.from({ length: nCells + 1 }, (_, c) => c * vpc), connectivity: Int32Array.from(w.connectivity), types: Int32Array.from(w.types),
        pointData: [{ name: 'temperature', components: 1, values: f64(w.temperature), line: 0 }, { name: 'heat flux', components: 3, values: f64(w.flux), line: 0 }],
        cellData: [{ name: 'error density', components: 1, values: f64(w.density), line: 0 }],
      };
      expect(gridDiffs(g, expected)).toEqual([]);
      // The Float32 density really is Float32: its values are not the doubles they were computed as.
      expect(w.density[3]).not.toBe(Math.PI ** -3 / 1e3);
      expect(Math.fround(Math.PI ** -3 / 1e3)).toBe(w.density[3]);
    });

    it(`${gname}: every binary, compressed and appended file reads as the ASCII one, bit for bit, whatever the chunk size`, () => {
      const w = written!.grids[gname]!;
      const ascii = readVtkFile(w.files.ascii!);
      const problems: string[] = [];
      for (const [mode, file] of Object.entries(w.files)) {
        for (const chunkBytes of [undefined, 13]) {
          try {
            const d = gridDiffs(readVtkFile(file, undefined, { chunkBytes }), ascii);
            if (d.length) problems.push(`${mode} (chunk ${chunkBytes ?? 'default'}): ${d.join(', ')}`);
          } catch (err) {
            problems.push(`${mode} (chunk ${chunkBytes ?? 'default'}): ${(err as Error).message}`);
          }
        }
      }
      expect(problems).toEqual([]);
    });
  }

  it('a compressed file is held to the output limit by the values it declares, not by its size', () => {
    const w = written!.grids.triangles!;
    const file = w.files['binary-ZLib-UInt32']!;
    const g = readVtkFile(file);
    // Values: 3 coordinates and 1 + 3 point values per point, 1 cell value and offset and type per cell.
    const values = 7 * g.nPoints + 3 * g.nCells;
    const size = statSync(file).size;
    expect(readVtkFile(file, undefined, { limit: { bytes: 8 * values, source: 'the test' } }).nPoints).toBe(g.nPoints);
    expect(8 * values - 1).toBeGreaterThan(size);
    expect(() => readVtkFile(file, undefined, { limit: { bytes: 8 * values - 1, source: 'the test' } }))
      .toThrow(new RegExp(`the file is compressed, and the ${values} values its counts declare .* more than the limit of .* \\(the test\\); it was not read`));
  });

  it('a file without header_type is read with UInt32 headers, as VTK 9.1\'s own reader reads it', () => {
    const w = written!.grids.triangles!;
    const file = join(dir, 'no-header-type.vtu');
    writeFileSync(file, readFileSync(w.files['binary-ZLib-UInt32']!, 'latin1').replace(' header_type="UInt32"', ''), 'latin1');
    const g = readVtkFile(file);
    expect(gridDiffs(g, readVtkFile(w.files.ascii!))).toEqual([]);
    const script = 'import sys, vtk\nr = vtk.vtkXMLUnstructuredGridReader(); r.SetFileName(sys.argv[1]); r.Update()\n' +
      'a = r.GetOutput().GetPointData().GetArray("temperature")\nprint(repr(a.GetValue(a.GetNumberOfValues() - 1)))';
    const r = spawnSync(python!, ['-c', script, file], { encoding: 'utf8' });
    expect(Number(r.stdout.trim())).toBe(g.pointData[0]!.values[g.nPoints - 1]);
  });

  it('the files hold what their names say (so that every layout is exercised)', () => {
    const w = written!.grids.triangles!;
    const head = (mode: string) => readFileSync(w.files[mode]!, 'latin1').slice(0, 600);
    expect(head('binary-ZLib-UInt64')).toMatch(/header_type="UInt64" compressor="vtkZLibDataCompressor"/);
    expect(head('binary-None-UInt32')).not.toMatch(/compressor=/);
    expect(head('binary-ZLib-UInt64-big')).toMatch(/byte_order="BigEndian"/);
    expect(readFileSync(w.files['appended-raw-None-UInt32']!, 'latin1')).toMatch(/<AppendedData encoding="raw">/);
    expect(readFileSync(w.files['appended-base64-ZLib-UInt64']!, 'latin1')).toMatch(/<AppendedData encoding="base64">/);
    // The 3-component flux fills more than one default block: its header starts with a block count of 2 or more.
    const flux = /Name="heat flux" NumberOfComponents="3" format="binary"[^>]*>\s*([A-Za-z0-9+/]{8})/.exec(readFileSync(w.files['binary-ZLib-UInt32']!, 'latin1'));
    expect(Buffer.from(flux![1]!, 'base64').readUInt32LE(0)).toBeGreaterThanOrEqual(2);
  });

  it('mutants of binary files (truncations at 150 offsets, 150 seeded byte changes each): read, or refused with a RungsInputError, never another error', () => {
    // Damage a binary file can hide: a changed byte of uncompressed data is another valid value (no checksum), so
    // the check here is that nothing but a RungsInputError escapes, whatever the bytes (compressed blocks carry
    // zlib's Adler-32, so their damage is found).
    const w = written!.grids.tetrahedra!;
    const modes = ['binary-ZLib-UInt32', 'appended-raw-ZLib-UInt64', 'appended-base64-None-UInt32', 'appended-raw-None-UInt32-big'];
    const others: string[] = [];
    let refused = 0, tried = 0;
    for (const mode of modes) {
      const bytes = readFileSync(w.files[mode]!);
      const r = mulberry32(modes.indexOf(mode) + 11);
      const mutants: [string, Buffer][] = [];
      for (let k = 0; k < bytes.length; k += Math.max(1, Math.floor(bytes.length / 150))) mutants.push([`cut at ${k}`, bytes.subarray(0, k)]);
      for (let k = 0; k < 150; k++) {
        const m = Buffer.from(bytes);
        const at = Math.floor(r() * m.length);
        m[at] = Math.floor(r() * 256);
        mutants.push([`byte ${at} → ${m[at]}`, m]);
      }
      const file = join(dir, `mutant-${mode}.vtu`);
      for (const [name, m] of mutants) {
        writeFileSync(file, m);
        tried++;
        try {
          readVtkFile(file, undefined, { chunkBytes: 64 });
        } catch (err) {
          if (err instanceof RungsInputError && err.message.startsWith(file)) refused++;
          else others.push(`${mode}, ${name}: ${(err as Error).stack?.split('\n').slice(0, 3).join(' | ')}`);
        }
      }
    }
    expect(others.slice(0, 5)).toEqual([]);
    expect(refused).toBeGreaterThan(tried / 3); // most mutants are refused: every truncation, changes of markup, of compressed data
  });

  describe('damaged files: one clear message naming the file and the line (or byte)', () => {
    const damaged = (name: string, text: Buffer | string): string => {
      const file = join(dir, name);
      writeFileSync(file, text);
      return file;
    };
    const lineOf = (text: string, needle: string): number => text.slice(0, text.indexOf(needle)).split('\n').length;

    it('a base64 run too short (characters cut from inline data)', () => {
      const text = readFileSync(written!.grids.tetrahedra!.files['binary-None-UInt32']!, 'latin1');
      const at = lineOf(text, 'Name="temperature"') + 1;
      const cut = text.replace(/(Name="temperature"[^>]*>\s*)([A-Za-z0-9+/=]+)/, (_m, open: string, data: string) => open + data.slice(0, -9));
      const file = damaged('short-base64.vtu', cut);
      // 9 characters fewer: two groups of 4 (6 bytes) and one character of the group before (a seventh byte lost);
      // the count is of the data's bytes, after the 4-byte header.
      const bytes = 8 * Number(/NumberOfPoints="(\d+)"/.exec(text)![1]);
      for (const chunk of [undefined, 5]) {
        const e = problem(file, chunk);
        expect(e.message).toBe(`${file} line ${at}: the base64 data of DataArray "temperature" (line ${at - 1}) ends after ` +
          `${bytes - 7} of its ${bytes} bytes (inside a group of 4 characters): the file is truncated or the data is shorter than its header declares`);
      }
    });

    it('a character outside base64', () => {
      const text = readFileSync(written!.grids.tetrahedra!.files['binary-None-UInt32']!, 'latin1');
      const bad = text.replace(/(Name="heat flux"[^>]*>\s*[A-Za-z0-9+/]{40})[A-Za-z0-9+/]/, '$1*');
      const e = problem(damaged('bad-char.vtu', bad));
      expect(e.message).toMatch(new RegExp(`line ${lineOf(text, 'Name="heat flux"') + 1}: '\\*' in the base64 data of DataArray "heat flux" \\(line \\d+\\) is not allowed there`));
    });

    it('a raw appended block cut short (bytes lost inside the data, the closing tags intact), and a raw file cut off', () => {
      const bytes = readFileSync(written!.grids.triangles!.files['appended-raw-None-UInt64']!);
      const end = bytes.lastIndexOf('</AppendedData>');
      const lost = Buffer.concat([bytes.subarray(0, end - 40), bytes.subarray(end - 30)]);
      const file = damaged('raw-short.vtu', lost);
      const e = problem(file);
      // The last array (the cell types, UInt8) misses ten bytes; the line break and blanks before </AppendedData>
      // count as bytes that could be data (raw data may end in any byte). The message gives the byte offset in the file.
      expect(e.message).toMatch(new RegExp(`^${file.replace(/[.]/g, '\\.')} byte \\d+: appended DataArray "types" \\(line \\d+, offset \\d+\\) declares 3200 more bytes of data, but at most 3193 are left`));
      const cutOff = damaged('raw-cut.vtu', bytes.subarray(0, bytes.length - 100));
      const text = bytes.toString('latin1');
      const underscore = lineOf(text, '<AppendedData') + 1;
      expect(problem(cutOff).message).toBe(`${cutOff} line ${underscore}: the file does not end with </AppendedData></VTKFile> after ` +
        `the appended data that starts here (line ${underscore}): truncated file?`);
    });

    it('a corrupted zlib block, and a block that inflates to fewer bytes than its header declares', () => {
      const text = readFileSync(written!.grids.tetrahedra!.files['binary-ZLib-UInt32']!, 'latin1');
      const at = lineOf(text, 'Name="temperature"') + 1;
      // Header run, then the data run: one byte of the compressed data flipped.
      const re = /(Name="temperature"[^>]*>\s*)([A-Za-z0-9+/]+=*)([A-Za-z0-9+/]+=*)/;
      const [, , header, data] = re.exec(text)!;
      const z = Buffer.from(data!, 'base64');
      z[Math.floor(z.length / 2)] ^= 0x55;
      const e = problem(damaged('zlib-bad.vtu', text.replace(re, (_m, open: string) => open + header + z.toString('base64'))));
      expect(e.message).toMatch(new RegExp(`line ${at}: compressed block 1 of 1 of DataArray "temperature" \\(line \\d+\\) does not inflate \\(zlib: .*\\): the data is damaged`));
      // The same block replaced by a valid zlib stream of half the data (the header's sizes unchanged, the
      // compressed size set to the new stream's).
      const h = Buffer.from(header!, 'base64');
      const plain = Buffer.alloc(h.readUInt32LE(8) / 2, 1);
      const half = deflateSync(plain);
      h.writeUInt32LE(half.length, 12);
      const e2 = problem(damaged('zlib-short.vtu', text.replace(re, (_m, open: string) => open + h.toString('base64') + half.toString('base64'))));
      expect(e2.message).toMatch(new RegExp(`line ${at}: compressed block 1 of 1 of DataArray "temperature" \\(line \\d+\\) inflates to ${plain.length} bytes, but its header declares ${2 * plain.length}: the data is damaged`));
    });

    it('an appended offset past the end of the data', () => {
      const text = readFileSync(written!.grids.tetrahedra!.files['appended-base64-None-UInt32']!, 'latin1');
      const size = text.lastIndexOf('</AppendedData>') - text.indexOf('_', text.indexOf('<AppendedData')) - 1;
      const bad = text.replace(/(Name="types"[^>]*offset=")\d+"/, `$1${size + 5}"`);
      const e = problem(damaged('offset.vtu', bad));
      expect(e.message).toMatch(new RegExp(`line ${lineOf(text, 'Name="types"')}: DataArray "types" has offset="${size + 5}", past the end of the appended data \\(${size} characters, <AppendedData> at line \\d+\\): valid offsets are 0 to ${size - 1}`));
    });

    it('a header that declares more values than the piece has points', () => {
      const text = readFileSync(written!.grids.tetrahedra!.files['binary-None-UInt64']!, 'latin1');
      const n = Number(/NumberOfPoints="(\d+)"/.exec(text)![1]);
      const e = problem(damaged('count.vtu', text.replace(/NumberOfPoints="\d+"/, `NumberOfPoints="${n - 1}"`)));
      expect(e.message).toContain(`DataArray "Points" (line ${lineOf(text, 'Name="Points"')}) holds ${24 * n} bytes of Float64 (${3 * n} values), but the ${3 * (n - 1)} coordinates of NumberOfPoints="${n - 1}" need ${24 * (n - 1)} bytes`);
    });
  });
});

describe("rungs's own binary .vtu files read back", () => {
  const mesh = perturbMesh(rectangleMesh({ x: [0, 1.5], y: [0, 1], nx: 60, ny: 50, cells: 'triangles' }), { fraction: 0.3, seed: 7 });
  const temperature = new Float64Array(mesh.nVertices).map((_, v) => 1200 * Math.exp(-mesh.coords[2 * v]!) - 1 / 3);
  const flux = new Float64Array(3 * mesh.nVertices).map((_, i) => Math.sin(i) * 10 ** ((i % 50) - 25));
  flux[0] = NaN; flux[1] = -0; flux[2] = Infinity; flux[3] = -Infinity;
  flux[4] = new Float64Array(new BigUint64Array([0x7ff8_0000_dead_beefn]).buffer)[0]!; // a NaN with a payload
  const density = new Float64Array(mesh.nCells).map((_, c) => Math.PI ** -(c % 40));
  density[7] = NaN;

  it.each(['binary', 'raw'] as const)('%s: points, cells, point and cell data bit for bit, NaN and its payload, -0 and infinities included; the same as ASCII', (format) => {
    const file = join(root, `tile-${format}.vtu`);
    writeVtu(file, { mesh, format, pointData: { temperature, 'heat flux': { values: flux, components: 3 } }, cellData: { density } });
    for (const chunkBytes of [undefined, 11]) {
      const g = readVtkFile(file, undefined, { chunkBytes });
      const points = new Float64Array(3 * mesh.nVertices);
      for (let v = 0; v < mesh.nVertices; v++) { points[3 * v] = mesh.coords[2 * v]!; points[3 * v + 1] = mesh.coords[2 * v + 1]!; }
      expect(Buffer.compare(bytesOf(g.points), bytesOf(points))).toBe(0);
      expect(Buffer.compare(bytesOf(g.connectivity), bytesOf(mesh.cells.subarray(0, 3 * mesh.nCells)))).toBe(0);
      expect(g.types.every((t) => t === 5)).toBe(true); // VTK_TRIANGLE (vtkCellType.h)
      expect(g.pointData.map((p) => [p.name, p.components])).toEqual([['temperature', 1], ['heat flux', 3]]);
      expect(Buffer.compare(bytesOf(g.pointData[0]!.values), bytesOf(temperature))).toBe(0);
      expect(Buffer.compare(bytesOf(g.pointData[1]!.values), bytesOf(flux))).toBe(0);
      expect(g.cellData.map((p) => p.name)).toEqual(['density']);
      expect(Buffer.compare(bytesOf(g.cellData[0]!.values), bytesOf(density))).toBe(0);
    }
    // Finite data only: the ASCII file of the same grid reads the same.
    const asciiFile = join(root, 'tile-ascii.vtu'), binFile = join(root, `tile-${format}-finite.vtu`);
    writeVtu(asciiFile, { mesh, pointData: { temperature }, cellData: { density: density.map((d) => (Number.isNaN(d) ? 0 : d)) } });
    writeVtu(binFile, { mesh, format, pointData: { temperature }, cellData: { density: density.map((d) => (Number.isNaN(d) ? 0 : d)) } });
    expect(gridDiffs(readVtkFile(binFile), readVtkFile(asciiFile))).toEqual([]);
  });

  it('layouts rungs does not read, and integers beyond its indices, are refused naming the line and what is valid', () => {
    const small = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 1, cells: 'triangles' });
    const file = join(root, 'layout.vtu');
    writeVtu(file, { mesh: small, format: 'binary', cellData: { density: new Float64Array(small.nCells).fill(0.5) } });
    const text = readFileSync(file, 'latin1');
    const lineOf = (needle: string): number => text.slice(0, text.indexOf(needle)).split('\n').length;
    const refused = (name: string, changed: string): string => {
      const f = join(root, name);
      writeFileSync(f, changed, 'latin1');
      return problem(f).message.slice(f.length);
    };
    expect(refused('lz4.vtu', text.replace('header_type="UInt64"', 'header_type="UInt64" compressor="vtkLZ4DataCompressor"')))
      .toBe(' line 2: <VTKFile> has compressor="vtkLZ4DataCompressor"; rungs reads uncompressed data and vtkZLibDataCompressor (write with vtkXMLWriter::SetCompressorTypeToZLib or ToNone)');
    expect(refused('order.vtu', text.replace(/ byte_order="\w+"/, '')))
      .toBe(' line 2: <VTKFile> has byte_order=""; a file with binary data needs byte_order="LittleEndian" or "BigEndian"');
    expect(refused('header.vtu', text.replace('header_type="UInt64"', 'header_type="Int16"')))
      .toBe(' line 2: <VTKFile> has header_type="Int16"; VTK writes "UInt32" (the default) or "UInt64"');
    expect(refused('float-conn.vtu', text.replace('type="Int32" Name="connectivity"', 'type="Float32" Name="connectivity"')))
      .toBe(` line ${lineOf('Name="connectivity"')}: DataArray "connectivity" has type="Float32"; connectivity entries the offsets declare (last offset ${3 * small.nCells}) are integers: write them as Int8 … Int64 or UInt8 … UInt64`);
    expect(refused('type.vtu', text.replace('type="UInt8" Name="types"', 'type="Bit" Name="types"')))
      .toBe(` line ${lineOf('Name="types"')}: DataArray "types" has type="Bit"; binary DataArrays need one of Int8, UInt8, Int16, UInt16, Int32, UInt32, Int64, UInt64, Float32, Float64`);
    // An Int64 offset of 2^31, one more than the largest index rungs reads (Int32Array).
    const re = /(Name="offsets"[^>]*>\s*)([A-Za-z0-9+/=]+)/;
    const run = Buffer.from(re.exec(text)![2]!, 'base64');
    run.writeBigInt64LE(2n ** 31n, 8 + 8 * (small.nCells - 1));
    expect(refused('big-offset.vtu', text.replace(re, (_m, open: string) => open + run.toString('base64'))))
      .toBe(` line ${lineOf('Name="offsets"') + 1}: value ${small.nCells} of DataArray "offsets" (line ${lineOf('Name="offsets"')}) is 2147483648, beyond the largest index rungs reads (2147483647)`);
  });

  it('a non-finite coordinate in binary points is refused, naming the line', () => {
    const small = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 1, ny: 1, nz: 1, cells: 'tetrahedra' });
    const coords = small.coords.slice();
    coords[4] = NaN;
    const file = join(root, 'nan-point.vtu');
    writeVtu(file, { mesh: { ...small, coords }, format: 'binary' });
    const text = readFileSync(file, 'latin1');
    const at = text.slice(0, text.indexOf('<Points>')).split('\n').length + 1;
    expect(problem(file).message).toBe(`${file} line ${at}: coordinate 5 of coordinates of NumberOfPoints="${small.nVertices}" is NaN, not a finite number`);
  });
});

describe('the deflate ratio bound', () => {
  it(`zlib compresses 8 MiB of zeros no further than ${DEFLATE_MAX_RATIO}:1`, () => {
    // zlib's "technical details" give 1032:1 as deflate's largest ratio (from memory); the real zlib agrees.
    const plain = Buffer.alloc(8 << 20);
    const ratio = plain.length / deflateSync(plain, { level: 9 }).length;
    expect(ratio).toBeGreaterThan(1000);
    expect(ratio).toBeLessThanOrEqual(DEFLATE_MAX_RATIO);
  });
});
