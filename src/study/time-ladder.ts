import type { TimeAxis } from '../analysis/types.ts';
import type { StudyDeclaration } from './declaration.ts';
import { TIME_ORDER } from '../fem/time/methods.ts';

/** One level of a study: its mesh parameter n and, for a study with time, its number of equal steps over [0, T]. */
export interface Rung {
  n: number;
  steps: number | null;
}

/** The mesh size rungs gives the ladder parameter n on the reference domains (h = 1/n per unit length); the level's
 *  own mesh h is what the fits use, this only places a coupled path's time steps before the mesh exists. */
const nominalH = (n: number): number => 1 / n;

/** Which axis a study with time refines (src/analysis/types.ts TimeAxis), or null for a steady study. The schema
 *  has already refused the designs that are none of these. */
export function timeAxis(decl: StudyDeclaration): TimeAxis | null {
  if (!decl.time) return null;
  const l = decl.ladder;
  if (l.coupled) return 'coupled';
  if (l.grid) return 'grid';
  return (l.steps ?? l.dt ?? []).length > 1 && l.n.length === 1 ? 'dt' : 'h';
}

/** The number of steps of a coupled path on mesh parameter n: the smallest whole number with Δt = T/steps ≤
 *  c·h^exponent, so that Δt divides T exactly (the steps are equal). */
export function coupledSteps(T: number, n: number, coupled: { c: number; exponent: number }): number {
  const target = coupled.c * nominalH(n) ** coupled.exponent;
  // The 1e-12 keeps a ratio that is whole up to round-off (T/target = 16.000000000000004) at that whole number.
  return Math.max(1, Math.ceil(T / target - 1e-12));
}

/** The levels of a study, coarsest first: n alone for a steady study; (n, steps) pairs for a study with time — a
 *  spatial ladder at its one steps value, a temporal ladder on its one mesh, a coupled path, or every pair of a grid
 *  (n slowest, so that each mesh's time levels sit together). */
export function ladderRungs(decl: StudyDeclaration): Rung[] {
  const l = decl.ladder;
  if (!decl.time) return l.n.map((n) => ({ n, steps: null }));
  const T = decl.time.final;
  if (l.coupled) return l.n.map((n) => ({ n, steps: coupledSteps(T, n, l.coupled!) }));
  const steps = l.steps ?? l.dt?.map((d) => Math.round(T / d)) ?? [];
  if (l.grid) return l.n.flatMap((n) => steps.map((s) => ({ n, steps: s })));
  if (l.n.length === 1) return steps.map((s) => ({ n: l.n[0]!, steps: s }));
  return l.n.map((n) => ({ n, steps: steps[0]! }));
}

/** The expected order in time: the built-in stepper's, else the study's declared order, else null. */
export function temporalOrder(decl: StudyDeclaration): number | null {
  const t = decl.time;
  if (!t) return null;
  if (t.order !== undefined) return t.order;
  return t.stepper ? TIME_ORDER[t.stepper] : null;
}

/** How a level reads in messages: "n = 16" or "n = 16, 64 steps". */
export function rungLabel(r: Rung): string {
  return r.steps === null ? `n = ${r.n}` : `n = ${r.n}, ${r.steps} steps`;
}

/** The levels `rungs check --quick` runs: ladder.quick, else the 3 coarsest; a two-axis design runs every step count
 *  on its coarsest meshes (the levels come n-major), as many meshes as give the joint fit five pairs. */
export function quickLevels(decl: StudyDeclaration): number {
  const total = ladderRungs(decl).length;
  if (decl.ladder.quick !== undefined) return Math.min(decl.ladder.quick, total);
  if (timeAxis(decl) === 'grid') {
    const perMesh = (decl.ladder.steps ?? decl.ladder.dt ?? []).length;
    return Math.min(total, perMesh * Math.max(2, Math.ceil(5 / perMesh)));
  }
  return Math.min(3, total);
}
