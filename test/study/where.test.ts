import { spawnSync } from 'node:child_process';
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { executeStudies } from '../../src/cli/execute.ts';
import { readVtkFile } from '../../src/external/vtk/read.ts';
import { decodeErrorMap } from '../../src/mesh/raster.ts';
import { regionTable } from '../../src/report/error-map.ts';
import { singularityTest } from '../../src/study/where.ts';

// Where the error lives, through the bundled studies. Facts behind the expectations (each study file explains its
// flaw): the Dirichlet-node flaw shifts the data one node along every Dirichlet side, so its data are wrong on 'left',
// 'right' and 'top', but u = exp(x) sin(2y) + y vanishes on 'bottom' (y = 0) for every x, where a shifted value is
// still right (worked by hand); the Neumann-sign flaw flips the flux on 'right' and 'top' only. A sound study (P2 on
// a tile) converges at one order everywhere.
describe('where the error lives, on the bundled studies', async () => {
  const out = mkdtempSync(join(tmpdir(), 'rungs-where-'));
  afterAll(() => rmSync(out, { recursive: true, force: true }));
  const run = await executeStudies(['studies/flaw-dirichlet-node.study.ts', 'studies/flaw-neumann-sign.study.ts', 'studies/tile-p2.study.ts'], { out, quiet: true });
  const by = Object.fromEntries(run.results.map((r) => [r.study, r]));
  const reason = (study: string, norm: string) => by[study]!.where!.find((w) => w.norm === norm)!.analysis;

  it('the Dirichlet-node flaw is placed on the Dirichlet sides whose data are wrong, not on the one whose data vanish', () => {
    const r = reason('flaw-dirichlet-node', 'L2');
    expect(r.places.sort()).toEqual(['left', 'right', 'top']);
    expect(r.reason).toMatch(/the data on 'left', 'right' and 'top' is the likely cause/);
    expect(by['flaw-dirichlet-node']!.analyses.find((a) => a.name === 'L2')!.reasons.some((t) => t.startsWith('where: '))).toBe(true);
  });

  it('the Neumann-sign flaw is placed on the Neumann edges', () => {
    const r = reason('flaw-neumann-sign', 'L2');
    expect(r.places.sort()).toEqual(['right', 'top']);
  });

  it('a sound study has one order in every region, the expected one', () => {
    for (const [norm, p] of [['L2', 3], ['H1semi', 2]] as const) {
      const r = reason('tile-p2', norm);
      expect(r.pattern).toBe('uniform');
      expect(Math.abs(r.interior.order! - p)).toBeLessThan(0.1);
    }
  });

  it('writes errors.vtu for the finest two levels, readable by rungs\'s own reader, with the densities per cell', () => {
    const r = by['tile-p2']!;
    const n = r.levels.length;
    for (let k = 1; k <= n; k++) expect(existsSync(join(out, 'tile-p2', `level-${k}`, 'errors.vtu'))).toBe(k >= n - 1);
    const grid = readVtkFile(join(out, 'tile-p2', `level-${n}`, 'errors.vtu'));
    // The 2 × 1 tile at n cells per unit length: (2n + 1)(n + 1) vertices, 2 · 2n · n triangles (counted by hand).
    const m = r.levels[n - 1]!.n!;
    expect(grid.nPoints).toBe((2 * m + 1) * (m + 1));
    expect(grid.nCells).toBe(4 * m * m);
    expect(grid.pointData.map((a) => a.name).sort()).toEqual(['error', 'u', 'u_h']);
  });

  // VTK's own reader (Debian's python3-vtk9, installed by .ci/run): the file a user opens in a visualization tool.
  const python = ['/usr/bin/python3', 'python3'].find((py) => spawnSync(py, ['-c', 'import vtk'], { encoding: 'utf8' }).status === 0);
  it.skipIf(!python)(`errors.vtu opens in VTK's own reader with its arrays${python ? '' : ' (skipped: no python3 with `import vtk`)'}`, () => {
    const r = by['tile-p2']!;
    const n = r.levels.length;
    const file = join(out, 'tile-p2', `level-${n}`, 'errors.vtu');
    const script = [
      'import sys, vtk',
      'rd = vtk.vtkXMLUnstructuredGridReader(); rd.SetFileName(sys.argv[1]); rd.Update(); g = rd.GetOutput()',
      'pd, cd = g.GetPointData(), g.GetCellData()',
      'print(g.GetNumberOfPoints(), g.GetNumberOfCells(), sorted(pd.GetArrayName(i) for i in range(pd.GetNumberOfArrays())), sorted(cd.GetArrayName(i) for i in range(cd.GetNumberOfArrays())))',
    ].join('\n');
    const run = spawnSync(python!, ['-c', script, file], { encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    const m = r.levels[n - 1]!.n!;
    // Counts of the 2 × 1 tile as above (by hand).
    expect(run.stdout.trim()).toBe(`${(2 * m + 1) * (m + 1)} ${4 * m * m} ['error', 'u', 'u_h'] ['H1semi_density', 'L2_density']`);
  });

  it('hands the report the finest level\'s density maps and the local orders of the level below', () => {
    const maps = by['tile-p2']!.errorMaps!;
    expect(maps.map((m) => `${m.what}:${m.norm}`).sort()).toEqual(['density:H1semi', 'density:L2', 'local-order:L2']);
    const local = decodeErrorMap(maps.find((m) => m.what === 'local-order')!.map);
    // Local orders of P2 in L2 on a smooth solution: 3 in the bulk of the cells (Brenner & Scott 2008, Thm 4.4.20
    // for the global order; per cell it holds where the solution is smooth).
    const v = Array.from(local.values).filter((x) => Number.isFinite(x)).sort((a, b) => a - b);
    expect(Math.abs(v[Math.floor(v.length / 2)]! - 3)).toBeLessThan(0.2);
    // The same in the map's summary, weighted by area: the median on 3, and no more than a few per cent of the area
    // outside 3 ± 0.1 (the study's tolerance).
    const s = maps.find((m) => m.what === 'local-order')!.summary!;
    expect([s.covered, s.expected, s.tolerance]).toEqual([1, 3, 0.1]);
    expect(Math.abs(s.median - 3)).toBeLessThan(0.05);
    expect(s.below! + s.above!).toBeLessThan(0.05);
  });

  it('tabulates the order of every region in the report, the slow strips marked, with the reason per norm', () => {
    const html = regionTable(by['flaw-dirichlet-node']!);
    const rows = [...html.matchAll(/<tr><td class="text">([^<]+)<\/td>(<td[^>]*>.*?<\/td>)(<td[^>]*>.*?<\/td>)<\/tr>/g)]
      .map((m) => ({ region: m[1]!.replaceAll('&apos;', "'"), L2: m[2]!, H1semi: m[3]! }));
    // The interior first, then the four sides of the unit square in tag order, then the corners where two meet.
    expect(rows.slice(0, 5).map((r) => r.region)).toEqual(['interior', "strip along 'left'", "strip along 'right'", "strip along 'bottom'", "strip along 'top'"]);
    // In L2 the strips named as the cause are marked (the analysis above names them); 'bottom', where the data vanish, is not.
    expect(rows.filter((r) => r.L2.includes('●')).map((r) => r.region)).toEqual(["strip along 'left'", "strip along 'right'", "strip along 'top'"]);
    // In each column, the regions flagged slower than the interior are the ones the analysis flags.
    const a = reason('flaw-dirichlet-node', 'H1semi');
    const lowH1 = [a.interior, ...a.strips, ...a.meets].filter((o) => o.low).length;
    expect(rows.filter((r) => r.H1semi.includes('▼')).length).toBe(lowH1);
    expect(html.replaceAll('&apos;', "'")).toContain(`L2: ${reason('flaw-dirichlet-node', 'L2').reason}`);
    expect(regionTable({ ...by['tile-p2']!, where: undefined })).toBe('');
  });

  it('summarises the Neumann-sign flaw\'s local orders as below the expected order over the whole area', () => {
    // A flux of the wrong sign is an O(1) error in the data, so u_h converges to another solution: local order 0
    // everywhere (the flaw's own file explains it).
    const s = by['flaw-neumann-sign']!.errorMaps!.find((m) => m.what === 'local-order')!.summary!;
    expect(s.below).toBe(1);
    expect(Math.abs(s.median)).toBeLessThan(0.1);
  });

  it('--resume that reuses the finest two levels reads their cell errors back from errors.vtu for the local orders', async () => {
    const dir = join(out, 'resume');
    const first = await executeStudies(['studies/tile-p2.study.ts'], { out: dir, quiet: true });
    const again = await executeStudies(['studies/tile-p2.study.ts'], { out: dir, quiet: true, resume: true });
    expect(again.reused.get('tile-p2')).toEqual(first.results[0]!.levels.map((l) => l.index));
    const local = (r: typeof first) => decodeErrorMap(r.results[0]!.errorMaps!.find((m) => m.what === 'local-order')!.map).values;
    // ∫_K e² comes back as density² · |K| from the file, equal up to two roundings; the map holds float32 values.
    const a = local(first), b = local(again);
    let worst = 0;
    for (let i = 0; i < a.length; i++) if (Number.isFinite(a[i]!)) worst = Math.max(worst, Math.abs(a[i]! - b[i]!));
    expect(b.length).toBe(a.length);
    expect(worst).toBeLessThan(1e-5);
    // Without the coarser level's file, the study says why it has no local orders instead of dropping them silently.
    const n = first.results[0]!.levels.length;
    rmSync(join(dir, 'tile-p2', `level-${n - 1}`, 'errors.vtu'));
    const third = await executeStudies(['studies/tile-p2.study.ts'], { out: dir, quiet: true, resume: true });
    expect(third.results[0]!.errorMaps!.some((m) => m.what === 'local-order')).toBe(false);
    expect(third.results[0]!.warnings.some((w) => w.startsWith(`no local orders: level ${n - 1}'s cell errors`))).toBe(true);
  });

  it('computes the local orders also when the finest two levels ran on different workers', async () => {
    const par = await executeStudies(['studies/tile-p2.study.ts'], { out: join(out, 'workers'), quiet: true, jobs: 2, parallelMinDofs: 0 });
    const maps = par.results[0]!.errorMaps!;
    expect(maps.map((m) => `${m.what}:${m.level}`)).toEqual(['density:4', 'density:4', 'local-order:3']);
    // The same map as the serial run's: the levels are the same bits wherever they run.
    expect(maps[2]!.map).toEqual(by['tile-p2']!.errorMaps!.find((m) => m.what === 'local-order')!.map);
  });
});

describe('a slow strip put down to a singular point of the exact solution', () => {
  // u = r^(2/3) sin(2θ/3) on the L-shape: ∇u ∼ r^(−1/3) at the re-entrant corner (Grisvard 1985), so |∇u| grows by
  // 2^(4/3) ≈ 2.5 over the test's four halvings of the distance; u = exp(x) sin(2y) + y is smooth everywhere.
  const theta = (x: number, y: number) => { const t = Math.atan2(y, x); return t < 0 ? t + 2 * Math.PI : t; };
  const corner = (x: number, y: number, _z: number, out: Float64Array) => {
    const s = (2 / 3) / Math.cbrt(Math.hypot(x, y)), t = theta(x, y) / 3;
    out[0] = -s * Math.sin(t);
    out[1] = s * Math.cos(t);
  };
  const smooth = (x: number, y: number, _z: number, out: Float64Array) => {
    out[0] = Math.exp(x) * Math.sin(2 * y);
    out[1] = 2 * Math.exp(x) * Math.cos(2 * y) + 1;
  };

  it('singularityTest: the corner of r^(2/3) is singular; other points, and a smooth u anywhere, are not', () => {
    const atCorner = singularityTest(corner, 2, 1 / 32);
    expect(atCorner([0, 0])).toBe(true);
    expect([[0.5, 0.5], [-0.5, 0.25], [0, -1]].map(atCorner)).toEqual([false, false, false]);
    const s = singularityTest(smooth, 2, 1 / 32);
    expect([[0, 0], [1, 1], [0.5, 0]].map(s)).toEqual([false, false, false]);
  });

  it('the L-shaped tile: the slow strip along the re-entrant edges is put down to the corner, not to its data', async () => {
    const out = mkdtempSync(join(tmpdir(), 'rungs-where-corner-'));
    try {
      const run = await executeStudies(['studies/lshape-corner.study.ts'], { out, quiet: true });
      const r = run.results[0]!.where!.find((w) => w.norm === 'H1semi')!.analysis;
      expect(r.pattern).toBe('point');
      expect(r.places).toEqual([]);
      expect(r.reason).toMatch(/in the cells around \(0, 0\), where the exact solution is not smooth .*: the singularity at \(0, 0\), not the data on 'reentrant', is the likely cause/);
      // The report's region table marks that strip as owing its order to the point, and names no strip.
      const table = regionTable(run.results[0]!);
      expect(table).toMatch(/reentrant&apos;<\/td><td[^>]*>[^<]*<\/td><td class="num low">[^<]*<span class="low-mark"[^>]*>▼<\/span> <span class="point-mark"/);
      expect(table).not.toContain('class="named-mark"');
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  });
});
