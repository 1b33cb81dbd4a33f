import { parse } from '../../exact/mathjs.ts';
import { RungsInputError } from '../../errors.ts';
import { compileBundle, dataBundle } from '../../equation/bundle.ts';
import type { DerivedProblem } from '../../equation/derive.ts';
import { differentiate } from '../../exact/differentiate.ts';
import { compileOutputs } from '../../exact/compile.ts';
import type { NormalData, PointData } from '../../fem/form/terms/types.ts';
import type { SolutionDependent } from '../../fem/discretizations/nonlinear-diffusion.ts';
import type { ExactField } from '../../norms/types.ts';

/** The derived data of a system as point functions for rungs's own solvers: the same compiled functions the
 *  preflight check and values-at use (src/equation/bundle.ts), at t = 0 (steady problems). */
export interface SystemData {
  /** A datum at time t (default 0, steady problems). */
  point(name: string, t?: number): PointData;
  /** A datum as a function of position and time, for time steppers. */
  pointInTime(name: string): (x: number, y: number, z: number, t: number, out: Float64Array) => void;
  normal(name: string): NormalData;
  /** Normal data at time t: (x, y, z, t, nx, ny, nz, out). */
  normalInTime(name: string): (x: number, y: number, z: number, t: number, nx: number, ny: number, nz: number, out: Float64Array) => void;
  has(name: string): boolean;
  /** The exact field and its gradient at time t (default 0). */
  exact(field: string, t?: number): ExactField;
}

export function systemData(study: string, derived: DerivedProblem): SystemData {
  const fns = compileBundle(dataBundle(study, derived)).functions;
  const get = (name: string) => {
    const f = fns.get(name);
    if (!f) throw new Error(`internal: no generated function ${name}`);
    return f;
  };
  const point = (name: string, t = 0): PointData => {
    const f = get(name).evaluate;
    const args = new Float64Array(4);
    return (x, y, z, out) => { args[0] = x; args[1] = y; args[2] = z; args[3] = t; f(args, out); };
  };
  const pointInTime = (name: string) => {
    const f = get(name).evaluate;
    const args = new Float64Array(4);
    return (x: number, y: number, z: number, t: number, out: Float64Array) => { args[0] = x; args[1] = y; args[2] = z; args[3] = t; f(args, out); };
  };
  const normal = (name: string): NormalData => {
    const f = get(name).evaluate;
    const args = new Float64Array(7);
    return (x, y, z, nx, ny, nz, out) => { args[0] = x; args[1] = y; args[2] = z; args[3] = 0; args[4] = nx; args[5] = ny; args[6] = nz; f(args, out); };
  };
  const normalInTime = (name: string) => {
    const f = get(name).evaluate;
    const args = new Float64Array(7);
    return (x: number, y: number, z: number, t: number, nx: number, ny: number, nz: number, out: Float64Array) => {
      args[0] = x; args[1] = y; args[2] = z; args[3] = t; args[4] = nx; args[5] = ny; args[6] = nz; f(args, out);
    };
  };
  return {
    point, pointInTime, normal, normalInTime,
    has: (name) => fns.has(name),
    exact(field, t = 0) {
      const components = get(`exact_${field}`).outputs;
      return { components, value: point(`exact_${field}`, t), grad: point(`grad_${field}`, t) };
    },
  };
}

/** κ(u) or r(u) of the nonlinear preset with its derivative in u, compiled from the preset's formula. */
export function solutionDependent(text: string, path: string): SolutionDependent {
  let node;
  try {
    node = parse(text);
  } catch (err) {
    throw new RungsInputError(`${path}: cannot parse '${text}': ${(err as Error).message}`, path);
  }
  const f = compileOutputs(['u', 'x', 'y', 'z', 't'], [node, differentiate(node, 'u')]);
  const args = new Float64Array(5), out2 = new Float64Array(2);
  return (u, x, y, z, out) => { args[0] = u; args[1] = x; args[2] = y; args[3] = z; args[4] = 0; f(args, out2); out[0] = out2[0]; out[1] = out2[1]; };
}
