// Checks of today's scalar equation −∇·(k∇u) + b·∇u + c·u = f before any level runs, by sampling its data over the
// domain (domain-samples.ts): every formula finite where it is evaluated, and the coefficients such that the
// bilinear form a(v, v) = ∫ k|∇v|² + (b·∇v) v + c v² + ∫_Robin α v² is coercive, or at least not proven otherwise.
// A zero or negative conductivity would otherwise surface as a singular matrix, read as a missing constraint.
import { RungsInputError } from '../errors.ts';
import { formatPoint } from './sample-points.ts';
import { assertFiniteOnDomain, rangeOver, type DomainSamples, type Range } from './domain-samples.ts';
import type { ManufacturedSolution } from './types.ts';

export interface ScalarDataChecks {
  /** The manufactured solution with its coefficients and source. */
  exact: ManufacturedSolution;
  samples: DomainSamples;
  /** Which coefficients the study gives (absent ones are not checked: k = 1, b = 0, c = 0). */
  given: { k: boolean; b: boolean; c: boolean };
  /** The Robin coefficient and the tags it applies to, when there is a Robin part. */
  robin?: { alpha: (x: number, y: number, z: number) => number; tags: readonly string[] };
  /** Whether some boundary part is Dirichlet. */
  dirichlet: boolean;
  /** Every boundary tag is Dirichlet (so the Friedrichs inequality with the whole boundary holds). */
  dirichletEverywhere: boolean;
  /** For a box domain (interval, rectangle): its side lengths, which give the first Dirichlet eigenvalue exactly. */
  boxSides: number[] | null;
  /** Side lengths of the bounding box (a lower bound of the first Dirichlet eigenvalue of any domain inside it). */
  bboxSides: number[];
  /** Sign checks only for rungs's own solver, which needs a coercive form (CG, AMG). */
  signs: boolean;
}

const at = (p: readonly number[], dim: 1 | 2 | 3) => formatPoint(p[0]!, p[1]!, p[2] ?? 0, dim);
const num = (v: number) => String(Number(v.toPrecision(4)));

/** π² Σ 1/L_i²: the first eigenvalue of −Δ with Dirichlet data on the whole boundary of a box (separation of
 *  variables, common practice, no source). */
function dirichletEigenvalue(sides: readonly number[]): number {
  return Math.PI ** 2 * sides.reduce((s, L) => s + 1 / (L * L), 0);
}

/**
 * Throws RungsInputError naming the coefficient, the point and what would be valid; returns warnings for a negative
 * reaction that is not proven to break coercivity but is not proven harmless either.
 */
export function checkScalarData(c: ScalarDataChecks): string[] {
  const { exact, samples: s } = c;
  const dim = exact.dim;
  assertFiniteOnDomain(exact.u, 'exact', s, 'closed', 'rungs evaluates u at every node, boundary nodes included');
  assertFiniteOnDomain(exact.f, 'source term f', s, 'interior', 'it is integrated at quadrature points inside the cells');
  const grad = new Float64Array(3);
  for (let d = 0; d < dim; d++) {
    assertFiniteOnDomain((x, y, z) => { exact.grad(x, y, z, grad); return grad[d]!; }, `exact.grad[${d}]`, s, 'interior',
      'the H1 and energy errors integrate it inside the cells');
  }
  if (c.given.k) assertFiniteOnDomain(exact.k, 'coefficients.k', s, 'closed', 'a conductivity must be bounded on the domain');
  if (c.given.c) assertFiniteOnDomain(exact.c, 'coefficients.c', s, 'closed', 'a reaction coefficient must be bounded on the domain');
  if (c.given.b) {
    const b = new Float64Array(3);
    for (let d = 0; d < dim; d++) {
      assertFiniteOnDomain((x, y, z) => { exact.b(x, y, z, b); return b[d]!; }, `coefficients.b[${d}]`, s, 'closed', 'a velocity must be bounded on the domain');
    }
  }
  const robinPoints = c.robin ? c.robin.tags.map((t) => s.byTag.get(t)).filter((p): p is Float64Array => p !== undefined) : [];
  if (c.robin) {
    for (const p of robinPoints) {
      const only: DomainSamples = { ...s, interior: new Float64Array(0), boundary: p, edges: new Float64Array(0), edgeOnBoundary: new Uint8Array(0) };
      assertFiniteOnDomain(c.robin.alpha, 'boundary.robin.alpha', only, 'closed', 'it is integrated over the Robin boundary');
    }
  }
  if (!c.signs) return [];

  const all = [s.interior, s.boundary];
  const warnings: string[] = [];
  if (c.given.k) checkConductivity(rangeOver(exact.k, ...all), dim);
  let alpha: Range | null = null;
  if (c.robin && robinPoints.length) {
    alpha = rangeOver(c.robin.alpha, ...robinPoints);
    if (alpha.min < 0) {
      throw new RungsInputError(
        `boundary.robin.alpha is ${num(alpha.min)} at ${at(alpha.argmin, dim)} on the Robin boundary (${c.robin.tags.map((t) => `'${t}'`).join(', ')}): ` +
        'a negative Robin coefficient makes ∫ α v² negative, so the bilinear form is not coercive and the solver may break down; ' +
        'α must be ≥ 0 there (α = 0 is a Neumann condition)', 'boundary.robin.alpha');
    }
  }
  if (c.given.c) {
    const k = c.given.k ? rangeOver(exact.k, ...all) : { min: 1, max: 1 };
    const r = rangeOver(exact.c, ...all);
    const fixedByBoundary = c.dirichlet || (alpha !== null && alpha.max > 0);
    if (!fixedByBoundary && r.mean <= 0) {
      throw new RungsInputError(
        `coefficients.c: every boundary part is Neumann${c.robin ? ' or Robin with α = 0' : ''} and the reaction c is ` +
        `${r.max <= 0 ? (r.max === 0 && r.min === 0 ? 'zero everywhere' : `never positive (c = ${num(r.min)} at ${at(r.argmin, dim)})`) : `on average ${num(r.mean)} ≤ 0 (c = ${num(r.min)} at ${at(r.argmin, dim)})`}, ` +
        'so a(1, 1) = ∫ c ≤ 0 for the constant function: the bilinear form is not coercive and the system is singular or indefinite; ' +
        'give c > 0, or a Dirichlet or Robin (α > 0) part', 'coefficients.c');
    }
    if (r.min < 0) {
      // a(v, v) ≤ k_max λ1 ‖v‖² + c_max ‖v‖² for the first Dirichlet eigenfunction v of a box domain, whose λ1 is known,
      // and with Dirichlet data on part of the boundary only, λ1 is smaller still: a proven loss of coercivity.
      const lambdaBox = c.boxSides ? dirichletEigenvalue(c.boxSides) : null;
      if (lambdaBox !== null && !c.given.b && k.max * lambdaBox + r.max <= 0) {
        throw new RungsInputError(
          `coefficients.c is ${num(r.min)} at ${at(r.argmin, dim)} and at most ${num(r.max)}: with k ≤ ${num(k.max)} the reaction ` +
          `outweighs the diffusion (c ≤ −k·λ1, λ1 = π²Σ1/L² = ${num(lambdaBox)} the first Dirichlet eigenvalue of this box), so ` +
          'a(v, v) ≤ 0 for the first eigenfunction: the bilinear form is not coercive; give c > −k·λ1 (c ≥ 0 is always safe)', 'coefficients.c');
      }
      const lambdaLow = c.dirichletEverywhere ? dirichletEigenvalue(c.bboxSides) : null;
      const proven = lambdaLow !== null && !c.given.b && k.min * lambdaLow + r.min > 0;
      if (!proven) {
        warnings.push(
          `coefficients.c is negative (${num(r.min)} at ${at(r.argmin, dim)}): the bilinear form is coercive only while c stays above ` +
          '−k·λ1 (λ1 the first eigenvalue of −Δ with these boundary conditions), which rungs cannot confirm here; CG and AMG need a ' +
          'positive definite matrix (solver.method \'gmres\' does not)');
      }
    }
  }
  return warnings;
}

function checkConductivity(k: Range, dim: 1 | 2 | 3): void {
  if (k.min > 0) return;
  const valid = 'the conductivity must be positive everywhere in the domain, boundary included (k > 0), for −∇·(k∇u) to be elliptic';
  let what: string;
  if (k.max === 0 && k.min === 0) what = `coefficients.k is zero everywhere (k = 0 at ${at(k.argmin, dim)}): zero conductivity leaves no diffusion and the stiffness matrix is zero`;
  else if (k.max <= 0) what = `coefficients.k is ${k.min < 0 ? 'negative' : 'zero or negative'} (k = ${num(k.min)} at ${at(k.argmin, dim)}): a negative conductivity`;
  else if (k.min < 0) what = `coefficients.k changes sign: k = ${num(k.min)} at ${at(k.argmin, dim)} but ${num(k.max)} at ${at(k.argmax, dim)}`;
  else what = `coefficients.k is zero at ${at(k.argmin, dim)} (elsewhere up to ${num(k.max)}): a conductivity that vanishes`;
  throw new RungsInputError(`${what}; ${valid} (for example '1 + 0.25*x*y', or a constant > 0)`, 'coefficients.k');
}
