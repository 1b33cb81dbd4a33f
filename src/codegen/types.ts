import type { MathNode } from 'mathjs';

/** Arguments a generated function may take, in this order: the point, the time, and (boundary data) the outward unit
 *  normal. Every generated function takes x, y, z, t whatever the dimension, so one signature serves every study. */
export type Argument = 'x' | 'y' | 'z' | 't' | 'nx' | 'ny' | 'nz';

/** Point arguments of every generated function. */
export const POINT_ARGUMENTS: readonly Argument[] = ['x', 'y', 'z', 't'];
/** Arguments of boundary data that depend on the outward normal (n·F, Robin data). */
export const NORMAL_ARGUMENTS: readonly Argument[] = ['x', 'y', 'z', 't', 'nx', 'ny', 'nz'];

/** One function of the generated code: one or several outputs computed from the same arguments, sharing common
 *  subexpressions. One output is returned as a number; several are written to an output array (row-major for a
 *  matrix: out[i*dim + j]). */
export interface GeneratedFunction {
  /** snake_case identifier, the same in every language (for example exact_u, grad_u, source_balance, flux_momentum). */
  name: string;
  /** One line for the comment above the function. */
  doc: string;
  args: readonly Argument[];
  /** Trees over the symbols of `args`, pi and e, using only the operators and functions of src/exact/formula.ts
   *  (plus sign, which derivatives of abs produce). */
  outputs: readonly MathNode[];
  /** A name per output for comments and the JSON of formulas (for example u_x, u_y). */
  outputNames: readonly string[];
}

/** Everything generated for one study: its manufactured data as functions. */
export interface DataBundle {
  study: string;
  dim: 1 | 2 | 3;
  /** True when some formula depends on t. */
  hasTime: boolean;
  functions: readonly GeneratedFunction[];
}
