import { RungsInputError } from '../../errors.ts';

/** Throws when a coefficient or source value at quadrature point q of cell c is not finite, naming the point. */
export function checkFinite(v: number, what: string, c: number, x: Float64Array, q: number): void {
  if (!Number.isFinite(v)) {
    const p = `(${x[3 * q].toPrecision(6)}, ${x[3 * q + 1].toPrecision(6)}${x[3 * q + 2] ? ', ' + x[3 * q + 2].toPrecision(6) : ''})`;
    throw new RungsInputError(`${what} is ${v} at quadrature point ${p} of cell ${c}; coefficients and sources must be finite in the domain`);
  }
}

/** A coefficient or source value found not finite at the point (X, Y) of cell c by a written-out 2D loop: the message
 *  checkFinite gives (the triangle loops, triangles.ts and p1-triangles.ts, test finiteness inline and call this only on
 *  failure, so no point array is built per evaluation). */
export function failAtPoint2D(v: number, what: string, c: number, X: number, Y: number): never {
  checkFinite(v, what, c, Float64Array.of(X, Y, 0), 0);
  throw new Error('internal: checkFinite passed a value that is not finite');
}
