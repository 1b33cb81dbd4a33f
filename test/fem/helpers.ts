import { manufacture } from '../../src/equation/index.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { solveLagrange } from '../../src/fem/discretizations/lagrange.ts';
import { errorNorms } from '../../src/norms/errors.ts';
import type { BoundarySpec } from '../../src/fem/assemble/types.ts';

/** Solves −∇·(k∇u) + c u = f with u as a formula and all of the mesh's tags Dirichlet (unless neumann given);
 *  returns L2 and H1-seminorm errors. */
export function solveAndMeasure(mesh: Mesh, degree: number, u: string, opts: { k?: string; c?: string; b?: string[]; neumann?: string[] } = {}) {
  const ms = manufacture({ dim: mesh.dim as 1 | 2, u, k: opts.k, c: opts.c, b: opts.b });
  const neumann = opts.neumann ?? [];
  const dirichlet = mesh.tagNames.filter((t) => !neumann.includes(t));
  const boundary: BoundarySpec = {
    dirichlet: { tags: dirichlet, value: ms.u },
    neumann: neumann.length ? { tags: neumann, flux: ms.flux } : undefined,
  };
  const sol = solveLagrange({
    mesh, degree, boundary,
    coefficients: { k: opts.k ? ms.k : undefined, c: opts.c ? ms.c : undefined, b: opts.b ? ms.b : undefined, f: ms.f, hints: { k: ms.kDegreeHint, f: ms.fDegreeHint } },
  });
  const e = errorNorms(sol.field, ms, { k: opts.k ? ms.k : undefined });
  return { ...e, sol, ms };
}

export const rate = (e1: number, e2: number, h1: number, h2: number) => Math.log(e1 / e2) / Math.log(h1 / h2);
