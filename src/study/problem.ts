import { RungsInputError } from '../errors.ts';
import { fromFunctions, assertFinite, compileFormula } from '../exact/index.ts';
import type { ManufacturedSolution } from '../exact/types.ts';
import { derive, diffusionConvectionReaction, manufactureDerived, solutionOf, type DerivedProblem, type PdeDeclaration } from '../equation/index.ts';
import type { BoundarySpec, FormCoefficients } from '../fem/assemble/types.ts';
import type { Coefficient, StudyDeclaration } from './declaration.ts';
import { resolveBoundary, type BoundaryByName, type BoundaryParts } from './boundary-parts.ts';
import { constantDependence } from '../equation/mean-free.ts';
import { compileOutputs } from '../exact/compile.ts';
import { domainMean } from './domain-mean.ts';
import { domainSamples } from '../exact/domain-samples.ts';
import { checkScalarData } from '../exact/coefficient-checks.ts';
import type { Mesh } from '../mesh/types.ts';

/** The PDE data of a study, derived once from its exact solution and coefficients. */
export interface StudyProblem {
  /** Null for an external study that reports quantities of interest and has no exact solution. */
  exact: ManufacturedSolution | null;
  coefficients: FormCoefficients;
  boundary: BoundarySpec;
  /** Tags of each boundary part, as resolved (Dirichlet defaults to every tag not given another condition). */
  parts: BoundaryParts;
  /** The same per field (Dirichlet) and per equation (Neumann, Robin). */
  byName: BoundaryByName;
  /** Things the user should hear before the run (a mean-free field that something else already fixes). */
  warnings: string[];
  symmetric: boolean;
  /** The PDE as data with every source and boundary datum derived from the exact solution (formula studies; null
   *  when the exact solution is given as functions or left out). Handed to external solvers as generated code. */
  derived: DerivedProblem | null;
  /** The PDE the study declares (today's scalar equation as its preset when the study gives only coefficients). */
  pde: PdeDeclaration;
}

/** The presets rungs's own elements solve besides today's scalar equation (src/study/discretizations/). */
const BUILT_IN_SYSTEMS = new Set(['linear-elasticity', 'stokes', 'nonlinear-diffusion', 'nearly-incompressible-elasticity']);

const asFormula = (c: Coefficient | undefined): string | undefined => (c === undefined ? undefined : String(c));

/** Derives ∇u, f and boundary data from the declaration; checks tags and that f is finite over the domain. */
export function buildProblem(decl: StudyDeclaration, file: string): StudyProblem {
  const where = `${file} (study '${decl.name}')`;
  const dim = decl.domain.dim;
  // Today's equation: its coefficients, given directly or as the arguments of its preset.
  const coef: NonNullable<StudyDeclaration['coefficients']> = decl.pde
    ? (decl.pde.preset?.name === 'diffusion-convection-reaction' ? decl.pde.preset.args as NonNullable<StudyDeclaration['coefficients']> : {})
    : decl.coefficients ?? {};
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
      exact = scalarPresetSolution(pde, derived, fields, box);
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

  checkTime(decl, derived, where, file);
  const bd = decl.boundary ?? {};
  const { parts, byName } = resolveBoundary(decl, derived, where, file);
  const { dirichlet, neumann, robin } = parts;
  const warnings = derived && decl.pde ? meanFreeChecks(decl, pde, derived, byName, where, file) : [];
  const builtInSystem = decl.discretization.kind === 'lagrange' && derived !== null
    && (derived.hasTime ? pde.preset?.name === 'heat' : BUILT_IN_SYSTEMS.has(pde.preset?.name ?? ''));
  if (decl.pde && !exact && decl.discretization.kind !== 'external' && !builtInSystem) {
    throw new RungsInputError(
      `${where}: discretization: ${decl.discretization.kind === 'lagrange' ? 'rungs\'s own elements solve' : 'a custom discretization (whose field rungs measures) takes'} ` +
      `${decl.discretization.kind === 'lagrange' ? 'the steady presets diffusionConvectionReaction, linearElasticity, nearlyIncompressibleElasticity, stokes and nonlinearDiffusion, and heat in time' : 'only the steady diffusionConvectionReaction preset'}; ` +
      `for ${pde.label ?? 'this pde'}${derived?.hasTime ? ' (it depends on t)' : ''} use external({ command, output: 'errors' }) and let the code report its own norms`, file);
  }
  if (builtInSystem && pde.preset!.name !== 'nonlinear-diffusion') {
    const fixedU = (byName.dirichlet.u?.length ?? 0) > 0;
    if (!fixedU) {
      throw new RungsInputError(
        `${where}: boundary.dirichlet: no part of the boundary fixes the ${pde.preset!.name === 'stokes' ? 'velocity' : 'displacement'} u, so ` +
        `${pde.preset!.name === 'stokes' ? 'constant velocities' : 'rigid-body motions'} solve the homogeneous problem and the system is singular; give u Dirichlet data on at least one part (boundary: { dirichlet: { u: ['left'] } })`, file);
    }
  }

  if (decl.discretization.kind === 'lagrange' && !builtInSystem && dirichlet.length === 0 && robin.length === 0 && coef.c === undefined) {
    throw new RungsInputError(
      `${where}: boundary: every boundary part is Neumann and there is no reaction term c, so the solution is fixed only ` +
      'up to a constant and the system is singular; give a Dirichlet or Robin part (boundary.dirichlet / boundary.robin) or a reaction c > 0', file);
  }
  let alpha: ((x: number, y: number, z: number) => number) | undefined;
  if (bd.robin) alpha = compileFormula(String(bd.robin.alpha), 'boundary.robin.alpha', dim);
  const symmetric = decl.pde ? pde.preset?.name === 'diffusion-convection-reaction' && pde.preset.args.b === undefined : !coef.b;
  if (exact) warnings.push(...sampledChecks(decl, exact, coef, parts, alpha, where, file));
  if (!exact) return { exact, coefficients: {}, boundary: {}, parts, byName, warnings, symmetric, derived, pde };
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
  return { exact, coefficients, boundary, parts, byName, warnings, symmetric, derived, pde };
}

/** A problem that depends on t needs the final time and a time ladder; a steady one has no time to refine. */
function checkTime(decl: StudyDeclaration, derived: DerivedProblem | null, where: string, file: string): void {
  const hasTime = derived?.hasTime ?? false;
  if (hasTime && !decl.time) {
    const own = decl.discretization.kind === 'lagrange';
    throw new RungsInputError(
      `${where}: time: missing; the ${derived!.fields.length ? 'exact solution or the pde' : 'pde'} depends on t, so the study needs the final time and a time ladder, ` +
      `e.g. time: { final: 1${own ? ", stepper: 'bdf2'" : ', order: 2'} } with ladder: { n: [64], steps: [8, 16, 32, 64] }`, file);
  }
  if (!hasTime && decl.time) {
    throw new RungsInputError(
      `${where}: time: the study declares a final time, but the problem does not depend on t (no dt() in its equations and no t in its formulas); ` +
      `use the heat preset (pde: heat({ k })) or a pde with dt(u), and an exact solution in x and t, or leave time out`, file);
  }
  if (hasTime && decl.pde?.preset?.name !== 'heat' && decl.discretization.kind === 'lagrange') {
    throw new RungsInputError(`${where}: discretization: rungs's own elements advance the heat preset in time; for ${decl.pde?.label ?? 'this pde'} use external({ command, ... })`, file);
  }
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
  pde: PdeDeclaration, derived: DerivedProblem, fields: Record<string, string>, box: [number, number][],
): ManufacturedSolution | null {
  if (pde.preset?.name !== 'diffusion-convection-reaction' || derived.hasTime) return null;
  return solutionOf(derived, fields, { box });
}

/** A scalar field fixed only up to a constant must be declared mean-free, and a mean-free field's exact solution must
 *  have mean zero over the domain (else the solver, which fixes the mean, is compared with another function). */
function meanFreeChecks(
  decl: StudyDeclaration, pde: PdeDeclaration, derived: DerivedProblem, byName: BoundaryByName, where: string, file: string,
): string[] {
  const warnings: string[] = [];
  const meanFree = pde.meanFree ?? [];
  for (const f of derived.fields) {
    if (f.kind !== 'scalar') continue;
    const dep = constantDependence(derived, pde, f.name, decl.domain.bbox);
    const natural = dep.natural.filter((e) => (byName.neumann[e]?.length ?? 0) + (byName.robin[e]?.length ?? 0) > 0);
    const fixedBy = [
      ...((byName.dirichlet[f.name]?.length ?? 0) > 0 ? [`Dirichlet data on ${byName.dirichlet[f.name]!.map((t) => `'${t}'`).join(', ')}`] : []),
      ...dep.sources.map((e) => `the source of ${e}`),
      ...natural.map((e) => `the natural data of ${e}`),
    ];
    if (fixedBy.length === 0 && !meanFree.includes(f.name)) {
      throw new RungsInputError(
        `${where}: pde.meanFree: the field '${f.name}' is fixed only up to a constant (no Dirichlet data on it, and no source or ` +
        `natural boundary datum changes when a constant is added), so the discrete problem is singular; declare meanFree: ['${f.name}'] ` +
        `(the solver fixes its mean) or give it Dirichlet data (boundary.dirichlet: { ${f.name}: [...] })`, file);
    }
    if (fixedBy.length > 0 && meanFree.includes(f.name)) {
      warnings.push(`pde.meanFree: '${f.name}' is declared mean-free but ${fixedBy.join(' and ')} already fix${fixedBy.length > 1 ? '' : 'es'} its constant; a solver that also fixes the mean solves another problem`);
    }
  }
  const fine = decl.domain.mesh(Math.max(32, decl.ladder.n[0]!));
  for (const name of meanFree) {
    const field = derived.fields.find((f) => f.name === name)!;
    if (field.kind !== 'scalar') throw new RungsInputError(`${where}: pde.meanFree: '${name}' is a vector field; only scalar fields can be mean-free`, file);
    const fn = compileOutputs(['x', 'y', 'z', 't'], [field.exact.c as import('mathjs').MathNode]);
    const args = new Float64Array(4), out = new Float64Array(1);
    for (const t of derived.hasTime ? [0, 0.5, 1] : [0]) {
      const { mean, scale } = domainMean(fine, (x, y, z) => { args[0] = x; args[1] = y; args[2] = z; args[3] = t; return fn(args, out); });
      if (Math.abs(mean) > 1e-8 * Math.max(scale, 1e-300)) {
        throw new RungsInputError(
          `${where}: exact.${name}: the field is mean-free but its exact solution has mean ${mean} over the domain${derived.hasTime ? ` at t = ${t}` : ''} ` +
          `(quadrature of degree 10 on the level-n = ${Math.max(32, decl.ladder.n[0]!)} mesh); subtract it (exact: { ${name}: '(...) - (${mean})' }) so that it matches what the solver computes`, file);
      }
    }
  }
  return warnings;
}

/** Cells (per unit of length, a power of two so that vertices fall on x = 0.5, 0.25, …) of the extra sampling mesh of
 *  a built-in domain: about 1024 squares or intervals, a few milliseconds of evaluation per formula. */
function samplingN(box: readonly (readonly [number, number])[]): number {
  const volume = box.reduce((v, [lo, hi]) => v * (hi - lo), 1);
  return 2 ** Math.max(0, Math.floor(Math.log2((1024 / volume) ** (1 / box.length))));
}

/**
 * Today's scalar equation sampled over meshes of the domain (the first level's, and for a built-in domain a finer
 * one): formulas finite where they are evaluated, and for rungs's own solver coefficients that keep the form coercive
 * (k > 0, α ≥ 0, c not outweighing the diffusion). Runs before any level, so a bad coefficient is named as such
 * instead of surfacing as a singular matrix.
 */
function sampledChecks(
  decl: StudyDeclaration, exact: ManufacturedSolution, coef: NonNullable<StudyDeclaration['coefficients']>, parts: BoundaryParts,
  alpha: ((x: number, y: number, z: number) => number) | undefined, where: string, file: string,
): string[] {
  const meshes: Mesh[] = [];
  const n0 = decl.ladder.n[0]!;
  try {
    meshes.push(decl.domain.mesh(n0));
    const ns = samplingN(decl.domain.bbox);
    if (decl.domain.kind !== 'custom' && ns > n0) meshes.push(decl.domain.mesh(ns));
  } catch {
    return [];   // a domain that cannot be meshed is reported by the first level, with its level and n
  }
  const box = decl.domain.bbox;
  const isBox = decl.domain.kind === 'interval' || decl.domain.kind === 'rectangle' || decl.domain.kind === 'box';
  try {
    return checkScalarData({
      exact,
      samples: domainSamples(meshes),
      given: { k: coef.k !== undefined, b: coef.b !== undefined, c: coef.c !== undefined },
      robin: alpha && parts.robin.length ? { alpha, tags: parts.robin } : undefined,
      dirichlet: parts.dirichlet.length > 0,
      dirichletEverywhere: parts.neumann.length === 0 && parts.robin.length === 0 && parts.dirichlet.length > 0,
      boxSides: isBox ? box.map(([lo, hi]) => hi - lo) : null,
      bboxSides: box.map(([lo, hi]) => hi - lo),
      signs: decl.discretization.kind === 'lagrange',
    });
  } catch (err) {
    if (err instanceof RungsInputError) throw new RungsInputError(`${where}: ${err.message}`, file);
    throw err;
  }
}
