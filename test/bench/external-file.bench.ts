// Reading a solver's VTK output from disk at about 1M points, as a level does (readVtkFile: file → grid → mesh and
// field), with the peak memory of each read measured in a fresh process. Run: npx tsx test/bench/external-file.bench.ts
// Files: legacy ASCII P1 triangles 1000² squares (1 002 001 points, 2M cells) and the same grid as .vtu: ASCII,
// binary as rungs writes it (inline base64, uncompressed: writeVtu format 'binary') and, when a python3 with VTK is
// found (Debian's python3-vtk9), rewritten by VTK's own writer as appended raw data compressed with zlib and as
// inline base64 compressed with zlib; written once into a temporary folder (removed at the end). Read speed is
// given in MB of file per second of wall time. Figures: median of 5 reads per file (wall and CPU time), median of
// 3 conversions of the parsed grid into mesh and field (gridToField); peak RSS
// of one read turned into a mesh and field in a child process, less that of a child that only loads the modules.
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { readVtkFile } from '../../src/external/vtk/read.ts';
import { gridToField } from '../../src/external/vtk/to-field.ts';
import { writeVtu } from '../../src/external/vtk/write.ts';

const self = fileURLToPath(import.meta.url);

if (process.argv[2] === '--child') {
  // One read (or none, for the baseline) in a fresh process; prints the peak RSS in bytes.
  const file = process.argv[3]!;
  if (file !== '-') gridToField(readVtkFile(file));
  console.log(process.resourceUsage().maxRSS * 1024);
  process.exit(0);
}

const { rectangleMesh } = await import('../../src/mesh/rectangle.ts');
const { legacyVtk, nodalGrid, vtuText } = await import('../external/vtk-writers.ts');
const N = Number(process.argv[2] ?? 1000);
const dir = mkdtempSync(join(tmpdir(), 'rungs-bench-vtk-'));
try {
  const u = (x: number, y: number) => 20 + 5 * Math.sin(3 * x) * Math.cos(2 * y);
  const grid = nodalGrid(rectangleMesh({ x: [0, 1], y: [0, 1], nx: N, ny: N, cells: 'triangles' }), 1, u);
  const files = [join(dir, 'solution.vtk'), join(dir, 'solution.vtu'), join(dir, 'solution-binary.vtu')];
  writeFileSync(files[0]!, legacyVtk(grid));
  writeFileSync(files[1]!, vtuText(grid));
  const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: N, ny: N, cells: 'triangles' });
  const values = new Float64Array(mesh.nVertices).map((_, v) => u(mesh.coords[2 * v]!, mesh.coords[2 * v + 1]!));
  writeVtu(files[2]!, { mesh, format: 'binary', pointData: { u: values } });
  const python = ['/usr/bin/python3', 'python3'].find((py) => spawnSync(py, ['-c', 'import vtk'], { encoding: 'utf8' }).status === 0);
  if (python) {
    const script = 'import sys, vtk\nr = vtk.vtkXMLUnstructuredGridReader(); r.SetFileName(sys.argv[1]); r.Update()\n' +
      'for path, mode, enc in ((sys.argv[2], "Appended", 0), (sys.argv[3], "Binary", 1)):\n' +
      '    w = vtk.vtkXMLUnstructuredGridWriter(); w.SetFileName(path); w.SetInputData(r.GetOutput())\n' +
      '    getattr(w, "SetDataModeTo" + mode)(); w.SetCompressorTypeToZLib(); w.SetEncodeAppendedData(enc); w.Write()\n';
    const more = [join(dir, 'solution-vtk-appended-raw-zlib.vtu'), join(dir, 'solution-vtk-binary-zlib.vtu')];
    const r = spawnSync(python, ['-c', script, files[2]!, ...more], { encoding: 'utf8' });
    if (r.status === 0) files.push(...more);
    else console.log(`VTK's writer failed, its files are left out: ${r.stderr.slice(0, 300)}`);
  } else console.log('no python3 with `import vtk`: the files written by VTK are left out');
  const child = (file: string) => Number(execFileSync(process.execPath, ['--import', 'tsx', self, '--child', file], { encoding: 'utf8' }).trim());
  const baseRss = child('-');
  console.log(`P1 triangles ${N}² squares: ${grid.points.length} points, ${grid.cells.length} cells; child baseline RSS ${(baseRss / 2 ** 20).toFixed(0)} MiB`);
  for (const file of files) {
    const size = statSync(file).size;
    // Wall and CPU time (all threads of the process, so the collector's work counts) of each read.
    const wall: number[] = [];
    const cpu: number[] = [];
    for (let k = 0; k < 5; k++) {
      const t = performance.now();
      const c = process.cpuUsage();
      readVtkFile(file);
      const used = process.cpuUsage(c);
      wall.push(performance.now() - t);
      cpu.push((used.user + used.system) / 1e3);
    }
    const t = performance.now();
    const grid = readVtkFile(file);
    const parsed = performance.now();
    gridToField(grid);
    const end = performance.now();
    const whole = end - t;
    // The parsed grid turned into a mesh and field (checks of the mesh, fold and overlap checks, the Lagrange space).
    const toField: number[] = [end - parsed];
    for (let k = 0; k < 2; k++) {
      const s = performance.now();
      gridToField(grid);
      toField.push(performance.now() - s);
    }
    const peak = child(file);
    const med = (a: number[]) => [...a].sort((x, y) => x - y)[a.length >> 1]!;
    const name = file.slice(dir.length + 1);
    console.log(`${name} ${(size / 1e6).toFixed(1)} MB: read, median of 5: ${med(wall).toFixed(0)} ms wall (${(size / 1e3 / med(wall)).toFixed(0)} MB/s), ` +
      `${med(cpu).toFixed(0)} ms CPU (wall ${wall.map((x) => x.toFixed(0)).join(', ')}); read + mesh + field ${whole.toFixed(0)} ms; ` +
      `grid → mesh + field, median of 3: ${med(toField).toFixed(0)} ms (${toField.map((x) => x.toFixed(0)).join(', ')}); ` +
      `peak RSS of one read ${(peak / 2 ** 20).toFixed(0)} MiB (${((peak - baseRss) / 2 ** 20).toFixed(0)} MiB above baseline, ` +
      `${((peak - baseRss) / size).toFixed(2)} bytes per byte of file)`);
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
