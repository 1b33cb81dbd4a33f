import { createHash } from 'node:crypto';
import type { StudyDeclaration } from '../study/declaration.ts';

/**
 * Fields left out of the hash: the name is the baseline's key, the description is prose, and the baseline tolerance
 * is the gate's own setting (changing it must not make the baseline look stale). Everything else (formulas, domain,
 * pde, boundary, discretization, ladder, norms, expected orders, tolerance, fit window, declared verdict, solver)
 * changes what a study computes or how it is judged.
 */
const LEFT_OUT = new Set(['name', 'description', 'baselineTolerance']);

/**
 * One text for a value, the same whatever order its keys were written in: objects with sorted keys, undefined
 * entries dropped (so `{ a: undefined }` reads as `{}`), functions by their source text with runs of white space
 * collapsed (a function is hashed by its own text, not by what it calls).
 */
export function canonicalText(value: unknown): string {
  const seen = new Set<object>();
  const walk = (v: unknown): string => {
    if (v === null) return 'null';
    switch (typeof v) {
      case 'undefined':
        return 'null';
      case 'number':
        return Object.is(v, -0) ? '-0' : String(v);
      case 'bigint':
        return `${v}n`;
      case 'string':
      case 'boolean':
        return JSON.stringify(v);
      case 'symbol':
        return JSON.stringify(String(v));
      case 'function':
        return `fn${JSON.stringify(Function.prototype.toString.call(v).replace(/\s+/g, ' ').trim())}`;
    }
    const obj = v as object;
    // A cycle cannot be written out; mark it instead of recursing forever.
    if (seen.has(obj)) return '"[cycle]"';
    seen.add(obj);
    let text: string;
    if (Array.isArray(obj)) text = `[${obj.map(walk).join(',')}]`;
    else if (ArrayBuffer.isView(obj) && !(obj instanceof DataView)) text = `[${Array.from(obj as unknown as ArrayLike<number>, walk).join(',')}]`;
    else if (obj instanceof Date) text = JSON.stringify(obj.toISOString());
    else if (obj instanceof Map) text = `map${walk(Object.fromEntries([...obj.entries()].map(([k, x]) => [String(k), x])))}`;
    else if (obj instanceof Set) text = `set[${[...obj].map(walk).sort().join(',')}]`;
    else {
      const entries = Object.keys(obj)
        .filter((k) => (obj as Record<string, unknown>)[k] !== undefined)
        .sort()
        .map((k) => `${JSON.stringify(k)}:${walk((obj as Record<string, unknown>)[k])}`);
      text = `{${entries.join(',')}}`;
    }
    seen.delete(obj);
    return text;
  };
  return walk(value);
}

/** "sha256:<64 hex digits>" of the study's declaration without its name, description and baseline tolerance (and
 *  without the mesh function of a built-in domain). */
export function declarationHash(decl: StudyDeclaration): string {
  const kept: Record<string, unknown> = Object.fromEntries(Object.entries(decl).filter(([k]) => !LEFT_OUT.has(k)));
  // A built-in domain is told by its kind, box, tags and label; its mesh function is rungs's own code, whose text would
  // change every study's hash on an upgrade of rungs or of the TypeScript loader. A custom domain's mesh is the user's.
  if (decl.domain && decl.domain.kind !== 'custom') {
    const { mesh: _mesh, ...described } = decl.domain;
    kept.domain = described;
  }
  return `sha256:${createHash('sha256').update(canonicalText(kept)).digest('hex')}`;
}

/** The first 12 hex digits, enough to tell two declarations apart in a message. */
export function shortHash(hash: string): string {
  return hash.replace(/^sha256:/, '').slice(0, 12);
}
