import type { SeriesAnalysis } from '../analysis/types.ts';
import type { StudyResult } from '../study/result.ts';

/**
 * Norm names of a study in report order: the analysed series first (in the order the study listed them),
 * then any error recorded per level that has no analysis.
 */
export function normNames(result: StudyResult): string[] {
  const names = result.analyses.map((a) => a.name);
  for (const level of result.levels) {
    for (const key of Object.keys(level.errors)) if (!names.includes(key)) names.push(key);
  }
  return names;
}

export function analysisOf(result: StudyResult, norm: string): SeriesAnalysis | undefined {
  return result.analyses.find((a) => a.name === norm);
}

/** Pairwise rate into level `position` (0-based position in result.levels), or null for the first level / no analysis. */
export function rateAt(result: StudyResult, norm: string, position: number): number | null {
  const rate = analysisOf(result, norm)?.rates[position];
  return rate === undefined ? null : rate;
}

/** Norms for which at least one level recorded an interpolation error. */
export function interpolatedNorms(result: StudyResult): string[] {
  return normNames(result).filter((norm) =>
    result.levels.some((l) => l.interpolationErrors !== undefined && norm in l.interpolationErrors),
  );
}

export { fileStem } from '../study/names.ts';

/** Whether any level reported this count: a table read by `rungs fit` may give only h, and then the reports leave the
 *  dofs (or cells) column out instead of showing a column of blanks. */
export function reportsCount(result: StudyResult, count: 'dofs' | 'cells'): boolean {
  return result.levels.some((l) => Number.isFinite(l[count]));
}
