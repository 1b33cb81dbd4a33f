/**
 * What the report writers need to know about a study with time (StudyResult.time): whether it has time at all, the
 * sentence that says what its ladder refines, the steps and Δt of a level as text, the slices of a two-axis design and
 * the joint fit of each norm in words. Studies without time get null / false from every function here, so that their
 * reports stay exactly as they were.
 */
import type { TimeAxis, TwoAxisAnalysis, TwoAxisFit, Verdict } from '../analysis/types.ts';
import type { LevelResult, StudyResult } from '../study/result.ts';
import { fixed, intervalText, orderText, sci } from './numbers.ts';
import { verdictLabel } from './verdict.ts';

/** The study has time: it declares `time`, or a level records its steps or Δt. */
export function hasTime(result: StudyResult): boolean {
  return result.time !== undefined || result.levels.some((l) => l.steps !== undefined || l.dt !== undefined);
}

/** The axis the ladder refines, or null for a steady study (or a study with time whose declaration is absent). */
export function timeAxisOf(result: StudyResult): TimeAxis | null {
  return result.time?.axis ?? null;
}

/** A two-axis (h, Δt) design whose norms carry a joint fit. */
export function isGrid(result: StudyResult): boolean {
  return result.time?.axis === 'grid';
}

/** The joint fit of one norm of a two-axis design, when the study has one. */
export function twoAxisOf(result: StudyResult, norm: string): TwoAxisAnalysis | undefined {
  return result.twoAxis?.find((t) => t.name === norm);
}

/** How a built-in stepper is written in reports; a stepper rungs does not know is shown as given. */
const STEPPER_NAMES: Record<string, string> = {
  'backward-euler': 'backward Euler',
  'crank-nicolson': 'Crank–Nicolson',
  bdf2: 'BDF2',
  dirk3: 'DIRK3 (Alexander)',
};

export function stepperName(stepper: string | null): string {
  if (stepper === null) return "the code's own stepper";
  return STEPPER_NAMES[stepper] ?? stepper;
}

/** A number as given, without float noise: 1, 0.5, 2.5e-3 → "0.0025". */
export function plainNumber(x: number): string {
  if (!Number.isFinite(x)) return sci(x);
  return String(Number(x.toPrecision(6)));
}

/**
 * How the mathematical bits of the sentences below are written: plain text (terminal, Markdown, HTML, CSV) or LaTeX
 * (each formula one math span). `text` escapes the words around them.
 */
export interface Notation {
  /** The time step: Δt. */
  dt: string;
  /** A coupled path: Δt = c·h^s. */
  coupled: (c: string, exponent: string) => string;
  /** The model of a two-axis design: e = C_h·h^p + C_t·Δt^q. */
  model: string;
  /** A pair of the design: (h, Δt). */
  pair: string;
  times: string;
  text: (s: string) => string;
}

export const PLAIN: Notation = {
  dt: 'Δt',
  coupled: (c, s) => `Δt = ${c}·h^${s}`,
  model: 'e = C_h·h^p + C_t·Δt^q',
  pair: '(h, Δt)',
  times: '×',
  text: (s) => s,
};

/** Δt = T/steps as a fraction ("1/64"; "2/64 = 3.13e-02" when T is not 1), or Δt in scientific notation. */
export function dtFraction(final: number | undefined, level: Pick<LevelResult, 'steps' | 'dt'>): string {
  if (level.steps !== undefined && final !== undefined && Number.isFinite(final)) {
    const fraction = `${plainNumber(final)}/${level.steps}`;
    return final === 1 ? fraction : `${fraction} = ${sci(level.dt ?? final / level.steps)}`;
  }
  return sci(level.dt);
}

/** Distinct values in order of first appearance. */
function distinct<T>(values: readonly T[]): T[] {
  return [...new Set(values)];
}

/** "n = 64", or "h = 1.56e-02" when the ladder is given by h; several meshes are listed. */
function meshText(levels: readonly LevelResult[]): string {
  const ns = distinct(levels.map((l) => l.n));
  if (ns.every((n) => n !== null)) return `n = ${ns.join(', ')}`;
  return `h = ${distinct(levels.map((l) => sci(l.h))).join(', ')}`;
}

/**
 * One sentence saying what the ladder of a study with time does, or null for a steady study:
 * "time: T = 1, BDF2 (temporal order 2); Δt refined on a fixed mesh (n = 64), fitted against Δt: the temporal order".
 */
export function timeLine(result: StudyResult, notation: Notation = PLAIN): string | null {
  const t = result.time;
  if (!t) return null;
  const N = notation;
  const w = N.text;
  const order = t.order === null ? 'no temporal order declared' : `temporal order ${orderText(t.order)}`;
  const head = w(`time: T = ${plainNumber(t.final)}, ${stepperName(t.stepper)} (${order}); `);
  const levels = result.levels;
  switch (t.axis) {
    case 'dt':
      return head + `${N.dt}${w(` refined on a fixed mesh (${meshText(levels)}), fitted against `)}${N.dt}${w(': the temporal order')}`;
    case 'h': {
      const dts = distinct(levels.map((l) => dtFraction(t.final, l)));
      const at = dts.length === 0 ? '' : ` at ${N.dt}${w(` = ${dts.join(', ')}`)}`;
      return head + w(`mesh refined`) + at + w(', fitted against h: the spatial order');
    }
    case 'coupled': {
      const c = t.coupled;
      const path = c ? N.coupled(plainNumber(c.c), plainNumber(c.exponent)) : `${N.dt}${w(' tied to h')}`;
      return head + w('coupled path ') + path + w(' (steps rounded up so that they divide T), one fit against h');
    }
    case 'grid': {
      const meshes = distinct(levels.map((l) => l.n ?? l.h)).length;
      const steps = distinct(levels.map((l) => l.steps ?? l.dt)).length;
      return head + w(`two-axis design of ${levels.length} `) + N.pair + w(` pairs (${meshes} meshes `) + N.times +
        w(` ${steps} step counts), fitted jointly as `) + N.model;
    }
  }
}

/** Where rates and fitted orders are measured: " in Δt" when the ladder refines Δt, else nothing. */
export function fitAxisSuffix(result: StudyResult, notation: Notation = PLAIN): string {
  return result.time?.axis === 'dt' ? `${notation.text(' in ')}${notation.dt}` : '';
}

/** Steps of a level as text, '—' when absent. */
export function stepsText(level: LevelResult): string {
  return level.steps === undefined ? '—' : String(level.steps);
}

// ---- two-axis designs ----

/** The levels of a grid that share one value of the other axis, in the order the levels come. */
export interface Slice {
  /** Label for a legend: "Δt = 1/64" or "n = 16 (h = 6.25e-02)". */
  label: string;
  /** The value held fixed along the slice (Δt for a slice in h, h for a slice in Δt). */
  fixed: number;
  /** Positions in result.levels, in ladder order. */
  positions: number[];
}

/** Slices of a two-axis design: `inH` one per Δt (error against h), `inDt` one per mesh (error against Δt). */
export function gridSlices(result: StudyResult): { inH: Slice[]; inDt: Slice[] } {
  const final = result.time?.final;
  const group = (key: (l: LevelResult) => string, label: (l: LevelResult) => string, value: (l: LevelResult) => number): Slice[] => {
    const slices = new Map<string, Slice>();
    result.levels.forEach((l, i) => {
      const k = key(l);
      const s = slices.get(k);
      if (s) s.positions.push(i);
      else slices.set(k, { label: label(l), fixed: value(l), positions: [i] });
    });
    return [...slices.values()];
  };
  // Levels of one mesh share n (or, without n, h to 12 digits); levels of one step size share steps (or Δt).
  const inH = group(
    (l) => (l.steps !== undefined ? `s${l.steps}` : `d${l.dt?.toPrecision(12)}`),
    (l) => `Δt = ${dtFraction(final, l)}`,
    (l) => l.dt ?? Number.NaN,
  ).sort((a, b) => b.fixed - a.fixed);
  const inDt = group(
    (l) => (l.n !== null ? `n${l.n}` : `h${l.h.toPrecision(12)}`),
    (l) => (l.n !== null ? `n = ${l.n} (h = ${sci(l.h)})` : `h = ${sci(l.h)}`),
    (l) => l.h,
  ).sort((a, b) => b.fixed - a.fixed);
  for (const s of [...inH, ...inDt]) s.positions.sort((a, b) => a - b);
  return { inH, inDt };
}

/** The model e = C_h h^p + C_t Δt^q of a joint fit, evaluated. */
export function jointModel(fit: TwoAxisFit, h: number, dt: number): number {
  return fit.Ch * h ** fit.p + fit.Ct * dt ** fit.q;
}

/** "2.01 [1.95, 2.07]" for one order of a joint fit, '—' without a fit. */
export function jointOrderText(fit: TwoAxisFit | null, which: 'p' | 'q'): string {
  if (!fit) return '—';
  const [lo, hi] = which === 'p' ? fit.pInterval : fit.qInterval;
  return `${fixed(which === 'p' ? fit.p : fit.q)} ${intervalText(lo, hi)}`;
}

/** "p = 2.01 [1.95, 2.07], expected 2: ✓ on-order; q = …" (symbols optional), or "no joint fit; verdicts …". */
export function jointFitText(ta: TwoAxisAnalysis, withSymbol = true): string {
  const v = (x: Verdict) => (withSymbol ? verdictLabel(x) : x);
  const one = (which: 'p' | 'q') => {
    const expected = which === 'p' ? ta.expected.space : ta.expected.time;
    const verdict = which === 'p' ? ta.verdict.space : ta.verdict.time;
    const value = ta.fit ? `${which} = ${jointOrderText(ta.fit, which)}` : `${which}: no fit`;
    return `${value}, expected ${orderText(expected)}: ${v(verdict)}`;
  };
  return `${one('p')}; ${one('q')}`;
}

/** The verdicts of both orders in a few words: "(h ✓ on-order, Δt ✗ below-order)". */
export function jointVerdictText(ta: TwoAxisAnalysis, withSymbol = true): string {
  const v = (x: Verdict) => (withSymbol ? verdictLabel(x) : x);
  return `(h ${v(ta.verdict.space)}, Δt ${v(ta.verdict.time)})`;
}

/** The display tables (terminal, Markdown, LaTeX, HTML) show pairwise rates except for a two-axis design, whose
 *  consecutive levels differ in h, in Δt or in both, so that a rate between them measures no one order. The CSV
 *  keeps the rate columns of every study. */
export function showsRates(result: StudyResult): boolean {
  return result.time?.axis !== 'grid';
}
