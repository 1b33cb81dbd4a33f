// The pattern across the norms of one study, mapped to likely causes. One norm's rates say that something is wrong;
// how the L2 and gradient norms fail together says what it likely is. The mappings are common practice, no source,
// except where named; every cause is "likely", never certain.
import type { SeriesAnalysis } from './types.ts';
import { rateShape } from './rate-patterns.ts';

const GRADIENT_NORMS = new Set(['H1semi', 'H1', 'energy']);
/** A norm short of its order by at most this much still counts as keeping it next to one that lost a whole order. */
export const INTACT_SHORTFALL = 0.25;
/** Shortfalls within this band around 1 count as "one order low". */
export const ONE_ORDER = [0.6, 1.4] as const;
/** Norms whose shortfalls agree within this much are "low by the same amount". */
export const SAME_SHORTFALL = 0.3;

const fixed2 = (x: number): string => x.toFixed(2);
const plain = (x: number): string => String(Number(x.toPrecision(3)));

/** The rates before any floor, without gaps. */
function usableRates(a: SeriesAnalysis): number[] {
  const end = a.floorFrom ?? a.rates.length;
  return a.rates.slice(0, end).filter((r): r is number => r !== null);
}

const shortfall = (a: SeriesAnalysis): number | null =>
  a.fit && a.expected !== null ? a.expected - a.fit.order : null;
const shape = (a: SeriesAnalysis) => (a.expected === null ? null : rateShape(usableRates(a), a.expected, a.tolerance).kind);
const intact = (a: SeriesAnalysis): boolean => {
  const s = shortfall(a);
  return a.verdict === 'on-order' || a.verdict === 'exact' || (s !== null && s <= INTACT_SHORTFALL && s >= -a.tolerance);
};
const fitted = (a: SeriesAnalysis): string => `${a.name} ${a.fit ? fixed2(a.fit.order) : 'n/a'} vs ${a.expected === null ? '?' : plain(a.expected)}`;

export interface CrossNormReason {
  /** The norms the reason is added to. */
  norms: string[];
  reason: string;
}

/**
 * Reads the pattern across the analyses of one study (in the order of these rules, first match wins per norm):
 * - every norm flat (errors never decrease) → the discrete problem is likely not the PDE u solves;
 * - every norm stopping at a constant after decreasing → likely a fixed perturbation that does not shrink with h;
 * - L2 about one order low while the gradient norms keep theirs → likely a consistency error of order h^k, or an
 *   adjoint problem without full regularity (the Aubin–Nitsche argument needs it; Brenner & Scott 2008, §5.4);
 * - every below-order norm low by about the same amount → likely an inconsistent term costing that power everywhere;
 * - a gradient norm above its order while L2 keeps its own → likely the gradient error is measured against I_h u;
 * - a gradient norm low while L2 keeps its order → likely the discrete gradient is computed or mapped wrongly.
 */
export function crossNormReasons(analyses: readonly SeriesAnalysis[]): CrossNormReason[] {
  const judged = analyses.filter((a) => a.expected !== null && a.verdict !== 'exact');
  const out: CrossNormReason[] = [];
  if (judged.length < 2) return out;
  const names = (list: readonly SeriesAnalysis[]) => list.map((a) => a.name);
  const shapes = judged.map(shape);

  if (shapes.every((s) => s === 'flat')) {
    out.push({
      norms: names(judged),
      reason: `across norms: no norm decreases (${names(judged).join(', ')}) — likely the discrete problem is not the ` +
        'PDE the exact solution satisfies: a wrong sign or a missing term, boundary data or a source that do not match ' +
        'u, or errors measured against a different u',
    });
    return out;
  }
  if (shapes.every((s) => s === 'stopped' || s === 'falling-away')) {
    out.push({
      norms: names(judged),
      reason: `across norms: the errors stop falling in every norm (${names(judged).join(', ')}) — likely a fixed ` +
        'perturbation that does not shrink with h: a solver tolerance set in absolute terms, data or constants given ' +
        'to a few digits (a rounded coefficient in u or the source), or a geometry that does not refine',
    });
    return out;
  }

  const l2 = judged.find((a) => a.name === 'L2');
  const grads = judged.filter((a) => GRADIENT_NORMS.has(a.name));
  const s2 = l2 ? shortfall(l2) : null;
  if (l2 && grads.length && l2.verdict === 'below-order' && s2 !== null && s2 >= ONE_ORDER[0] && s2 <= ONE_ORDER[1] && grads.every(intact)) {
    out.push({
      norms: ['L2'],
      reason: `across norms: L2 is about one order low (${fitted(l2)}) while ${names(grads).join(', ')} keep${grads.length > 1 ? '' : 's'} ` +
        'its order — likely a consistency error of order h^k that the gradient norms absorb and L2 shows: a load or ' +
        'boundary flux integrated too coarsely, boundary values or coefficients represented at too low an order; or an ' +
        'adjoint problem without full regularity (a re-entrant corner, a change of boundary condition), which the ' +
        'Aubin–Nitsche argument needs',
    });
    return out;
  }

  const below = judged.filter((a) => a.verdict === 'below-order' && shortfall(a) !== null);
  if (below.length >= 2 && below.length === judged.length) {
    const falls = below.map((a) => shortfall(a)!);
    const spread = Math.max(...falls) - Math.min(...falls);
    const mean = falls.reduce((x, y) => x + y, 0) / falls.length;
    if (spread <= SAME_SHORTFALL && mean >= 0.5 && below.every((a) => a.axis === 'dt')) {
      out.push({
        norms: names(below),
        reason: `across norms: every norm loses about ${plain(Math.round(mean * 2) / 2)} order${Math.abs(mean - 1) < 0.25 ? '' : 's'} ` +
          'in Δt alike — the time stepper, not the space discretization, is the likely cause',
      });
      return out;
    }
    if (spread <= SAME_SHORTFALL && mean >= 0.5) {
      out.push({
        norms: names(below),
        reason: `across norms: every norm is about ${plain(Math.round(mean * 2) / 2)} order${Math.abs(mean - 1) < 0.25 ? '' : 's'} low ` +
          `(${below.map(fitted).join('; ')}) — likely an inconsistent term that costs the same power of h everywhere: ` +
          'a quadrature rule too weak for the load or the stiffness, an element or mapping of lower degree than ' +
          'declared, or expected orders set for the wrong degree',
      });
      return out;
    }
  }

  const gradAbove = grads.filter((a) => a.verdict === 'above-order');
  if (gradAbove.length && (!l2 || intact(l2))) {
    out.push({
      norms: names(gradAbove),
      reason: `across norms: ${names(gradAbove).join(', ')} converge${gradAbove.length > 1 ? '' : 's'} faster than expected ` +
        `while ${l2 ? 'L2 keeps its order' : 'no L2 error contradicts it'} — likely the gradient error is taken against ` +
        "the interpolant's gradient (∇I_h u, superconvergent on structured meshes) or only at special points, instead " +
        'of against ∇u over the whole domain',
    });
    return out;
  }
  const gradBelow = grads.filter((a) => a.verdict === 'below-order');
  if (l2 && gradBelow.length && intact(l2)) {
    out.push({
      norms: names(gradBelow),
      reason: `across norms: ${names(gradBelow).join(', ')} ${gradBelow.length > 1 ? 'are' : 'is'} low (${gradBelow.map(fitted).join('; ')}) ` +
        "while L2 keeps its order — likely the discrete solution's gradient is computed or mapped wrongly (the " +
        'Jacobian of the reference map, the derivative of a basis function), or the gradient error is integrated ' +
        'against a wrong ∇u',
    });
  }
  return out;
}

/** Adds each cross-norm reason to the norms it names. */
export function addCrossNormReasons(analyses: SeriesAnalysis[]): CrossNormReason[] {
  const found = crossNormReasons(analyses);
  for (const f of found) {
    for (const a of analyses) if (f.norms.includes(a.name)) a.reasons.push(f.reason);
  }
  return found;
}
