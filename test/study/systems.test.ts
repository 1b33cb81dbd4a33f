import { describe, expect, it } from 'vitest';
import { runStudy } from '../../src/study/runner.ts';
import { defineStudy, lagrange } from '../../src/study/declaration.ts';
import { rectangle } from '../../src/study/domain.ts';
import { linearElasticity, nonlinearDiffusion, stokes } from '../../src/equation/index.ts';
import type { StudyDeclaration } from '../../src/study/declaration.ts';

// rungs's own elements for systems and a nonlinear equation, through the whole study pipeline. The verdicts come
// from the expected orders theory gives (src/study/discretizations/system-norms.ts, with its sources): vector P_k
// elasticity L2 k+1, H1 seminorm and energy k (Braess 2007, ch. VI); Taylor–Hood P_k–P_(k−1) velocity L2 k+1,
// H1 k, pressure L2 k (Girault & Raviart 1986, ch. II §4); nonlinear diffusion as the linear case (Xu 1996,
// from memory).
const run = (d: StudyDeclaration) => runStudy({ file: `inline:${d.name}`, declaration: d });
const verdicts = (r: Awaited<ReturnType<typeof run>>) => Object.fromEntries(r.analyses.map((a) => [a.name, `${a.verdict}: ${a.reasons[0]}`]));

describe('built-in systems through the study runner', () => {
  it.each([1, 3])('elasticity with vector P%i: L2_u, H1semi_u, energy and div_u on order, Céa ratio at most 1', async (k) => {
    const r = await run(defineStudy({
      name: `elastic-p${k}`,
      domain: rectangle([0, 1], [0, 1], { diagonal: 'alternating' }),
      pde: linearElasticity({ lambda: '1 + x', mu: 1 }),
      exact: { u: ['sin(x)*y^2 + 0.1*x', 'x*cos(y) - 0.2*y'] },
      boundary: { dirichlet: { u: ['left', 'top'] }, neumann: { momentum: ['right', 'bottom'] } },
      discretization: lagrange({ degree: k }),
      ladder: { n: k === 1 ? [4, 8, 16, 32, 64] : [2, 4, 8, 16] },
      norms: ['L2_u', 'H1semi_u', 'energy', 'div_u'],
    }));
    expect(r.asExpected, JSON.stringify(verdicts(r))).toBe(true);
    // Céa's lemma in the energy norm: the Galerkin error is at most the interpolation error (up to quadrature).
    const ratios = r.levels.map((l) => l.quasiOptimality ?? NaN);
    expect(Math.max(...ratios)).toBeLessThan(1.001);
  });

  it('Taylor–Hood P3–P2 Stokes with a mean-free pressure: velocity L2 4, H1 3, pressure L2 3', async () => {
    const r = await run(defineStudy({
      name: 'stokes-p3',
      domain: rectangle([0, 1], [0, 1]),
      pde: stokes({ nu: 0.5 }),
      exact: { u: ['pi*sin(pi*x)^2*sin(2*pi*y)', '-pi*sin(2*pi*x)*sin(pi*y)^2'], p: '10*cos(pi*x)*cos(pi*y)' },
      discretization: lagrange({ degree: 3 }),
      ladder: { n: [2, 4, 8, 16, 32] },
      norms: ['L2_u', 'H1semi_u', 'L2_p', 'div_u'],
    }));
    expect(r.asExpected, JSON.stringify(verdicts(r))).toBe(true);
    expect(r.levels.every((l) => l.solver?.method === 'minres')).toBe(true);
  });

  it('Stokes with an outflow edge: the traction fixes the pressure, no mean needed', async () => {
    const r = await run(defineStudy({
      name: 'stokes-outflow',
      domain: rectangle([0, 1], [0, 1]),
      pde: stokes({ nu: 1, meanFree: false }),
      exact: { u: ['pi*sin(pi*x)^2*sin(2*pi*y)', '-pi*sin(2*pi*x)*sin(pi*y)^2'], p: '10*cos(pi*x)*cos(pi*y) + x' },
      boundary: { dirichlet: { u: ['left', 'bottom', 'top'] }, neumann: { momentum: ['right'] } },
      discretization: lagrange({ degree: 2 }),
      ladder: { n: [4, 8, 16, 32, 64] },
      norms: ['L2_u', 'H1semi_u', 'L2_p'],
    }));
    expect(r.asExpected, JSON.stringify(verdicts(r))).toBe(true);
  });

  it('nonlinear diffusion with P1 and a Neumann edge: Newton to a fraction of the discretization error', async () => {
    const r = await run(defineStudy({
      name: 'nonlinear-p1',
      domain: rectangle([0, 1], [0, 1]),
      pde: nonlinearDiffusion({ conductivity: '2 + sin(u)', reaction: 'u^3' }),
      exact: 'exp(x)*sin(y) + 0.5',
      boundary: { dirichlet: ['left', 'bottom'], neumann: ['right', 'top'] },
      discretization: lagrange({ degree: 1 }),
      ladder: { n: [8, 16, 32, 64] },
    }));
    expect(r.asExpected, JSON.stringify(verdicts(r))).toBe(true);
    // The nonlinear error left by Newton is recorded against its target (a fraction of the interpolation error).
    expect(r.levels.every((l) => l.algebraic && l.algebraic.estimate <= l.algebraic.target)).toBe(true);
  });
});
