// The manufactured data handed to external codes: {data} and RUNGS_DATA, problem.json, the preflight check, an
// external code's own norms, values at a solver's points, and `rungs data`.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { executeStudies } from '../../src/cli/execute.ts';
import { LANGUAGES, FILE_NAMES } from '../../src/codegen/index.ts';
import { comparePreflight } from '../../src/study/preflight.ts';
import { studyBundle } from '../../src/study/data-files.ts';
import { buildProblem } from '../../src/study/problem.ts';
import { loadStudy } from '../../src/study/load.ts';
import { valuesAtPoints } from '../../src/study/values-at.ts';
import { parseCsvTable } from '../../src/csv/read.ts';

const tmp = mkdtempSync(join(tmpdir(), 'rungs-handoff-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

// Hand derivation (also in test/fixtures/handoff/tile-preflight-solver.mjs): u = e^{−x} sin 3y + x y, k = 1 + x y / 4,
// u_x = −e^{−x} sin 3y + y, u_y = 3 e^{−x} cos 3y + x, Δu = −8 e^{−x} sin 3y, −∇·(k∇u) = −kΔu − ∇k·∇u.
const k = (x: number, y: number) => 1 + 0.25 * x * y;
const ux = (x: number, y: number) => -Math.exp(-x) * Math.sin(3 * y) + y;
const uy = (x: number, y: number) => 3 * Math.exp(-x) * Math.cos(3 * y) + x;
const source = (x: number, y: number) => 8 * k(x, y) * Math.exp(-x) * Math.sin(3 * y) - (y / 4) * ux(x, y) - (x / 4) * uy(x, y);

describe('external studies receive their manufactured data', async () => {
  const out = join(tmp, 'run');
  const { results, problems } = await executeStudies(['test/fixtures/handoff'], { out, quiet: true });
  const msg = (file: string) => problems.find((p) => p.file.endsWith(file))?.message ?? `(no problem reported for ${file})`;

  it('the preflight passes when the solver\'s own source and flux agree, and the ladder runs', () => {
    const r = results.find((x) => x.study === 'handoff-preflight-good');
    expect(r?.levels).toHaveLength(3);
    expect(r?.inputs.preflight).toMatchObject({ compared: { source_balance: 3, flux_balance: 2 } });
  });

  it('the preflight refuses a solver whose source drops the ∇k·∇u term, naming the point and both values', () => {
    expect(results.some((x) => x.study === 'handoff-preflight-dropped')).toBe(false);
    const m = msg('preflight-dropped.study.ts');
    // The first row is (0.25, 0.5): the dropped value is −kΔu there; the derived one is the whole hand-derived source.
    const dropped = 8 * k(0.25, 0.5) * Math.exp(-0.25) * Math.sin(1.5);
    expect(m).toMatch(/preflight\.csv line 2: the solver's source_balance at \(x=0\.25, y=0\.5, z=0, t=0\)/);
    expect(m).toContain(`is ${dropped}`);
    const derived = Number(/the derived value is (\S+) /.exec(m)?.[1]);
    expect(Math.abs(derived - source(0.25, 0.5))).toBeLessThan(1e-12 * Math.abs(source(0.25, 0.5)));
  });

  it('every offered language and problem.json are written into {data}, formulas with ** and never ^', () => {
    const dir = join(out, 'handoff-elastic', 'data');
    const names = readdirSync(dir);
    for (const lang of LANGUAGES) expect(names).toContain(FILE_NAMES[lang].data);
    const json = JSON.parse(readFileSync(join(dir, 'problem.json'), 'utf8'));
    expect(json.pde.fields).toEqual({ u: 'vector' });
    expect(json.boundary.neumann).toEqual({ momentum: ['right', 'top'] });
    expect(json.boundary.dirichlet).toEqual({ u: ['left', 'bottom'] });
    const formulas = json.functions.flatMap((f: { outputs: { formula: string }[] }) => f.outputs.map((o) => o.formula)).join(' ');
    expect(formulas).not.toContain('^');
    expect(formulas).toContain('**');
    expect(json.functions.map((f: { name: string }) => f.name)).toEqual(
      ['exact_u', 'grad_u', 'source_momentum', 'flux_momentum', 'coef_lambda', 'coef_mu']);
  });

  it('an external code reports its own norms (L2_u, H1_u) with declared orders, analysed like rungs\'s own', () => {
    const r = results.find((x) => x.study === 'handoff-elastic')!;
    expect(r.analyses.map((a) => [a.name, a.expected, a.verdict])).toEqual([['L2_u', 3, 'on-order'], ['H1_u', 2, 'on-order']]);
    expect(readFileSync(join(out, 'handoff-elastic.csv'), 'utf8').split('\n')[0]).toMatch(/L2_u_error,L2_u_rate,H1_u_error,H1_u_rate/);
  });
});

describe('comparePreflight and values at points', async () => {
  const loaded = await loadStudy('test/fixtures/handoff/preflight-good.study.ts');
  const bundle = studyBundle(loaded.declaration, buildProblem(loaded.declaration, loaded.file))!;

  it('accepts round-off differences and names unknown data with the valid names', () => {
    const ok = `name,x,y,value\nsource_balance,0.3,0.7,${source(0.3, 0.7) * (1 + 1e-12)}\ngrad_u[1],0.3,0.7,${uy(0.3, 0.7)}\n`;
    expect(comparePreflight(bundle, ok, 'p.csv')).toEqual({ source_balance: 1, 'grad_u[1]': 1 });
    expect(() => comparePreflight(bundle, 'name,x,value\nsource_heat,0.1,1\n', 'p.csv')).toThrow(/p\.csv line 2: 'source_heat' is not a datum .* valid names: exact_u, grad_u\[0\], grad_u\[1\], source_balance, flux_balance, coef_k/);
    expect(() => comparePreflight(bundle, 'name,x,value\nsource_balance,0x10,1\n', 'p.csv')).toThrow(/column 'x' holds "0x10", not a decimal number/);
  });

  it('returns every datum the columns determine, flux only where normals are given', () => {
    const table = valuesAtPoints(bundle, parseCsvTable('x,y,nx,ny\n0.3,1,0,1\n', 'pts.csv'), 'pts.csv');
    const row = Object.fromEntries(table.header.map((h, i) => [h, table.rows[0][i]]));
    const close = (a: number, b: number) => Math.abs(a - b) <= 1e-13 * Math.max(1, Math.abs(b));
    expect(close(row.source_balance, source(0.3, 1))).toBe(true);
    expect(close(row.flux_balance, k(0.3, 1) * uy(0.3, 1))).toBe(true);
    expect(close(row['grad_u[0]'], ux(0.3, 1))).toBe(true);
    expect(valuesAtPoints(bundle, parseCsvTable('x,y\n0.3,1\n', 'pts.csv'), 'pts.csv').header).not.toContain('flux_balance');
  });
});

describe('rungs data', () => {
  const cli = (...args: string[]) => spawnSync(process.execPath, ['bin/rungs.mjs', 'data', ...args], { encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
  it('writes the languages asked for and prints the formulas', () => {
    const out = join(tmp, 'data');
    const r = cli('studies/tile-p2.study.ts', '--lang', 'c,python', '--out', out);
    expect(r.status).toBe(0);
    expect(readdirSync(join(out, 'tile-p2', 'data')).sort()).toEqual(['problem.json', 'rungs_data.h', 'rungs_data.py', 'rungs_data_selftest.c', 'rungs_data_selftest.py']);
    expect(r.stdout).toMatch(/source_balance = .*exp\(-x\)/);
  });
  it('gives values at the solver\'s points', () => {
    const pts = join(tmp, 'pts.csv');
    writeFileSync(pts, 'x,y\n0.25,0.5\n');
    const r = cli('test/fixtures/handoff/preflight-good.study.ts', '--at', pts);
    expect(r.status).toBe(0);
    const [head, row] = r.stdout.trim().split('\n').map((l) => l.split(','));
    expect(Math.abs(Number(row[head.indexOf('source_balance')]) - source(0.25, 0.5))).toBeLessThan(1e-12 * source(0.25, 0.5));
  });
  it('a language that is not offered is bad input (exit 2) naming the valid ones', () => {
    const r = cli('studies/tile-p2.study.ts', '--lang', 'cobol', '--out', join(tmp, 'x'));
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/--lang: language "cobol" is not offered; valid: c, cpp, fortran, python, julia, typescript, javascript/);
  });
});
