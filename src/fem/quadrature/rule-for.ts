import { RungsInputError } from '../../errors.ts';
import type { CellKind } from '../../mesh/types.ts';
import { gaussPointsForDegree } from './check-count.ts';
import { collapsedTetrahedronRule, collapsedTriangleRule } from './collapsed-rules.ts';
import { polishTriangleTable } from './polish-symmetric.ts';
import { expandTriangleTable } from './symmetric-orbits.ts';
import { hexahedronGaussRule, intervalGaussRule, quadrilateralGaussRule } from './tensor-rules.ts';
import {
  tetrahedronCentroidRule, tetrahedronFourPointRule, tetrahedronFourteenPointRule, tetrahedronTwentyFourPointRule,
} from './tetrahedron-symmetric.ts';
import { SYMMETRIC_TRIANGLE_TABLES } from './triangle-symmetric-tables.ts';
import type { QuadratureRule } from './types.ts';

/** Highest degree ruleFor accepts per cell: keeps the point count below ~10^5 (interval 4096 points,
 *  quadrilateral and triangle 200 x 200, tetrahedron and hexahedron 50^3). */
export const MAX_RULE_DEGREE: Readonly<Record<CellKind, number>> = {
  interval: 8191,
  quadrilateral: 399,
  triangle: 399,
  tetrahedron: 99,
  hexahedron: 99,
};

const CELL_KINDS = Object.keys(MAX_RULE_DEGREE) as CellKind[];

// Rules are built once and shared: callers must treat points and weights as read-only.
const built = new Map<string, QuadratureRule>();
const chosen = new Map<string, QuadratureRule>();

function cached(key: string, build: () => QuadratureRule): QuadratureRule {
  let rule = built.get(key);
  if (rule === undefined) {
    rule = build();
    built.set(key, rule);
  }
  return rule;
}

/** A rule that can be chosen without building it first. */
interface Candidate {
  degree: number;
  nPoints: number;
  build: () => QuadratureRule;
}

const TRIANGLE_CANDIDATES: readonly Candidate[] = SYMMETRIC_TRIANGLE_TABLES.map((table) => ({
  degree: table.degree,
  nPoints: (table.centroid !== undefined ? 1 : 0) + 3 * table.s21.length + 6 * table.s111.length,
  build: () =>
    cached(`triangle/symmetric/${table.degree}`, () =>
      expandTriangleTable(table.closedForm === true ? table : polishTriangleTable(table).table),
    ),
}));

const TETRAHEDRON_CANDIDATES: readonly Candidate[] = [
  { degree: 1, nPoints: 1, build: () => cached('tetrahedron/symmetric/1', tetrahedronCentroidRule) },
  { degree: 2, nPoints: 4, build: () => cached('tetrahedron/symmetric/2', tetrahedronFourPointRule) },
  { degree: 5, nPoints: 14, build: () => cached('tetrahedron/symmetric/5', tetrahedronFourteenPointRule) },
  { degree: 6, nPoints: 24, build: () => cached('tetrahedron/symmetric/6', tetrahedronTwentyFourPointRule) },
];

/** The fully symmetric triangle rules (positive weights, interior points), ascending degree. */
export function symmetricTriangleRules(): QuadratureRule[] {
  return TRIANGLE_CANDIDATES.map((c) => c.build());
}

/** The symmetric tetrahedron rules, ascending degree. */
export function symmetricTetrahedronRules(): QuadratureRule[] {
  return TETRAHEDRON_CANDIDATES.map((c) => c.build());
}

/**
 * The cheapest rule (fewest points) exact to `degree` on the reference `cell`: total degree for the
 * interval, triangle and tetrahedron, degree in each variable (Q_degree) for the quadrilateral and hexahedron.
 * On a tie a symmetric rule wins over a collapsed one. The returned rule is cached and shared: do not
 * modify its arrays.
 */
export function ruleFor(cell: CellKind, degree: number): QuadratureRule {
  if (!CELL_KINDS.includes(cell)) {
    throw new RungsInputError(
      `ruleFor(cell, degree): cell must be one of ${CELL_KINDS.join(', ')}, got ${JSON.stringify(cell)}`,
      'ruleFor.cell',
    );
  }
  const max = MAX_RULE_DEGREE[cell];
  if (typeof degree !== 'number' || !Number.isInteger(degree) || degree < 0 || degree > max) {
    throw new RungsInputError(
      `ruleFor(cell, degree): degree for a ${cell} must be an integer from 0 to ${max}, got ${String(degree)}`,
      'ruleFor.degree',
    );
  }
  const key = `${cell}/${degree}`;
  let rule = chosen.get(key);
  if (rule === undefined) {
    rule = select(cell, degree);
    chosen.set(key, rule);
  }
  return rule;
}

function select(cell: CellKind, degree: number): QuadratureRule {
  const n = gaussPointsForDegree(degree);
  switch (cell) {
    case 'interval':
      return cached(`interval/gauss/${n}`, () => intervalGaussRule(n));
    case 'quadrilateral':
      return cached(`quadrilateral/gauss/${n}`, () => quadrilateralGaussRule(n));
    case 'hexahedron':
      return cached(`hexahedron/gauss/${n}`, () => hexahedronGaussRule(n));
    case 'triangle':
      return cheapest(TRIANGLE_CANDIDATES, degree, n * n, () =>
        cached(`triangle/collapsed/${n}`, () => collapsedTriangleRule(n)),
      );
    case 'tetrahedron':
      return cheapest(TETRAHEDRON_CANDIDATES, degree, n * n * n, () =>
        cached(`tetrahedron/collapsed/${n}`, () => collapsedTetrahedronRule(n)),
      );
  }
}

/** The symmetric candidate of enough degree with fewest points if it has at most as many points as the
 *  collapsed rule, else the collapsed rule. */
function cheapest(
  symmetric: readonly Candidate[],
  degree: number,
  collapsedPoints: number,
  collapsed: () => QuadratureRule,
): QuadratureRule {
  let best: Candidate | undefined;
  for (const c of symmetric) {
    if (c.degree >= degree && (best === undefined || c.nPoints < best.nPoints)) best = c;
  }
  if (best !== undefined && best.nPoints <= collapsedPoints) return best.build();
  return collapsed();
}

/** The shape of the facets of each cell kind (null: a point, no rule needed). */
export const FACET_CELL: Readonly<Record<CellKind, CellKind | null>> = {
  interval: null,
  triangle: 'interval',
  quadrilateral: 'interval',
  tetrahedron: 'triangle',
  hexahedron: 'quadrilateral',
};

/** ruleFor on the reference facet of `cell` (an interval for 2D cells, the reference triangle for tetrahedra, the
 *  unit square for hexahedra, whose faces are quadrilaterals); null for intervals, whose facets are points. The
 *  weights sum to the reference facet's measure (1, 1/2 or 1). */
export function facetRuleFor(cell: CellKind, degree: number): QuadratureRule | null {
  if (!Object.hasOwn(FACET_CELL, cell)) {
    throw new RungsInputError(
      `facetRuleFor(cell, degree): cell must be one of ${CELL_KINDS.join(', ')}, got ${JSON.stringify(cell)}`,
      'facetRuleFor.cell',
    );
  }
  const facet = FACET_CELL[cell];
  return facet === null ? null : ruleFor(facet, degree);
}
