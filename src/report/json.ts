import type { StudyResult } from '../study/result.ts';

/** Where a non-finite number was and what it was, since JSON cannot hold NaN or Infinity. */
export type NonFiniteNotes = Record<string, 'NaN' | 'Infinity' | '-Infinity'>;

const NOTE = 'JSON has no NaN or Infinity: such numbers are written as null; nonFiniteValues lists each path and value.';

/** Deep copy with NaN/±Infinity replaced by null, recording each path ("analyses[0].fit.stderr"). */
function replaceNonFinite(value: unknown, path: string, notes: NonFiniteNotes): unknown {
  if (typeof value === 'number') {
    if (Number.isFinite(value)) return value;
    notes[path] = Number.isNaN(value) ? 'NaN' : value > 0 ? 'Infinity' : '-Infinity';
    return null;
  }
  if (Array.isArray(value)) return value.map((v, i) => replaceNonFinite(v, `${path}[${i}]`, notes));
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) {
      if (v === undefined || typeof v === 'function') continue;
      out[k] = replaceNonFinite(v, path === '' ? k : `${path}.${k}`, notes);
    }
    return out;
  }
  return value;
}

/** The whole result as a plain JSON-safe object; adds `note` and `nonFiniteValues` only when something was replaced. */
export function resultForJson(result: StudyResult): Record<string, unknown> {
  const notes: NonFiniteNotes = {};
  const plain = replaceNonFinite(result, '', notes) as Record<string, unknown>;
  if (Object.keys(notes).length === 0) return plain;
  return { ...plain, note: NOTE, nonFiniteValues: notes };
}

/** The whole result as pretty JSON (two-space indent, trailing newline). */
export function resultJson(result: StudyResult): string {
  return JSON.stringify(resultForJson(result), null, 2) + '\n';
}

/** Several results as one JSON array. */
export function resultsJson(results: readonly StudyResult[]): string {
  return JSON.stringify(results.map(resultForJson), null, 2) + '\n';
}
