// External codes of systems that hand back VTK: rungs measures the norms of its built-in systems on the fields of the
// file (L2_u, H1semi_u, div_u, energy, mean-free L2_p) with the orders of the preset; the stand-in
// test/fixtures/handoff/system-vtk/interpolant-solver.mjs writes the nodal interpolant of the exact solution on a mesh
// of its own, sound or with a flaw. Also the `fields` option's validation and the level errors of a bad file.
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { executeStudies } from '../../src/cli/execute.ts';
import { defineStudy, external, linearElasticity, rectangle, stokes } from '../../src/index.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { defaultNorms, expectedOrders } from '../../src/study/expected.ts';
import type { StudyResult } from '../../src/study/result.ts';
import { readVtkFile } from '../../src/external/vtk/read.ts';
import { decodeErrorMap } from '../../src/mesh/raster.ts';

const tmp = mkdtempSync(join(tmpdir(), 'rungs-system-vtk-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));
const dir = 'test/fixtures/handoff/system-vtk';
const interpolant = ['node', `${dir}/interpolant-solver.mjs`];

const glaze = {
  domain: rectangle([0, 1], [0, 1]),
  pde: stokes({ nu: '1 + 0.5*x*y' }),
  exact: { u: ['pi*sin(pi*x)^2*sin(2*pi*y)', '-pi*sin(2*pi*x)*sin(pi*y)^2'], p: '10*cos(pi*x)*cos(pi*y)' },
  ladder: { n: [4, 8, 16] },
};

/** A study file in the temporary folder, importing the library by its path (vitest runs without the loader that lends
 *  study files 'rungs'). */
const lib = pathToFileURL(resolve('src/index.ts')).href;
function studyFile(name: string, body: string): string {
  const file = join(tmp, `${name}.study.ts`);
  writeFileSync(file, [
    `import { defineStudy, external, rectangle, stokes } from '${lib}';`,
    'export default defineStudy({',
    `  name: '${name}',`,
    "  domain: rectangle([0, 1], [0, 1]), pde: stokes({ nu: '1 + 0.5*x*y' }),",
    "  exact: { u: ['pi*sin(pi*x)^2*sin(2*pi*y)', '-pi*sin(2*pi*x)*sin(pi*y)^2'], p: '10*cos(pi*x)*cos(pi*y)' },",
    body,
    '});',
  ].join('\n') + '\n');
  return file;
}
const command = (...args: string[]) => JSON.stringify([...interpolant.map((w) => (w.endsWith('.mjs') ? resolve(w) : w)), '--pde', 'stokes', ...args]);

describe('a Stokes code\'s VTK solution measured like rungs\'s own Taylor–Hood elements', async () => {
  const files = ['stokes-interpolant', 'stokes-offset', 'stokes-swapped'].map((f) => join(dir, `${f}.system-vtk.ts`));
  const p2 = studyFile('system-vtk-p2-pressure', `  discretization: external({ command: ${command('--p2-pressure')}, output: 'vtk', degree: 2, fields: { u: 'velocity', p: { array: 'pressure', degree: 2 } } }),
  norms: ['L2_u', 'L2_p'], expected: { L2_p: 3 }, ladder: { n: [4, 8, 16] },`);
  const notP1 = studyFile('system-vtk-not-p1', `  discretization: external({ command: ${command('--p2-pressure')}, output: 'vtk', degree: 2, fields: { u: 'velocity', p: 'pressure' } }),
  ladder: { n: [4, 8, 16] },`);
  // Two levels: this one checks what is measured and with which orders, not the verdicts.
  const defaults = studyFile('system-vtk-defaults', `  discretization: external({ command: ${command('--format', 'vtk', '--velocity', 'u', '--pressure', 'p')}, output: 'vtk', degree: 2 }),
  ladder: { n: [4, 8] },`);
  // Nearly incompressible elasticity (λ = 100): displacement and pressure, the mixed energy norm.
  const mixed = join(tmp, 'system-vtk-mixed.study.ts');
  writeFileSync(mixed, [
    `import { defineStudy, external, rectangle, nearlyIncompressibleElasticity } from '${lib}';`,
    'export default defineStudy({',
    "  name: 'system-vtk-mixed', domain: rectangle([0, 1], [0, 1]), pde: nearlyIncompressibleElasticity({ lambda: 100, mu: '1 + 0.5*x' }),",
    "  exact: { u: ['0.1*sin(pi*x)*y^2 + 0.05*x', '0.05*x*cos(y) + 0.02*x*y'], p: '-4*x*y + cos(pi*y)' },",
    "  boundary: { dirichlet: { u: ['left', 'bottom'] }, neumann: { momentum: ['right', 'top'] } },",
    `  discretization: external({ command: ${JSON.stringify([...interpolant.map((w) => (w.endsWith('.mjs') ? resolve(w) : w)), '--pde', 'mixed', '--velocity', 'displacement'])}, output: 'vtk', degree: 2, fields: { u: 'displacement', p: 'pressure' } }),`,
    "  ladder: { n: [4, 8, 16] }, norms: ['L2_u', 'H1semi_u', 'L2_p', 'energy'],",
    '});',
  ].join('\n') + '\n');
  const { results, problems } = await executeStudies([...files, p2, notP1, defaults, mixed], { out: join(tmp, 'out'), quiet: true });
  const result = (name: string): StudyResult => {
    const r = results.find((x) => x.study === name);
    if (!r) throw new Error(`no result for ${name}: ${problems.map((p) => p.message).join('; ')}`);
    return r;
  };
  const problemOf = (name: string) => problems.find((p) => p.study === name)?.message ?? `(no problem reported for ${name})`;
  const verdicts = (r: StudyResult) => Object.fromEntries(r.analyses.map((a) => [a.name, [a.expected, a.verdict]]));

  it('the nodal interpolant is on order in every norm: P2 velocity L2 3, H1 and div 2; P1 pressure L2 2 (interpolation estimates, Brenner & Scott 2008, Thm 4.4.20)', () => {
    const r = result('system-vtk-stokes-interpolant');
    expect(verdicts(r)).toEqual({ L2_u: [3, 'on-order'], H1semi_u: [2, 'on-order'], div_u: [2, 'on-order'], L2_p: [2, 'on-order'] });
    // Unknowns: (2n + 1)² velocity nodes × 2 + (n + 1)² pressure nodes (counted by hand for the n × n squares).
    expect(r.levels.map((l) => l.dofs)).toEqual([4, 8, 16].map((n) => 2 * (2 * n + 1) ** 2 + (n + 1) ** 2));
  });

  it('the file holds u_h = I_h u, so its errors are those of rungs\'s interpolant on the file\'s nodes (to round-off)', () => {
    const bad: string[] = [];
    for (const l of result('system-vtk-stokes-interpolant').levels) {
      for (const [nm, e] of Object.entries(l.errors)) {
        const i = l.interpolationErrors![nm]!;
        if (!(Math.abs(e - i) <= 1e-12 * i)) bad.push(`level ${l.index + 1} ${nm}: ${e} vs ${i}`);
      }
    }
    expect(bad).toEqual([]);
  });

  it('where the velocity error lives, as for rungs\'s own systems: regions, errors.vtu on the finest two levels, maps and local orders', () => {
    const r = result('system-vtk-stokes-interpolant');
    const n = r.levels.length;
    for (let k = 1; k <= n; k++) expect(existsSync(join(tmp, 'out', r.study, `level-${k}`, 'errors.vtu'))).toBe(k >= n - 1);
    expect(readVtkFile(join(tmp, 'out', r.study, `level-${n}`, 'errors.vtu')).pointData.map((a) => a.name).sort()).toEqual(['error', 'u', 'u_h']);
    const maps = r.errorMaps!;
    expect(maps.map((m) => `${m.what}:${m.norm}`).sort()).toEqual(['density:H1semi_u', 'density:L2_u', 'local-order:L2_u']);
    // The P2 interpolant's L2 error is O(h³) on every cell where u is smooth (Brenner & Scott 2008, Thm 4.4.20, applied
    // cell by cell), so both the regions and the median local order say 3.
    const v = Array.from(decodeErrorMap(maps.find((m) => m.what === 'local-order')!.map).values).filter(Number.isFinite).sort((a, b) => a - b);
    expect(Math.abs(v[Math.floor(v.length / 2)]! - 3)).toBeLessThan(0.2);
    const where = r.where!.find((w) => w.norm === 'L2_u')!.analysis;
    expect(where.pattern).toBe('uniform');
    expect(Math.abs(where.interior.order! - 3)).toBeLessThan(0.2);
  });

  it('a pressure written with a constant 1000 added: the mean-free L2_p does not see it (the pressure is fixed only up to a constant)', () => {
    const a = result('system-vtk-stokes-interpolant'), b = result('system-vtk-stokes-offset');
    expect(b.asExpected).toBe(true);
    expect(verdicts(b).L2_p).toEqual([2, 'on-order']);
    // The offset enters only through the rounding of values near 1000 (about 1e-13 absolute, common practice, no
    // source), far below the pressure error.
    a.levels.forEach((l, i) => {
      expect(Math.abs(b.levels[i]!.errors.L2_p! - l.errors.L2_p!)).toBeLessThan(1e-9 * l.errors.L2_p!);
      expect(b.levels[i]!.errors.L2_u).toBe(l.errors.L2_u);
    });
  });

  it('velocity components written the wrong way round: caught below order in every velocity norm, the pressure still on order', () => {
    const r = result('system-vtk-stokes-swapped');
    expect(verdicts(r)).toEqual({ L2_u: [3, 'below-order'], H1semi_u: [2, 'below-order'], div_u: [2, 'below-order'], L2_p: [2, 'on-order'] });
    expect(r.asExpected).toBe(true);
    // The swapped field does not converge at all: its rates stay at 0 (‖u − (u_y, u_x)‖ > 0 is a fixed distance).
    for (const a of r.analyses.filter((x) => x.name !== 'L2_p')) expect(Math.abs(a.fit?.order ?? Number.NaN)).toBeLessThan(0.1);
  });

  it('a quadratic pressure is refused as the P1 pressure of Taylor–Hood, naming the point, both values and the way out', () => {
    const m = problemOf('system-vtk-not-p1');
    expect(m).toMatch(/level 1 \(n = 4\): .*level-1[/\\]solution\.vtu line \d+: point data 'pressure' \(field p, degree 1\) is not a degree-1 field on the corners of the VTK_QUADRATIC_TRIANGLE cells: point \d+ \(.*\) holds .*, but the degree-1 interpolation of its cell's corners there \(the average of points \d+ and \d+\) is /);
    expect(m).toMatch(/fields: \{ p: \{ array: 'pressure', degree: 2 \} \}/);
  });

  it('declared as degree 2, the same quadratic pressure is measured as it is: L2_p of the P2 interpolant at order 3 (Brenner & Scott 2008, Thm 4.4.20)', () => {
    const r = result('system-vtk-p2-pressure');
    expect(verdicts(r)).toEqual({ L2_u: [3, 'on-order'], L2_p: [3, 'on-order'] });
    expect(r.levels[0]!.dofs).toBe(2 * 9 ** 2 + 9 ** 2);
  });

  it('without norms or fields: arrays named like the fields (legacy VECTORS and SCALARS), the norms and orders of rungs\'s own Taylor–Hood (Girault & Raviart 1986, ch. II §4)', () => {
    const r = result('system-vtk-defaults');
    expect(r.analyses.map((a) => [a.name, a.expected])).toEqual([['L2_u', 3], ['H1semi_u', 2], ['L2_p', 2]]);
    // The same file through the legacy reader as through .vtu: the interpolant's errors again (to round-off).
    const vtu = result('system-vtk-stokes-interpolant');
    r.levels.forEach((l, i) => { for (const nm of ['L2_u', 'H1semi_u', 'L2_p']) expect(Math.abs(l.errors[nm]! - vtu.levels[i]!.errors[nm]!)).toBeLessThan(1e-12 * l.errors[nm]!); });
  });

  it('nearly incompressible elasticity: the Taylor–Hood orders and the mixed energy norm, which holds the pressure part (1/λ)‖p − p_h‖² (Braess 2007, ch. VI §3)', () => {
    const r = result('system-vtk-mixed');
    expect(verdicts(r)).toEqual({ L2_u: [3, 'on-order'], H1semi_u: [2, 'on-order'], L2_p: [2, 'on-order'], energy: [2, 'on-order'] });
    // λ = 100 is constant, so the pressure part of the energy is ‖p − p_h‖/10: the energy cannot be smaller.
    for (const l of r.levels) expect(l.errors.energy!).toBeGreaterThanOrEqual(l.errors.L2_p! / 10);
    expect(r.levels.every((l) => l.quasiOptimality === null)).toBe(true);
  });
});

describe('the fields option is checked with the study', () => {
  const base = { name: 'glaze-check', ...glaze };
  const check = (extra: Record<string, unknown>) => {
    try {
      validateStudy(defineStudy({ ...base, ...extra } as never), 'glaze.study.ts');
    } catch (err) { return (err as Error).message; }
    return 'valid';
  };
  const vtk = (opts: Record<string, unknown>) => ({ discretization: external({ command: 'solver {out}', output: 'vtk', degree: 2, ...opts }) });

  it('accepts the arrays of the pde\'s fields, with a degree where wanted', () => {
    expect(check(vtk({ fields: { u: 'velocity', p: { array: 'pressure', degree: 1 } } }))).toBe('valid');
  });
  it('a name that is not a field of the pde, with the valid ones', () => {
    expect(check(vtk({ fields: { u: 'velocity', q: 'pressure' } }))).toMatch(/^glaze\.study\.ts \(study 'glaze-check'\): discretization\.fields\.q: 'q' is not a field of the study's pde; valid: u \(vector\), p \(scalar\)$/);
  });
  it('fields with output errors, fields for today\'s scalar equation, field for a system', () => {
    expect(check({ discretization: external({ command: 'solver', output: 'errors', degree: 2, fields: { u: 'velocity' } }) }))
      .toMatch(/discretization\.fields: names the VTK arrays of the fields, but output is 'errors'/);
    expect(check({ pde: undefined, exact: 'x*y', ...vtk({ fields: { u: 'temperature' } }) }))
      .toMatch(/discretization\.fields: today's scalar equation has one field: name its VTK array with field: '<array>'/);
    expect(check(vtk({ field: 'velocity' }))).toMatch(/discretization\.field: Stokes has the fields u \(vector\), p \(scalar\): name their VTK arrays with fields: \{ u: '<array>', p: '<array>' \}/);
  });
  it('a degree other than 1 or 2 for a field', () => {
    expect(check(vtk({ fields: { p: { array: 'pressure', degree: 3 } } }))).toMatch(/discretization\.fields\.p\.degree: /);
  });
  it('Taylor–Hood needs the velocity degree: missing, or below 2', () => {
    expect(check({ discretization: external({ command: 'solver', output: 'vtk', fields: { u: 'velocity', p: 'pressure' } }) }))
      .toMatch(/discretization\.degree: missing: give the velocity \(displacement\) degree k of the Taylor–Hood P_k–P_\(k−1\) elements/);
    expect(check(vtk({ degree: 1 }))).toMatch(/discretization\.degree: Taylor–Hood needs a velocity \(displacement\) degree of at least 2 .* fields: \{ p: \{ array: '<array>', degree: 1 \} \}/);
    expect(check(vtk({ degree: 1, fields: { u: 'velocity', p: { array: 'pressure', degree: 1 } } }))).toBe('valid');
  });
  it('a norm rungs does not measure on these fields, and a pde of the study\'s own without expected orders', () => {
    expect(check({ ...vtk({}), norms: ['L2_q'] })).toMatch(/norms\[0\]: 'L2_q' is not a norm rungs measures on the fields of stokes \(L2_u, H1semi_u, H1_u, maxNodal_u, div_u, L2_p, H1semi_p, H1_p, maxNodal_p\)/);
    const own = { fields: { u: 'vector', p: 'scalar' }, equations: { momentum: { flux: 'grad(u) - p*I' }, mass: { rest: 'div(u)' } }, meanFree: ['p'] };
    expect(check({ pde: own, ...vtk({}) })).toMatch(/expected\.L2_u: missing: the expected order of 'L2_u'; rungs derives no order for a pde of the study's own: declare it/);
    expect(check({ pde: own, ...vtk({}), expected: { L2_u: 3, H1semi_u: 2, L2_p: 2, H1semi_p: 1 } })).toBe('valid');
  });
  it('the default norms and orders are those of the preset at the study\'s degree (Taylor–Hood P2–P1; vector P2 elasticity: energy 2)', () => {
    const s = defineStudy({ ...base, ...vtk({}) } as never);
    expect(expectedOrders(s, defaultNorms(s))).toEqual({ L2_u: 3, H1semi_u: 2, L2_p: 2 });
    const e = defineStudy({
      name: 'bracket', domain: rectangle([0, 1], [0, 1]), pde: linearElasticity({ lambda: 2, mu: 1 }), exact: { u: ['x*y', 'sin(x)'] },
      ladder: { n: [4, 8] }, ...vtk({}),
    } as never);
    expect(expectedOrders(e, defaultNorms(e))).toEqual({ L2_u: 3, H1semi_u: 2, energy: 2 });
  });
});
