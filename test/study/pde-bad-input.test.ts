import { describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll } from 'vitest';
import { executeStudies } from '../../src/cli/execute.ts';

// Bad pde declarations: one clear message each, naming the study, the field path and what would be valid; the sound
// study in the same folder still runs.
describe('bad pde input', async () => {
  const out = mkdtempSync(join(tmpdir(), 'rungs-pde-bad-'));
  afterAll(() => rmSync(out, { recursive: true, force: true }));
  const { results, problems } = await executeStudies(['test/fixtures/pde-bad'], { out, quiet: true });
  const msg = (file: string) => problems.find((p) => p.file.endsWith(file))?.message ?? `(no problem reported for ${file})`;

  it('still runs the sound Stokes study, with its own norms', () => {
    expect(results.map((r) => [r.study, r.asExpected])).toEqual([['pde-good-stokes', true]]);
    expect(problems).toHaveLength(11);
  });
  it('an expression that does not parse', () => expect(msg('unparsable.study.ts')).toMatch(/\(study 'pde-bad-unparsable'\): pde\.equations\.balance\.flux: cannot parse "grad\(u": Parenthesis \) expected/));
  it('a field that is not declared, listing what is', () => expect(msg('undeclared.study.ts')).toMatch(/pde\.equations\.balance\.flux: the name "w" is not declared in "grad\(w\)"; valid: fields and coefficients u;/));
  it('a flux whose shape does not match the field', () => expect(msg('flux-shape.study.ts')).toMatch(/pde\.equations\.balance\.flux: the flux is a matrix, which makes a vector equation, but no field is a vector \(u: scalar\)/));
  it('a number of equations that does not match the unknowns', () => expect(msg('count.study.ts')).toMatch(/pde\.equations: 2 scalar equation\(s\) \(momentum: a vector\) for 3 unknown component\(s\) \(u: vector, p: scalar\)/));
  it('a pressure whose mean nothing fixes', () => expect(msg('mean-unfixed.study.ts')).toMatch(/pde\.meanFree: the field 'p' is fixed only up to a constant .* declare meanFree: \['p'\]/));
  // ∫∫ x y dx dy over the unit square = 1/4 (exact integral).
  it('a mean-free field whose exact solution has a mean, with the mean', () => expect(msg('mean-nonzero.study.ts')).toMatch(/exact\.p: the field is mean-free but its exact solution has mean 0\.2499999999\d* over the domain/));
  it('a boundary part for a field that is not declared', () => expect(msg('unknown-field-boundary.study.ts')).toMatch(/boundary\.dirichlet\.w: 'w' is not a declared field; valid: u, p/));
  it('a custom discretization asked to take elasticity', () => expect(msg('builtin-vector.study.ts')).toMatch(/discretization: a custom discretization \(whose field rungs measures\) takes only the steady diffusionConvectionReaction preset; for linear elasticity use external/));
  it('a saddle-point system sent to CG', () => expect(msg('stokes-cg.study.ts')).toMatch(/\(study 'pde-bad-stokes-cg'\): solver\.method: 'cg' cannot solve the saddle-point system of Stokes flow \(symmetric but indefinite\)/));
  // ν = λ / (2(λ + μ)) = −1.5 / (2 · (−0.5)) = 1.5 (exact arithmetic).
  it('a displacement-only formulation beyond ν = 1/2', () => expect(msg('elastic-incompressible.study.ts')).toMatch(/pde\.coefficients\.lambda: λ = -1\.5 with μ = 1 at .*Poisson's ratio ν = 1\.500.*needs −1 < ν < 1\/2/));
  it('elasticity with no part of the boundary holding the displacement', () => expect(msg('elastic-floating.study.ts')).toMatch(/boundary\.dirichlet: no part of the boundary fixes the displacement u, so rigid-body motions solve the homogeneous problem/));
});
