import { RungsInputError } from '../errors.ts';
import { fromFunctions, assertFinite, compileFormula } from '../exact/index.ts';
import type { ManufacturedSolution } from '../exact/types.ts';
import { derive, diffusionConvectionReaction, manufacture, manufactureDerived, type DerivedProblem, type PdeDeclaration } from '../equation/index.ts';
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
  /** The PDE as data with every source and boundary datum derived from the exact solution (formula studies; null
   *  when the exact solution is given as functions or left out). Handed to external solvers as generated code. */
  derived: DerivedProblem | null;
  /** The PDE the study declares (today's scalar equation as its preset when the study gives only coefficients). */
  pde: PdeDeclaration;
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
  let derived: DerivedProblem | null = null;
  const pde = decl.pde ?? diffusionConvectionReaction(coef);
  try {
    if (decl.pde !== undefined) {
      derived = deriveDeclared(decl, pde);
      exact = scalarPresetSolution(decl, pde, derived, fields, box);
    } else if (decl.exact === undefined) {
      exact = null;
    } else if (typeof decl.exact === 'string') {
      ({ solution: exact, derived } = manufactureDerived({ dim, u: decl.exact, k: asFormula(coef.k), b: coef.b?.map(String), c: asFormula(coef.c) }, fields, { box }));
    } else if (isFieldRecord(decl.exact)) {
      throw new RungsInputError('exact: exact solutions per field need a pde (pde: { fields, equations } or a preset); for today\'s scalar equation give one formula string', file);
    } else {
      // Coefficient formulas compiled on their own, then handed to the function-based solution.
      const compiled = (c: Coefficient | undefined, name: 'k' | 'c') => (c === undefined ? undefined : typeof c === 'number' ? c : compileFormula(c, `coefficients.${name}`, dim));
      const bs = coef.b?.map((v, i) => (typeof v === 'number' ? () => v : compileFormula(v, `coefficients.b[${i}]`, dim)));
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
  if (bd.robin) alpha = compileFormula(String(bd.robin.alpha), 'boundary.robin.alpha', dim);
  const symmetric = decl.pde ? pde.preset?.name === 'diffusion-convection-reaction' && pde.preset.args.b === undefined : !coef.b;
  if (!exact) return { exact, coefficients: {}, boundary: {}, parts: { dirichlet, neumann, robin }, symmetric, derived, pde };
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
  return { exact, coefficients, boundary, parts: { dirichlet, neumann, robin }, symmetric, derived, pde };
}

function isFieldRecord(v: unknown): v is Record<string, string | string[]> {
  return typeof v === 'object' && v !== null && !('u' in v && typeof (v as { u: unknown }).u === 'function');
}

/** The exact solution per field of a study that declares its pde (one formula string stands for a single scalar
 *  field), derived symbolically. */
function deriveDeclared(decl: StudyDeclaration, pde: PdeDeclaration): DerivedProblem {
  if (decl.coefficients !== undefined) {
    throw new RungsInputError('coefficients: a study with a pde gives its coefficients in pde.coefficients (or as preset arguments)', 'coefficients');
  }
  const names = Object.keys(pde.fields ?? {});
  let exact: Record<string, string | readonly string[]>;
  if (typeof decl.exact === 'string') {
    if (names.length !== 1 || pde.fields[names[0]] !== 'scalar') {
      throw new RungsInputError(`exact: one formula fits a single scalar field; give one entry per field: { ${names.map((n) => `${n}: ${pde.fields[n] === 'vector' ? '[...]' : '\'...\''}`).join(', ')} }`, 'exact');
    }
    exact = { [names[0]]: decl.exact };
  } else if (decl.exact !== undefined && isFieldRecord(decl.exact)) {
    exact = decl.exact;
  } else {
    throw new RungsInputError(`exact: a study with a pde gives its exact solution as formulas per field: { ${names.join(', ')} }`, 'exact');
  }
  return derive({ dim: decl.domain.dim, pde, exact });
}

/** Today's scalar equation keeps rungs's own solver and error integration: its ManufacturedSolution, from the same
 *  derivation. Other equations have none (their errors come from the external code). */
function scalarPresetSolution(
  decl: StudyDeclaration, pde: PdeDeclaration, derived: DerivedProblem, fields: Record<string, string>, box: [number, number][],
): ManufacturedSolution | null {
  if (pde.preset?.name !== 'diffusion-convection-reaction' || derived.hasTime) return null;
  const args = pde.preset.args as { k?: Coefficient; b?: Coefficient[]; c?: Coefficient };
  const given = decl.exact as unknown;
  const u = typeof given === 'string' ? given : (given as Record<string, string>)[Object.keys(pde.fields)[0]];
  return manufacture({
    dim: decl.domain.dim, u,
    k: args.k === undefined ? undefined : String(args.k), b: args.b?.map(String), c: args.c === undefined ? undefined : String(args.c),
  }, fields, { box });
}
