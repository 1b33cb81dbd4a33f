// Céa's lemma as part of the verdict. For a symmetric coercive problem the Galerkin solution is the best
// approximation in the energy norm: ‖u − u_h‖_E ≤ ‖u − v‖_E for every v of the discrete space with the same boundary
// values, the nodal interpolant I_h u among them (Céa 1964). The quasi-optimality ratio q = ‖u − u_h‖_E /
// ‖u − I_h u‖_E is therefore at most 1, up to quadrature of the data and round-off.
import type { SeriesAnalysis } from './types.ts';

/** q may exceed 1 by this much for quadrature of smooth data and round-off (common practice, no source). */
export const QUASI_OPTIMALITY_SLACK = 1e-3;
/** An excess q − 1 that falls to at most this fraction of the previous level's is shrinking toward 1, as a
 *  quadrature error of higher order than the discretization error does (common practice, no source). */
export const CEA_SHRINK = 0.7;

export interface CeaLevel {
  /** 0-based level index. */
  index: number;
  /** q at this level, when measured (symmetric problems with the interpolant's errors). */
  ratio: number | null | undefined;
  /** The errors sit at a floor here — round-off in both, or the solver's algebraic error (which no Galerkin bound
   *  covers): the ratio says nothing about the discrete problem, and the floor has its own reason. */
  atFloor: boolean;
}

export interface CeaAssessment {
  /** Levels whose ratio was judged (measured, not at round-off). */
  judged: number[];
  /** Judged levels above 1 + QUASI_OPTIMALITY_SLACK. */
  over: number[];
  /** Measured levels left out because their errors sit at a floor. */
  leftOut: number[];
  /** Set when the bound is broken on the finest judged level and the excess does not shrink: a flaw, to be part
   *  of the verdict of every norm. */
  broken: string | null;
  /** Set when levels exceed the bound but the finest is within it, or the excess shrinks: a warning only. */
  note: string | null;
}

const ratioText = (q: number): string => (q < 1.1 ? q.toFixed(4) : q.toFixed(2));
const levelList = (levels: readonly number[]): string => {
  const sorted = [...levels].sort((a, b) => a - b);
  const contiguous = sorted.every((v, i) => i === 0 || v === sorted[i - 1]! + 1);
  if (sorted.length > 2 && contiguous) return `levels ${sorted[0]! + 1}–${sorted[sorted.length - 1]! + 1}`;
  return `level${sorted.length > 1 ? 's' : ''} ${sorted.map((v) => v + 1).join(', ')}`;
};

/**
 * Judges the quasi-optimality ratios of a ladder: levels at a floor are left out; the bound counts as broken when
 * the finest judged level exceeds 1 + QUASI_OPTIMALITY_SLACK and its excess q − 1 is not below CEA_SHRINK times the
 * previous judged level's (a single judged level cannot show shrinking, so it counts as broken).
 */
export function assessQuasiOptimality(levels: readonly CeaLevel[]): CeaAssessment {
  const measured = levels.filter((l) => l.ratio !== null && l.ratio !== undefined && Number.isFinite(l.ratio));
  const leftOut = measured.filter((l) => l.atFloor).map((l) => l.index);
  const kept = measured.filter((l) => !l.atFloor).sort((a, b) => a.index - b.index);
  const judged = kept.map((l) => l.index);
  const over = kept.filter((l) => l.ratio! > 1 + QUASI_OPTIMALITY_SLACK);
  const out: CeaAssessment = { judged, over: over.map((l) => l.index), leftOut, broken: null, note: null };
  if (!over.length) return out;
  const worst = Math.max(...over.map((l) => l.ratio!));
  const finest = kept[kept.length - 1]!;
  const ratios = kept.map((l) => ratioText(l.ratio!)).join(', ');
  if (finest.ratio! <= 1 + QUASI_OPTIMALITY_SLACK) {
    out.note = `Céa ratio above 1 at ${levelList(out.over)} (up to ${ratioText(worst)}×) but within the bound on the finest ` +
      `level (${ratios}): quadrature of the data on coarse meshes, not a flaw`;
    return out;
  }
  const previous = kept.length >= 2 ? kept[kept.length - 2]! : null;
  const shrinking = previous !== null && finest.ratio! - 1 <= CEA_SHRINK * (previous.ratio! - 1);
  if (shrinking) {
    out.note = `Céa ratio above 1 at ${levelList(out.over)} (up to ${ratioText(worst)}×) but shrinking toward 1 ` +
      `(${ratios}): consistent with quadrature of the data; watch it on finer levels`;
    return out;
  }
  out.broken = `Céa bound broken at ${levelList(out.over)}: energy error up to ${ratioText(worst)}× the interpolation ` +
    `error and not shrinking toward 1 (${ratios}) — for a symmetric problem the Galerkin solution is the best ` +
    'approximation in the energy norm (Céa 1964), so the discrete problem is likely not the PDE: check boundary data, ' +
    'load and quadrature';
  return out;
}

/** Makes a broken Céa bound part of every norm's verdict: `below-order` (the error exceeds what the theory allows)
 *  with the reason first; an `exact` norm stays exact, a norm already below order gets the reason added. */
export function applyQuasiOptimality(analyses: SeriesAnalysis[], broken: string): void {
  for (const a of analyses) {
    if (a.verdict === 'exact') continue;
    if (a.verdict === 'below-order') {
      a.reasons.push(broken);
    } else {
      a.reasons.unshift(`${broken} — below-order although the ${a.verdict === 'on-order' ? 'rates look right' : `verdict on the rates alone is ${a.verdict}`}`);
      a.verdict = 'below-order';
    }
  }
}
