import { describe, expect, it } from 'vitest';
import { defineStudy, rectangle, lagrange } from '../../src/index.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { runStudy } from '../../src/study/runner.ts';

// A loose solver must show up as a solver floor, never as a loss of order: the CG estimate of the algebraic error
// (Hestenes–Stiefel, Strakoš & Tichý 2002) is recorded per level and the analysis leaves levels at that floor out.
const base = {
  name: 'floor-probe',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * exp(y)',
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [8, 16, 32, 64, 128] },
  norms: ['L2' as const, 'H1semi' as const],
};

async function run(solver: Record<string, unknown>) {
  const decl = validateStudy(defineStudy({ ...base, solver } as never), 'floor-probe.study.ts');
  return runStudy({ file: 'floor-probe.study.ts', declaration: decl });
}

describe('solver tolerance tied to the discretization', () => {
  it('by default stops CG at a small fraction of the discretization error, and the orders are on-order', async () => {
    const r = await run({});
    for (const a of r.analyses) expect(a.verdict).toBe('on-order');
    const iterative = r.levels.filter((l) => l.algebraic);
    expect(iterative.length).toBeGreaterThan(2);
    for (const l of iterative) {
      // Algebraic error below 1e-3 of the energy interpolation error (Céa: the same order as the Galerkin error).
      expect(l.algebraic!.estimate).toBeLessThanOrEqual(l.algebraic!.target * 1.0001 + 1e-300);
      expect(l.algebraic!.floors.L2).toBeLessThan(l.errors.L2 * 0.01);
    }
    expect(r.levels.some((l) => l.solver?.stoppedBy === 'stopWhen')).toBe(true);
  });
  it('a loose residual tolerance gives a solver floor with a reason, not a below-order verdict', async () => {
    const r = await run({ relTol: 1e-3, errorFraction: 0, preconditioner: 'jacobi', method: 'cg' });
    const l2 = r.analyses.find((a) => a.name === 'L2')!;
    expect(l2.verdict).not.toBe('below-order');
    expect(l2.floorKind).toBe('solver');
    expect(l2.warnings.join(' ')).toMatch(/floor: solver tolerance from level \d/);
  });
});
