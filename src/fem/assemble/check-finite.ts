import { RungsInputError } from '../../errors.ts';

/** Throws when a coefficient or source value at quadrature point q of cell c is not finite, naming the point. */
export function checkFinite(v: number, what: string, c: number, x: Float64Array, q: number): void {
  if (!Number.isFinite(v)) {
    const p = `(${x[3 * q].toPrecision(6)}, ${x[3 * q + 1].toPrecision(6)}${x[3 * q + 2] ? ', ' + x[3 * q + 2].toPrecision(6) : ''})`;
    throw new RungsInputError(`${what} is ${v} at quadrature point ${p} of cell ${c}; coefficients and sources must be finite in the domain`);
  }
}
