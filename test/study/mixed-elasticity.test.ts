import { describe, expect, it } from 'vitest';
import { runStudy } from '../../src/study/runner.ts';
import { defineStudy, lagrange } from '../../src/study/declaration.ts';
import { rectangle } from '../../src/study/domain.ts';
import { linearElasticity, nearlyIncompressibleElasticity } from '../../src/equation/index.ts';
import { derive } from '../../src/equation/derive.ts';
import { compileBundle, dataBundle } from '../../src/equation/bundle.ts';
import type { StudyDeclaration } from '../../src/study/declaration.ts';
import { RungsInputError } from '../../src/errors.ts';

// The mixed displacement–pressure formulation of nearly incompressible elasticity on rungs's own Taylor–Hood elements
// (a rubber-like gasket pad between kiln tiles; invented data). Expected orders for displacement degree k: L2_u k+1,
// H1semi_u k, L2_p k, with constants independent of λ (Braess 2007, Finite Elements, ch. VI §3, Thm 3.6, numbering
// from memory; Boffi, Brezzi & Fortin 2013, §8.12).
const run = (d: StudyDeclaration) => runStudy({ file: `inline:${d.name}`, declaration: d });
const verdicts = (r: Awaited<ReturnType<typeof run>>) => Object.fromEntries(r.analyses.map((a) => [a.name, `${a.verdict}: ${a.reasons[0]}`]));

/** A divergence-free shear (the curl of 0.1 sin(πx) sin(πy)) plus a compressible part 10/λ·(x eʸ, y eˣ), whose
 *  pressure −λ∇·u = −10(eˣ + eʸ) does not depend on λ (by hand: ∇·(x eʸ, y eˣ) = eʸ + eˣ). */
const pad = (lambda: number) => ({
  u: [`0.1*pi*sin(pi*x)*cos(pi*y) + ${10 / lambda}*x*exp(y)`, `-0.1*pi*cos(pi*x)*sin(pi*y) + ${10 / lambda}*y*exp(x)`],
  p: '-10*(exp(x) + exp(y))',
});
const clamped = { dirichlet: { u: ['bottom', 'top'] }, neumann: { momentum: ['left', 'right'] } };

describe('the preset nearlyIncompressibleElasticity', () => {
  const at = [0.3, 0.7];
  const sourceOf = (exact: { u: string[]; p: string }, lambda: number): number => {
    const d = derive({ dim: 2, pde: nearlyIncompressibleElasticity({ lambda, mu: 1 }), exact });
    const f = compileBundle(dataBundle('pad', d)).functions.get('source_mass')!;
    const out = new Float64Array(1);
    f.evaluate(Float64Array.from([at[0], at[1], 0, 0]), out);
    return out[0];
  };

  it('the constraint equation ∇·u + p/λ has source zero when the given p is −λ∇·u, and ∇·u + p/λ otherwise', () => {
    // By hand at (0.3, 0.7): ∇·u = 10/λ (e^0.7 + e^0.3) (the shear part is divergence-free).
    const lambda = 1e4;
    const divU = (10 / lambda) * (Math.exp(0.7) + Math.exp(0.3));
    expect(Math.abs(sourceOf(pad(lambda), lambda))).toBeLessThan(1e-15);
    expect(sourceOf({ ...pad(lambda), p: '0' }, lambda)).toBeCloseTo(divU, 15);
    expect(sourceOf({ ...pad(lambda), p: 'x' }, lambda)).toBeCloseTo(divU + 0.3 / lambda, 15);
  });

  it('declares u (vector) and p (scalar), the flux 2μ ε(u) − pI, and no mean-free field', () => {
    const pde = nearlyIncompressibleElasticity({ lambda: 1e4, mu: 1 });
    expect(pde.fields).toEqual({ u: 'vector', p: 'scalar' });
    expect(pde.equations.momentum.flux).toBe('2*mu*sym(grad(u)) - p*I');
    expect(pde.meanFree).toBeUndefined();
    expect(pde.preset?.name).toBe('nearly-incompressible-elasticity');
  });
});

describe('Taylor–Hood mixed elasticity through the study runner', () => {
  it.each([
    [2, [4, 8, 16, 32]],
    [3, [2, 4, 8, 16]],
  ])('Taylor–Hood with displacement degree %i at λ/μ = 1e4: L2_u, H1semi_u, L2_p, energy on order', async (k, n) => {
    const r = await run(defineStudy({
      name: `pad-p${k}`,
      domain: rectangle([0, 1], [0, 1]),
      pde: nearlyIncompressibleElasticity({ lambda: 1e4, mu: 1 }),
      exact: pad(1e4),
      boundary: clamped,
      discretization: lagrange({ degree: k }),
      ladder: { n },
      norms: ['L2_u', 'H1semi_u', 'L2_p', 'energy'],
    }));
    expect(r.asExpected, JSON.stringify(verdicts(r))).toBe(true);
    expect(r.analyses.map((a) => a.verdict)).toEqual(['on-order', 'on-order', 'on-order', 'on-order']);
    expect(r.levels.every((l) => l.solver?.method === 'minres' && l.quasiOptimality === null)).toBe(true);
  });

  it('with the displacement fixed on the whole boundary the pressure is still determined (no mean-free declaration)', async () => {
    const r = await run(defineStudy({
      name: 'pad-walls',
      domain: rectangle([0, 1], [0, 1]),
      pde: nearlyIncompressibleElasticity({ lambda: 1e6, mu: '1 + 0.5*x' }),
      exact: pad(1e6),
      discretization: lagrange({ degree: 2 }),
      ladder: { n: [4, 8, 16, 32] },
      norms: ['L2_u', 'H1semi_u', 'L2_p'],
    }));
    expect(r.asExpected, JSON.stringify(verdicts(r))).toBe(true);
  });

  it('refuses λ ≤ 0 and a displacement degree below 2', async () => {
    const base = { domain: rectangle([0, 1], [0, 1]), exact: pad(1e4), boundary: clamped, ladder: { n: [4, 8] } };
    await expect(run(defineStudy({ ...base, name: 'bad-lambda', pde: nearlyIncompressibleElasticity({ lambda: '-1 + 0*x', mu: 1 }), discretization: lagrange({ degree: 2 }) })))
      .rejects.toThrow(/λ = -1.*finite λ > 0/);
    await expect(run(defineStudy({ ...base, name: 'bad-degree', pde: nearlyIncompressibleElasticity({ lambda: 1e4, mu: 1 }), discretization: lagrange({ degree: 1 }) })))
      .rejects.toThrow(RungsInputError);
  });
});

describe('robustness in λ: the mixed method does not lock, P1 displacement does', () => {
  const finest = async (pde: StudyDeclaration['pde'], lambda: number, degree: number, n: number[]) => {
    const r = await run(defineStudy({
      name: `robust-${degree}-${lambda}`, domain: rectangle([0, 1], [0, 1]), pde, exact: degree === 1 ? { u: pad(lambda).u } : pad(lambda),
      boundary: clamped, discretization: lagrange({ degree }), ladder: { n }, norms: ['L2_u'],
    }));
    const last = r.levels[r.levels.length - 1];
    return { error: last.errors.L2_u, interpolation: last.interpolationErrors!.L2_u };
  };

  it('Taylor–Hood P2–P1: the finest L2_u error at λ = 1e6 is within a factor 2 of the one at λ = 1e2', async () => {
    // Braess 2007, ch. VI §3: the error bound of a stable mixed method holds with a constant independent of λ; the
    // exact u changes by O(1/λ) between the two (pad()), far below the error.
    const a = await finest(nearlyIncompressibleElasticity({ lambda: 1e2, mu: 1 }), 1e2, 2, [8, 16]);
    const b = await finest(nearlyIncompressibleElasticity({ lambda: 1e6, mu: 1 }), 1e6, 2, [8, 16]);
    const ratio = b.error / a.error;
    expect(ratio, `L2_u ${a.error} at λ = 1e2, ${b.error} at λ = 1e6`).toBeGreaterThan(0.5);
    expect(ratio).toBeLessThan(2);
  });

  it('vector P1 displacement: the finest L2_u error grows more than tenfold from λ = 1e2 to 1e6 and stays far above interpolation', async () => {
    // Locking (Babuška & Suri 1992, Numer. Math. 62; Brenner & Scott 2008, ch. 11, from memory): on a uniform
    // triangulation the discretely divergence-free P1 fields are too few, so as λ grows the discrete displacement is
    // pinned to them and its error tends to a λ-independent, h-insensitive limit instead of the interpolation
    // error. At λ = 1e2 (√(λ/μ)·h = 10/64) it is still near the asymptotic regime. The factors 10 and 100 are loose
    // (common practice, no source).
    const a = await finest(linearElasticity({ lambda: 1e2, mu: 1 }), 1e2, 1, [32, 64]);
    const b = await finest(linearElasticity({ lambda: 1e6, mu: 1 }), 1e6, 1, [32, 64]);
    const report = `L2_u ${a.error} at λ = 1e2, ${b.error} at λ = 1e6 (interpolation ${b.interpolation})`;
    expect(b.error / a.error, report).toBeGreaterThan(10);
    expect(b.error / b.interpolation, report).toBeGreaterThan(100);
  });
});
