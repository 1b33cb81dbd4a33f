import type { Point } from './evaluate.ts';
import type { Expr } from './expr.ts';
import type { Plan } from './cse.ts';
import type { Argument, DataBundle, GeneratedFunction } from './types.ts';
import { SELF_TEST_TOLERANCE } from './samples.ts';

/** One function ready to print: lowered outputs, its plan of temporaries, and its self-test values. */
export interface PreparedFunction {
  fn: GeneratedFunction;
  exprs: Expr[];
  plan: Plan;
  /** expected[point][output] */
  expected: number[][];
  /** Scale of each output over the sample points. */
  scales: number[];
}

/** A bundle ready to print in any language. */
export interface Prepared {
  bundle: DataBundle;
  functions: PreparedFunction[];
  points: Point[];
}

/** Column of each argument in a sample point row (x, y, z, t, nx, ny, nz). */
export const COLUMN: Readonly<Record<Argument, number>> = { x: 0, y: 1, z: 2, t: 3, nx: 4, ny: 5, nz: 6 };
export const ROW_ARGUMENTS: readonly Argument[] = ['x', 'y', 'z', 't', 'nx', 'ny', 'nz'];

/** The same sentence on the tolerance in every self-test. */
export function toleranceLines(p: Prepared): string[] {
  return [
    `Checks every function at ${p.points.length} seeded sample points against values rungs computed in JavaScript doubles`,
    '(the same operations as this code). A value passes when |got - expected| <= tolerance * max(|expected|, scale),',
    `tolerance = ${SELF_TEST_TOLERANCE} (relative), scale = max |expected| of that output over the points; a NaN fails.`,
    'Prints one line per failing value and a final summary line; exits with a non-zero status when a value fails.',
  ];
}

/** Comment text of an output name (for string literals of self-tests as well). */
export const outputLabel = (f: PreparedFunction, k: number): string =>
  String(f.fn.outputNames[k]).replace(/[^\x20-\x7e]/g, '?').replace(/["'\\]/g, '_');
