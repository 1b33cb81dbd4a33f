import { RungsInputError } from '../errors.ts';
import { manufacture, fromFunctions, assertFinite } from '../exact/index.ts';
import type { ManufacturedSolution } from '../exact/types.ts';
import type { BoundarySpec, FormCoefficients } from '../fem/assemble/types.ts';
import type { Coefficient, StudyDeclaration } from './declaration.ts';

/** The PDE data of a study, derived once from its exact solution and coefficients. */
export interface StudyProblem {
  /** Null for an external study that reports quantities of interest and has no exact solution. */
  exact: ManufacturedSolution | null;
  coefficients: FormCoefficients;
  boundary: BoundarySpec;
  /** Tags of each boundary part, as resolved (Dirichlet defaults to every tag not given another condition). */
  parts: { dirichlet: string[]; neumann: string[]; robin: string[] };
  symmetric: boolean;
}

const asFormula = (c: Coefficient | undefined): string | undefined => (c === undefined ? undefined : String(c));

/** Derives ∇u, f and boundary data from the declaration; checks tags and that f is finite over the domain. */
export function buildProblem(decl: StudyDeclaration, file: string): StudyProblem {
  const where = `${file} (study '${decl.name}')`;
  const dim = decl.domain.dim;
  const coef = decl.coefficients ?? {};
  if (coef.b && coef.b.length !== dim) {
    throw new RungsInputError(`${where}: coefficients.b has ${coef.b.length} components; the domain is ${dim}-dimensional, give ${dim}`, file);
  }
  let exact: ManufacturedSolution | null = null;
  const fields = { u: 'exact', grad: 'exact.grad', f: 'exact.f', k: 'coefficients.k', b: 'coefficients.b', c: 'coefficients.c' };
  const box = decl.domain.bbox;
  try {
    if (decl.exact === undefined) {
      exact = null;
    } else if (typeof decl.exact === 'string') {
      exact = manufacture({ dim, u: decl.exact, k: asFormula(coef.k), b: coef.b?.map(String), c: asFormula(coef.c) }, fields, { box });
    } else {
      // Coefficient formulas compiled on their own, then handed to the function-based solution.
      const compiled = (c: Coefficient | undefined, name: 'k' | 'c') => (c === undefined ? undefined : typeof c === 'number' ? c : manufacture({ dim, u: c }, { u: `coefficients.${name}` }).u);
      const bs = coef.b?.map((v, i) => (typeof v === 'number' ? () => v : manufacture({ dim, u: v }, { u: `coefficients.b[${i}]` }).u));
      exact = fromFunctions({
        dim, u: decl.exact.u, grad: decl.exact.grad, f: decl.exact.f,
        k: compiled(coef.k, 'k'), c: compiled(coef.c, 'c'),
        b: bs ? (x: number, y: number, z: number, out: Float64Array) => { for (let i = 0; i < bs.length; i++) out[i] = bs[i](x, y, z); } : undefined,
      }, fields, { box });
    }
    if (exact) assertFinite(exact.f, 'source term f', box, 400);
  } catch (err) {
    if (err instanceof RungsInputError) throw new RungsInputError(`${where}: ${err.message}`, file);
    throw err;
  }

  const tags = decl.domain.tags;
  const bd = decl.boundary ?? {};
  const neumann = bd.neumann ?? [];
  const robin = bd.robin?.tags ?? [];
  const dirichlet = bd.dirichlet ?? tags.filter((t) => !neumann.includes(t) && !robin.includes(t));
  const all = [...dirichlet.map((t) => ['dirichlet', t]), ...neumann.map((t) => ['neumann', t]), ...robin.map((t) => ['robin.tags', t])];
  const seen = new Map<string, string>();
  for (const [part, t] of all) {
    if (!tags.includes(t)) {
      throw new RungsInputError(`${where}: boundary.${part}: unknown boundary tag '${t}'; the domain ${decl.domain.label} has tags ${tags.map((x) => `'${x}'`).join(', ')}`, file);
    }
    if (seen.has(t)) throw new RungsInputError(`${where}: boundary: tag '${t}' is given two conditions (${seen.get(t)} and ${part})`, file);
    seen.set(t, part);
  }

  if (decl.discretization.kind === 'lagrange' && dirichlet.length === 0 && robin.length === 0 && coef.c === undefined) {
    throw new RungsInputError(
      `${where}: boundary: every boundary part is Neumann and there is no reaction term c, so the solution is fixed only ` +
      'up to a constant and the system is singular; give a Dirichlet or Robin part (boundary.dirichlet / boundary.robin) or a reaction c > 0', file);
  }
  let alpha: ((x: number, y: number, z: number) => number) | undefined;
  if (bd.robin) {
    const a = manufacture({ dim, u: String(bd.robin.alpha) });
    alpha = a.u;
  }
  if (!exact) return { exact, coefficients: {}, boundary: {}, parts: { dirichlet, neumann, robin }, symmetric: !coef.b };
  const ex = exact;
  const coefficients: FormCoefficients = {
    k: coef.k === undefined ? undefined : ex.k,
    b: coef.b ? ex.b : undefined,
    c: coef.c === undefined ? undefined : ex.c,
    f: ex.f,
    hints: {
      k: ex.kDegreeHint,
      b: coef.b?.every((v) => typeof v === 'number') ? 0 : null,
      c: typeof coef.c === 'number' ? 0 : null,
      f: ex.fDegreeHint,
    },
  };
  const u = ex.u;
  const boundary: BoundarySpec = {
    dirichlet: dirichlet.length ? { tags: dirichlet, value: u } : undefined,
    neumann: neumann.length ? { tags: neumann, flux: ex.flux } : undefined,
    robin: alpha && robin.length
      ? { tags: robin, alpha, g: (x, y, z, nx, ny, nz) => ex.flux(x, y, z, nx, ny, nz) + alpha!(x, y, z) * u(x, y, z) }
      : undefined,
  };
  return { exact, coefficients, boundary, parts: { dirichlet, neumann, robin }, symmetric: !coef.b };
}
