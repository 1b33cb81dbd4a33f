import { RungsInputError } from '../errors.ts';
import { fieldPath, type FieldNames } from './field-names.ts';
import { SIXTH_ORDER_STEP, centralDerivative6 } from './finite-difference.ts';
import { DEFAULT_SEED, checkBox, formatPoint, samplePoints, unitBox } from './sample-points.ts';
import type { BoundingBox, Dim, ManufacturedSolution, ScalarFn, VectorFn } from './types.ts';

/** The functions whose mutual consistency is checked: grad = ∇u and f = −∇·(k∇u) + b·∇u + c·u. */
export type ConsistencyInput = Pick<ManufacturedSolution, 'dim' | 'u' | 'grad' | 'f' | 'k' | 'b' | 'c'>;

export interface ConsistencyOptions {
  /** Where to sample (default [0,1]^dim). */
  box?: BoundingBox;
  /** Number of seeded random points (default 25). */
  points?: number;
  seed?: number;
  /** Relative disagreement allowed (default 1e-6). */
  tolerance?: number;
}

/** A finite-difference approximation as a function of the step. */
type Approximation = (h: number) => number;

/** Accept `given` when it matches the approximation at step h. Otherwise retry at h/2 and h/4 and allow the
 *  observed change between those (an estimate of the truncation error, Richardson's idea), so a correct but
 *  rapidly varying function is not refused; a wrong one stays off by far more than that change. */
function compare(given: number, approx: Approximation, h: number, scale: number, tolerance: number) {
  const first = approx(h);
  const allowed = tolerance * Math.max(Math.abs(first), scale, 1e-12);
  if (Math.abs(given - first) <= allowed) return null;
  const half = approx(h / 2);
  const quarter = approx(h / 4);
  const truncation = Math.abs(half - quarter);
  if (Math.abs(given - quarter) <= allowed + 2 * truncation) return null;
  return { reference: quarter, allowed: allowed + 2 * truncation };
}

function sampleScale(values: Float64Array): number {
  let s = 0;
  for (const v of values) s = Math.max(s, Math.abs(v));
  return s;
}

/** Refuse (RungsInputError) user functions whose gradient or source term disagrees with sixth-order central finite
 *  differences at seeded random points; the message names the point, the quantity and both values. */
export function checkConsistency(s: ConsistencyInput, fields: FieldNames = '', options: ConsistencyOptions = {}): void {
  const { dim } = s;
  const box = options.box ?? unitBox(dim);
  checkBox(box, dim, `${fieldPath(fields, 'u')} (bounding box)`);
  const n = options.points ?? 25;
  const tolerance = options.tolerance ?? 1e-6;
  const steps = box.map(([lo, hi]) => SIXTH_ORDER_STEP * (hi - lo));
  // Keep every stencil (reach 3h) inside the box, where the user's functions are meant to be defined.
  const points = samplePoints(box, n, options.seed ?? DEFAULT_SEED, steps.map((h) => 3 * h));

  const uField = fieldPath(fields, 'u');
  const gradField = fieldPath(fields, 'grad');
  const fField = fieldPath(fields, 'f');
  const grads = new Float64Array(3 * n);
  const sources = new Float64Array(n);
  const out = new Float64Array(3);
  for (let p = 0; p < n; p++) {
    const [x, y, z] = [points[3 * p], points[3 * p + 1], points[3 * p + 2]];
    const where = formatPoint(x, y, z, dim);
    requireFinite(s.u(x, y, z), uField, where);
    out.fill(0);
    s.grad(x, y, z, out);
    for (let i = 0; i < dim; i++) {
      grads[3 * p + i] = requireFinite(out[i], `${gradField}[${i}]`, where);
    }
    sources[p] = requireFinite(s.f(x, y, z), fField, where);
  }

  const gradScales = Array.from({ length: dim }, (_, i) => sampleScale(grads.filter((_, j) => j % 3 === i)));
  const fScale = sampleScale(sources);
  // Point p with coordinate i replaced by t (a stencil node).
  const at = (p: number, i: number, t: number): [number, number, number] => {
    const q: [number, number, number] = [points[3 * p], points[3 * p + 1], points[3 * p + 2]];
    q[i] = t;
    return q;
  };

  for (let p = 0; p < n; p++) {
    const [x, y, z] = [points[3 * p], points[3 * p + 1], points[3 * p + 2]];
    const where = formatPoint(x, y, z, dim);
    for (let i = 0; i < dim; i++) {
      const along = (t: number) => s.u(...at(p, i, t));
      const approx: Approximation = (h) => centralDerivative6(along, points[3 * p + i], h);
      const bad = compare(grads[3 * p + i], approx, steps[i], gradScales[i], tolerance);
      if (bad !== null) {
        refuse(`${gradField}[${i}]`, `finite differences of ${uField}`, where, grads[3 * p + i], bad);
      }
    }
    const flux = (i: number) => (t: number) => {
      const q = at(p, i, t);
      out.fill(0);
      s.grad(q[0], q[1], q[2], out);
      return s.k(q[0], q[1], q[2]) * out[i];
    };
    out.fill(0);
    s.b(x, y, z, out);
    let transport = s.c(x, y, z) * s.u(x, y, z);
    for (let i = 0; i < dim; i++) transport += out[i] * grads[3 * p + i];
    const operator: Approximation = (h) => {
      let divergence = 0;
      for (let i = 0; i < dim; i++) divergence += centralDerivative6(flux(i), points[3 * p + i], h * (steps[i] / steps[0]));
      return -divergence + transport;
    };
    const bad = compare(sources[p], operator, steps[0], fScale, tolerance);
    if (bad !== null) refuse(fField, `−∇·(k∇u) + b·∇u + c·u by finite differences of k·${gradField}`, where, sources[p], bad);
  }
}

function requireFinite(value: number, field: string, where: string): number {
  if (!Number.isFinite(value)) throw new RungsInputError(`${field} is ${value} at ${where}; it must be finite there`, field);
  return value;
}

function refuse(field: string, against: string, where: string, given: number, bad: { reference: number; allowed: number }): never {
  throw new RungsInputError(
    `${field} disagrees with ${against} at ${where}: given ${given.toPrecision(10)}, ` +
      `finite differences ${bad.reference.toPrecision(10)} (difference ${Math.abs(given - bad.reference).toExponential(2)}, ` +
      `allowed ${bad.allowed.toExponential(2)})`,
    field,
  );
}
