export type { QuadratureRule } from './types.ts';
export { gaussLegendre, MAX_GAUSS_POINTS } from './gauss-legendre.ts';
export { gaussJacobi } from './gauss-jacobi.ts';
export { gaussJacobiOnUnit } from './gauss-on-unit.ts';
export { gaussPointsForDegree } from './check-count.ts';
export { intervalGaussRule, quadrilateralGaussRule, hexahedronGaussRule } from './tensor-rules.ts';
export { collapsedTriangleRule, collapsedTetrahedronRule } from './collapsed-rules.ts';
export {
  tetrahedronCentroidRule, tetrahedronFourPointRule, tetrahedronFourteenPointRule, tetrahedronTwentyFourPointRule,
} from './tetrahedron-symmetric.ts';
export { SYMMETRIC_TRIANGLE_TABLES, type SymmetricTriangleTable } from './triangle-symmetric-tables.ts';
export { expandTriangleTable } from './symmetric-orbits.ts';
export { polishTriangleTable } from './polish-symmetric.ts';
export { ruleFor, facetRuleFor, FACET_CELL, symmetricTriangleRules, symmetricTetrahedronRules, MAX_RULE_DEGREE } from './rule-for.ts';
