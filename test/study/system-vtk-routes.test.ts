// Two routes to the same numbers: rungs's own elasticity and Stokes elements run as built-in discretizations, and the
// same solvers run as an external code (test/fixtures/handoff/system-vtk/rungs-solver.ts, data from the generated
// rungs_data.mjs) that writes its solution to VTK, which rungs reads back and measures. Same mesh, same discrete
// solution, same norms: every error, interpolation error, dof count, h and Céa ratio must agree to round-off.
// (Measured on this machine they agree bit for bit; the test allows 1e-12 relative.) This is the strong check of the
// external path for systems: reader, node order, vector arrays with z = 0, the P1 pressure taken from the corners of
// the quadratic cells, the mean-free pressure norm, the elasticity energy norm and the norm selection.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { executeStudies } from '../../src/cli/execute.ts';

const tmp = mkdtempSync(join(tmpdir(), 'rungs-system-vtk-routes-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));
const dir = 'test/fixtures/handoff/system-vtk';

/** |a − b| ≤ 1e-12·|a| (round-off of the same computation done twice; common practice, no source). */
const same = (a: number, b: number) => a === b || Math.abs(a - b) <= 1e-12 * Math.abs(a);

describe('built-in and external routes give the same errors', async () => {
  const files = ['stokes-builtin', 'stokes-rungs', 'elastic-builtin', 'elastic-rungs'].map((f) => join(dir, `${f}.system-vtk.ts`));
  const { results, problems } = await executeStudies(files, { out: tmp, quiet: true });
  const byName = (name: string) => {
    const r = results.find((x) => x.study === name);
    if (!r) throw new Error(`no result for ${name}: ${problems.map((p) => p.message).join('; ')}`);
    return r;
  };

  it.each([
    ['Taylor–Hood P2–P1 Stokes, VTU with a three-component velocity and the pressure at every node', 'system-vtk-stokes'],
    ['vector P2 elasticity, legacy VTK with VECTORS named like the field', 'system-vtk-elastic'],
  ])('%s', (_what, stem) => {
    expect(problems).toEqual([]);
    const a = byName(`${stem}-builtin`), b = byName(`${stem}-rungs`);
    expect(b.levels.length).toBe(a.levels.length);
    const mismatches: string[] = [];
    a.levels.forEach((la, i) => {
      const lb = b.levels[i]!;
      if (la.dofs !== lb.dofs) mismatches.push(`level ${i + 1} dofs ${la.dofs} vs ${lb.dofs}`);
      if (!same(la.h, lb.h)) mismatches.push(`level ${i + 1} h ${la.h} vs ${lb.h}`);
      const qa = la.quasiOptimality ?? null, qb = lb.quasiOptimality ?? null;
      if ((qa === null) !== (qb === null) || (qa !== null && !same(qa, qb!))) {
        mismatches.push(`level ${i + 1} Céa ratio ${la.quasiOptimality} vs ${lb.quasiOptimality}`);
      }
      for (const nm of Object.keys(la.errors)) {
        if (!same(la.errors[nm]!, lb.errors[nm]!)) mismatches.push(`level ${i + 1} ${nm} ${la.errors[nm]} vs ${lb.errors[nm]}`);
        const ia = la.interpolationErrors![nm]!, ib = lb.interpolationErrors![nm]!;
        if (!same(ia, ib)) mismatches.push(`level ${i + 1} interpolant ${nm} ${ia} vs ${ib}`);
      }
    });
    expect(mismatches).toEqual([]);
    // Every norm of the built-in route is measured by the external route, with the same expected order.
    expect(b.analyses.map((x) => [x.name, x.expected])).toEqual(a.analyses.map((x) => [x.name, x.expected]));
  });

  it('the elasticity route reports the Céa ratio of the energy norm (Céa\'s lemma bounds it by 1; Braess 2007, ch. II §4)', () => {
    const b = byName('system-vtk-elastic-rungs');
    for (const l of b.levels) expect(l.quasiOptimality! > 0 && l.quasiOptimality! <= 1 + 1e-9).toBe(true);
  });
});
