/** Moving a level's data to the cell team: typed arrays into shared memory (once per array), functions as text. */

import { SHARED_MIN_CELLS } from '../../mesh/shared-arrays.ts';

type Typed = Float64Array | Int32Array;
const copies = new WeakMap<Typed, Typed>();

/** The array itself when it already lives in shared memory, else a copy there, made once per array (a mesh's
 *  coordinates and cells, a space's unknowns per cell: shared by every job on that mesh). */
export function shared<T extends Typed>(a: T): T {
  if (a.buffer instanceof SharedArrayBuffer) return a;
  const known = copies.get(a);
  if (known) return known as T;
  const b = new (a.constructor as new (buf: SharedArrayBuffer) => T)(new SharedArrayBuffer(a.byteLength));
  b.set(a);
  copies.set(a, b);
  return b;
}

/** Meshes of at least this many cells get the vectors the cell team reads (an interpolant's coefficients) allocated
 *  in shared memory at once, so that shared()/sharedCopy() pass them as they are: the team takes part in the error
 *  integration from two parts of 32,768 cells on (src/norms/error-cells.ts) and in the assembly from 131,072 cells. A
 *  smaller mesh's vectors are small; shared memory costs them nothing either, but plain arrays are the default. */
export const TEAM_MIN_CELLS = SHARED_MIN_CELLS;

/** A zeroed array of n numbers in shared memory. */
export function sharedFloat64(n: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(8 * n));
}

/**
 * The text of a function that another thread can rebuild with the same behaviour, or null. Only functions made by
 * the Function constructor qualify (rungs's compiled formulas, src/exact/compile.ts): such a function closes over
 * the global scope alone, and its text (Function.prototype.toString, ECMAScript 2019 and later: "function
 * anonymous(" …) rebuilds it exactly. Arrow functions, closures and methods of user code do not: their levels stay on
 * the main thread.
 */
export function functionText(fn: unknown): string | null {
  if (typeof fn !== 'function') return null;
  const text = Function.prototype.toString.call(fn);
  return text.startsWith('function anonymous(') ? text : null;
}

const rebuilt = new Map<string, unknown>();

/** The function of a text from functionText, built once per text and thread (so the same function object, already
 *  optimised, serves every level and job). */
export function rebuild<F>(text: string): F {
  let f = rebuilt.get(text);
  if (f === undefined) {
    f = new Function(`"use strict";\nreturn (${text});`)();
    if (typeof f !== 'function') throw new Error('internal: a function text that does not rebuild a function');
    rebuilt.set(text, f);
  }
  return f as F;
}

/** A copy in shared memory, made every time (for arrays that may change between jobs: coefficient vectors). */
export function sharedCopy<T extends Typed>(a: T): T {
  if (a.buffer instanceof SharedArrayBuffer) return a;
  const b = new (a.constructor as new (buf: SharedArrayBuffer) => T)(new SharedArrayBuffer(a.byteLength));
  b.set(a);
  return b;
}
