export type { LagrangeElement } from './types.ts';
export { lagrangeElement } from './lagrange.ts';
export { REFERENCE_VERTICES, REFERENCE_EDGES, REFERENCE_FACETS, REFERENCE_FACES, lagrangeNodes } from './nodes.ts';
export { monomialExponents } from './monomials.ts';
