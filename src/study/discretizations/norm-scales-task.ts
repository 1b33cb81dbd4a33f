// The cell team's task that measures the exact solution's own norms on the first level's mesh (norm-scales.ts,
// normScalesAhead) on a worker while the main thread runs the study's finest level. One part: the whole.
import { meshOf, type SharedMesh } from '../../fem/team/mesh.ts';
import { rebuild } from '../../fem/team/shared.ts';
import { exactNorms } from '../../norms/errors.ts';
import type { ExactSolution, NormValues } from '../../norms/types.ts';

/** The norms in the order the task writes them. */
export const NORM_KEYS = ['L2', 'H1semi', 'H1', 'energy', 'maxNodal'] as const satisfies readonly (keyof NormValues)[];

export interface NormScalesTaskInput {
  mesh: SharedMesh;
  /** u and ∇u in one function, or u and grad apart (texts of functionText). */
  valueAndGrad: string | null;
  u: string | null;
  grad: string | null;
  degree: number;
  /** Out: the norms in NORM_KEYS order. */
  out: Float64Array;
}

type Scalar = (x: number, y: number, z: number) => number;
type Vector = (x: number, y: number, z: number, out: Float64Array) => void;
type ValueAndGradient = (x: number, y: number, z: number, out: Float64Array) => number;

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as NormScalesTaskInput;
  return () => {
    let exact: ExactSolution;
    if (p.valueAndGrad) {
      const vg = rebuild<ValueAndGradient>(p.valueAndGrad);
      const scratch = new Float64Array(3);
      exact = { u: (x, y, z) => vg(x, y, z, scratch), grad: (x, y, z, out) => { vg(x, y, z, out); }, valueAndGrad: vg };
    } else exact = { u: rebuild<Scalar>(p.u!), grad: rebuild<Vector>(p.grad!) };
    const norms = exactNorms(meshOf(p.mesh), exact, { degree: p.degree });
    NORM_KEYS.forEach((k, i) => { p.out[i] = norms[k]; });
  };
}
