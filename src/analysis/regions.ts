// Where the order drops: an observed order per region of the mesh (the strip along each boundary tag, the cells
// where two strips meet, the interior) and a reason that names the place. The regions and their error sums come
// from src/mesh/regions.ts.
import type { RegionError, RegionErrors, RegionPeak } from '../mesh/regions.ts';
import { fitOrderInH } from './fit.ts';
import { rateInH } from './rates.ts';
import type { OrderFit } from './types.ts';
import { DEFAULT_FIT_WINDOW, DEFAULT_TOLERANCE } from './verdict.ts';

/** A region's order differs from the interior's when the gap exceeds this. Regional fits are noisier than the
 *  global one (a strip is a small set of cells that changes from level to level, slow to reach the asymptotic
 *  range), and a boundary flaw worth naming costs at least half an order; 0.3 sits between the two (common
 *  practice, no source). */
export const REGION_ORDER_MARGIN = 0.3;

/** When every region shares the order and the order is below the expected one, strips whose RMS density on the
 *  finest level is at least this many times the interior's are named as where the error is densest (chosen, no
 *  source: smooth sound errors vary by less than that between a strip and the interior of a simple domain). */
export const DENSITY_NOTE_FACTOR = 2;

/** A region's error comes from one point when the cells around one vertex hold at least this share of it on the
 *  finest two levels (an error spread along a strip of m cells puts about 6/m there in 2D, under 0.4 from m = 16 on)
 *  and the share falls by less than POINT_SHARE_FALL between them (a spread error's halves). Chosen, no source. */
export const POINT_SHARE = 0.5;
export const POINT_SHARE_FALL = 1.5;

export type RegionNorm = 'L2' | 'H1semi';

/** One level: its mesh size and the error sums of its regions (regionErrors). */
export interface RegionLevel {
  h: number;
  regions: RegionErrors;
}

export interface RegionOptions {
  /** How many of the finest usable levels to fit (default DEFAULT_FIT_WINDOW). */
  fitWindow?: number;
  /** Allowed |p − expected| for the interior to count as on order (default DEFAULT_TOLERANCE). */
  tolerance?: number;
  /** First level on a floor in the global analysis (SeriesAnalysis.floorFrom); it and later levels are left out. */
  floorFrom?: number | null;
  /** Whether the exact solution is singular at a point (its gradient grows toward it; src/study/where.ts
   *  singularityTest). Without it, no strip is put down to a point singularity. */
  singularAt?: (at: number[]) => boolean;
}

/** The observed order of one region. The local measure is the RMS density sqrt(Σ ∫_K e² / |region|): it does not
 *  depend on the region's size, so a strip one cell wide (measure ∝ h) and the interior (measure ≈ |Ω|) are
 *  compared on equal terms; the region's plain L2 sum would give the strip half an order more for the same
 *  pointwise error. */
export interface RegionOrder {
  kind: 'interior' | 'strip' | 'meet';
  /** [] for the interior, [tag] for a strip (its own cells, in no other strip), [a, b] where two strips meet. */
  tags: string[];
  /** RMS density per level; null where the region is empty or its error is not positive. */
  rms: (number | null)[];
  /** rates[i] between levels i − 1 and i; null where either RMS is missing. */
  rates: (number | null)[];
  fit: OrderFit | null;
  order: number | null;
  /** RMS over the interior's on the finest level before any floor where both have one (null for the interior). */
  densityRatio: number | null;
  /** Order below the interior's by more than REGION_ORDER_MARGIN. */
  low: boolean;
  /** Where the region's error gathers on the finest usable level (strips and meets; null for the interior). */
  peak: RegionPeak | null;
  /** The region's error comes from one point, peak.at (see pointOf). */
  point: boolean;
  /** A slow strip whose error comes from a point where the exact solution is singular (RegionOptions.singularAt). */
  singular?: boolean;
}

/** 'localised': some strips (or meets of two strips) converge more slowly than the interior; 'point': the only slow
 *  strips owe their order to one point where the exact solution is singular (a re-entrant corner, say); 'uniform': every
 *  region shares the interior's order; 'faster-strips': none is slower but some strips converge faster (below
 *  the expected order, the strips that are not faster are named: nothing holds the error down there);
 *  'inconclusive': the interior or every strip lacks an order. */
export type RegionPattern = 'localised' | 'point' | 'uniform' | 'faster-strips' | 'inconclusive';

export interface RegionAnalysis {
  norm: RegionNorm;
  expected: number | null;
  interior: RegionOrder;
  strips: RegionOrder[];
  meets: RegionOrder[];
  pattern: RegionPattern;
  /** The tags named as the likely cause (each tag once), in order of their orders, lowest first. */
  places: string[];
  reason: string;
}

/** Fits an order per region over the ladder and names the place where the order drops. Levels coarse to fine. */
export function analyseRegions(
  levels: readonly RegionLevel[],
  norm: RegionNorm,
  expected: number | null,
  options: RegionOptions = {},
): RegionAnalysis {
  const h = levels.map((l) => l.h);
  const usableEnd = Math.min(levels.length, options.floorFrom ?? levels.length);
  const window = options.fitWindow ?? DEFAULT_FIT_WINDOW;
  const tolerance = options.tolerance ?? DEFAULT_TOLERANCE;
  const build = (kind: RegionOrder['kind'], tags: string[], pick: (r: RegionErrors) => RegionError | undefined) => {
    const order = regionOrder(kind, tags, levels.map((l) => rmsOf(pick(l.regions), norm)), h, usableEnd, window);
    // Meets are a few cells at a corner by construction: their peak says nothing about where the error comes from.
    if (kind === 'strip') pointOf(order, levels.map((l) => peakOf(pick(l.regions), norm)), h, usableEnd);
    return order;
  };

  const interior = build('interior', [], (r) => r.interior);
  const tagNames = levels.length > 0 ? levels[levels.length - 1]!.regions.tagNames : [];
  const strips = tagNames.map((tag) => build('strip', [tag], (r) => r.own[r.tagNames.indexOf(tag)]));
  const meets = meetKeys(levels).map(([a, b]) =>
    build('meet', [a, b], (r) => r.meets.find((m) => m.tags[0] === a && m.tags[1] === b)));
  for (const region of [...strips, ...meets]) compareWithInterior(region, interior, usableEnd);
  // A slow strip whose error gathers at one point where the exact solution is singular owes its order to that point.
  for (const s of strips) s.singular = s.low && s.point && s.peak !== null && (options.singularAt?.(s.peak.at) ?? false);
  return { norm, expected, interior, strips, meets, ...judge(interior, strips, meets, expected, tolerance) };
}

function peakOf(region: RegionError | undefined, norm: RegionNorm): RegionPeak | null {
  if (region === undefined) return null;
  return (norm === 'L2' ? region.peakL2 : region.peakH1semi) ?? null;
}

/**
 * Whether a region's error comes from one point: on the finest two usable levels that have a peak, the cells around
 * one vertex hold at least POINT_SHARE of the region's error, at the same place (within the coarser level's h), and
 * the share does not fall away (an error spread along the region halves its share with every halving of h; see
 * src/mesh/regions.ts regionPeak). Sets region.peak (the finest) and region.point.
 */
function pointOf(region: RegionOrder, peaks: (RegionPeak | null)[], h: readonly number[], usableEnd: number): void {
  const found: number[] = [];
  for (let i = usableEnd - 1; i >= 0 && found.length < 2; i--) if (peaks[i] && region.rms[i] !== null) found.push(i);
  region.peak = found.length > 0 ? peaks[found[0]!]! : null;
  if (found.length < 2) return;
  const fine = peaks[found[0]!]!, coarse = peaks[found[1]!]!;
  const apart = Math.hypot(...fine.at.map((x, d) => x - coarse.at[d]!));
  region.point = fine.share >= POINT_SHARE && coarse.share >= POINT_SHARE && fine.share >= coarse.share / POINT_SHARE_FALL &&
    apart <= h[found[1]!]!;
}

function rmsOf(region: RegionError | undefined, norm: RegionNorm): number | null {
  if (region === undefined) return null;
  const value = norm === 'L2' ? region.rmsL2 : region.rmsH1semi;
  return value !== null && value > 0 && Number.isFinite(value) ? value : null;
}

/** Every pair of tags that meets on some level, in order of first appearance. */
function meetKeys(levels: readonly RegionLevel[]): [string, string][] {
  const keys = new Map<string, [string, string]>();
  for (const level of levels) for (const m of level.regions.meets) keys.set(`${m.tags[0]}\u0000${m.tags[1]}`, m.tags);
  return [...keys.values()];
}

function regionOrder(
  kind: RegionOrder['kind'], tags: string[], rms: (number | null)[], h: number[], usableEnd: number, window: number,
): RegionOrder {
  const rates: (number | null)[] = rms.map((e, i) => {
    const prev = i > 0 ? rms[i - 1] : null;
    if (e === null || prev === null || prev === undefined) return null;
    const p = rateInH(prev, e, h[i - 1]!, h[i]!);
    return Number.isFinite(p) ? p : null;
  });
  const usable: number[] = [];
  for (let i = 0; i < usableEnd; i++) if (rms[i] !== null) usable.push(i);
  const chosen = usable.slice(-Math.max(window, 2));
  const fit = chosen.length >= 2 ? fitOrderInH(rms.map((e) => e ?? Number.NaN), h, chosen) : null;
  return { kind, tags, rms, rates, fit, order: fit ? fit.order : null, densityRatio: null, low: false, peak: null, point: false };
}

function compareWithInterior(region: RegionOrder, interior: RegionOrder, usableEnd: number): void {
  if (region.order !== null && interior.order !== null) region.low = region.order < interior.order - REGION_ORDER_MARGIN;
  for (let i = usableEnd - 1; i >= 0; i--) {
    const a = region.rms[i], b = interior.rms[i];
    if (a !== null && a !== undefined && b !== null && b !== undefined) { region.densityRatio = a / b; return; }
  }
}

/** The pattern, the places and the reason in words. */
function judge(
  interior: RegionOrder, strips: RegionOrder[], meets: RegionOrder[], expected: number | null, tolerance: number,
): { pattern: RegionPattern; places: string[]; reason: string } {
  const pInterior = interior.order;
  if (pInterior === null) {
    return { pattern: 'inconclusive', places: [], reason: 'the interior has fewer than two levels with cells and a positive error: the regions cannot be compared' };
  }
  if (!strips.some((s) => s.order !== null)) {
    return { pattern: 'inconclusive', places: [], reason: 'no boundary strip has two levels with a positive error: the regions cannot be compared' };
  }
  const singular = strips.filter((s) => s.singular);
  const lowTags = new Set(strips.filter((s) => s.low).map((s) => s.tags[0]!));
  // A meet that is low only because one of its strips is low says nothing new; one between two sound strips
  // points at the corner (2D) or edge (3D) itself.
  const lowMeets = meets.filter((m) => m.low && !m.tags.some((t) => lowTags.has(t)));
  // Lowest first by the order as shown (one decimal), so that ties keep the tag order.
  const shown = (r: RegionOrder) => Math.round(r.order! * 10);
  const low = [...strips.filter((s) => s.low && !s.singular), ...lowMeets].sort((a, b) => shown(a) - shown(b));
  const below = expected !== null && pInterior < expected - tolerance;
  if (low.length > 0) {
    const l = localised(low, pInterior, below ? expected : null);
    return singular.length > 0 ? { ...l, reason: `${l.reason}; ${singularText(singular, null)}` } : l;
  }
  if (singular.length > 0) {
    const also = below ? `; the interior, too, is below the expected order ${expected}` : '';
    return { pattern: 'point', places: [], reason: `${singularText(singular, pInterior)}${also}` };
  }
  const faster = strips.filter((s) => s.order !== null && s.order > pInterior + REGION_ORDER_MARGIN);
  if (faster.length === 0) {
    const loss = below ? `: the loss is not tied to one part of the boundary${densityNote(strips)}` : '';
    return { pattern: 'uniform', places: [], reason: `the order is the same in every region (${fmt(pInterior)})${loss}` };
  }
  const same = strips.filter((s) => s.order !== null && !faster.includes(s));
  return { pattern: 'faster-strips', ...heldDown(pInterior, faster, same, below) };
}

/**
 * Some strips converge faster than the interior and none more slowly. Where the discrete solution is held to the
 * right boundary values (Dirichlet data interpolated correctly) a smooth error vanishes on the boundary, so over a
 * strip one cell wide its RMS is about h |∂e/∂n|: up to one order more than in the interior (in L2). When the
 * order is below the expected one, a smooth error spread over the domain carries the loss; the strips that share
 * the interior's order are then the parts of the boundary where nothing holds it down (wrong Dirichlet values, a
 * wrong flux), and when every strip is faster the error is held down all round and comes from inside. A loss from
 * inside also leaves strips with right Neumann data at the interior's order (nothing holds the error there either),
 * hence "likely": the reason names the boundary parts to look at first.
 */
function heldDown(
  pInterior: number, faster: RegionOrder[], same: RegionOrder[], below: boolean,
): { places: string[]; reason: string } {
  const fasterList = andList(faster.map((s) => `'${s.tags[0]}' (${fmt(s.order!)})`));
  if (!below) {
    return { places: [], reason: `no boundary strip converges more slowly than the interior (${fmt(pInterior)}); faster along ${fasterList}` };
  }
  if (same.length === 0) {
    return {
      places: [],
      reason: `every boundary strip converges faster than the interior (${fmt(pInterior)}; ${fasterList}): the error is ` +
        'held down along the whole boundary, so the loss comes from inside the domain (the source, the coefficients or ' +
        'the discretization), not from the boundary data',
    };
  }
  const sameTags = same.map((s) => s.tags[0]!);
  const sameList = andList(sameTags.map(quote));
  return {
    places: sameTags,
    reason: `order ${fmt(pInterior)} in the interior and the strip${same.length > 1 ? 's' : ''} along ${sameList}, faster along ` +
      `${fasterList}: the error is held down along ${andList(faster.map((s) => quote(s.tags[0]!)))} only, so the data on ` +
      `${sameList} is the likely cause`,
  };
}

function localised(low: RegionOrder[], pInterior: number, expected: number | null): { pattern: RegionPattern; places: string[]; reason: string } {
  const sameOrder = low.every((r) => fmt(r.order!) === fmt(low[0]!.order!));
  const stripTags = low.filter((r) => r.kind === 'strip').map((r) => r.tags[0]!);
  const meetPairs = low.filter((r) => r.kind === 'meet').map((r) => r.tags as [string, string]);
  let where: string;
  if (sameOrder && meetPairs.length === 0 && stripTags.length > 1) {
    where = `order ${fmt(low[0]!.order!)} in the strips along ${andList(stripTags.map(quote))}`;
  } else {
    where = 'order ' + low.map((r) => `${fmt(r.order!)} ${regionPhrase(r)}`).join(', ');
  }
  const causes: string[] = [];
  if (stripTags.length > 0) causes.push(`on ${andList(stripTags.map(quote))}`);
  for (const [a, b] of meetPairs) causes.push(`where '${a}' meets '${b}'`);
  const also = expected !== null ? `; the interior, too, is below the expected order ${expected}` : '';
  const places = [...new Set(low.flatMap((r) => r.tags))];
  return {
    pattern: 'localised',
    places,
    reason: `${where}, ${fmt(pInterior)} in the interior: the data ${andList(causes)} is the likely cause${also}`,
  };
}

/** "order 0.2 in the strip along 'reentrant', with 92% of its error around (0, 0), where the exact solution is not
 *  smooth (…): the singularity at (0, 0), not the data on 'reentrant', is the likely cause (…)" for strips put down to
 *  a singular point; with the interior's order after the first strip when pInterior is given. */
function singularText(strips: RegionOrder[], pInterior: number | null): string {
  const interior = pInterior !== null ? ` (${fmt(pInterior)} in the interior)` : '';
  const one = (s: RegionOrder, i: number) =>
    `order ${fmt(s.order!)} in the strip along '${s.tags[0]}'${i === 0 ? interior : ''}, with ${Math.round(100 * s.peak!.share)}% of its error in the cells around ${pointText(s.peak!.at)}`;
  const points = [...new Set(strips.map((s) => pointText(s.peak!.at)))];
  return `${strips.map(one).join(', ')}, where the exact solution is not smooth (its gradient grows toward ${points.length > 1 ? 'those points' : 'that point'}): ` +
    `the singularity at ${andList(points)}, not the data on ${andList(strips.map((s) => quote(s.tags[0]!)))}, is the likely cause ` +
    '(uniform refinement cannot restore the order next to it; graded meshes can)';
}

/** "(0, 0)", "(0.5, 1, 0.25)": coordinates with up to three significant digits. */
function pointText(at: number[]): string {
  return `(${at.map((x) => String(Number(x.toPrecision(3)))).join(', ')})`;
}

/** "; on the finest level the error is densest in the strip along 'top' (3.1 times the interior's RMS)" naming the
 *  strips at DENSITY_NOTE_FACTOR or more, densest first; '' when none. */
function densityNote(strips: RegionOrder[]): string {
  const dense = strips
    .filter((s) => s.densityRatio !== null && s.densityRatio >= DENSITY_NOTE_FACTOR)
    .sort((a, b) => b.densityRatio! - a.densityRatio!);
  if (dense.length === 0) return '';
  const list = dense.map((s, i) => `'${s.tags[0]}' (${s.densityRatio!.toFixed(1)} times${i === 0 ? " the interior's RMS" : ''})`);
  return `; on the finest level the error is densest in the strip${dense.length > 1 ? 's' : ''} along ${andList(list)}`;
}

function regionPhrase(r: RegionOrder): string {
  return r.kind === 'meet' ? `where '${r.tags[0]}' meets '${r.tags[1]}'` : `in the strip along '${r.tags[0]}'`;
}

function quote(tag: string): string {
  return `'${tag}'`;
}

/** "a", "a and b", "a, b and c". */
function andList(items: string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** An order with one decimal; −0.0 shown as 0.0. */
function fmt(order: number): string {
  const text = order.toFixed(1);
  return text === '-0.0' ? '0.0' : text;
}
