/** Number formats shared by every report writer, so a value reads the same in the terminal, Markdown, LaTeX and HTML. */

/** Mantissa and exponent of x in scientific notation with `digits` significant digits, or null when x is not finite. */
export function sciParts(x: number, digits = 3): { mantissa: string; exponent: number } | null {
  if (!Number.isFinite(x)) return null;
  const [mantissa, exp] = x.toExponential(digits - 1).split('e');
  return { mantissa, exponent: Number(exp) };
}

/** "1.23e-04": three significant digits, a signed two-digit exponent, so columns line up. */
export function sci(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined) return '—';
  const parts = sciParts(x, digits);
  if (parts === null) return nonFinite(x);
  const sign = parts.exponent < 0 ? '-' : '+';
  return `${parts.mantissa}e${sign}${String(Math.abs(parts.exponent)).padStart(2, '0')}`;
}

/** "2.1e-7": the short form used in one-line messages (two significant digits, exponent as JS prints it). */
export function sciShort(x: number): string {
  if (!Number.isFinite(x)) return nonFinite(x);
  return x.toExponential(1).replace('e+', 'e');
}

/** Fixed decimals, or '—' when there is no value. */
export function fixed(x: number | null | undefined, decimals = 2): string {
  if (x === null || x === undefined) return '—';
  if (!Number.isFinite(x)) return nonFinite(x);
  const s = x.toFixed(decimals);
  // "-0.00" reads like a sign error; a value that rounds to zero is shown without a sign.
  return Number(s) === 0 ? (0).toFixed(decimals) : s;
}

/** An expected order as given: 3, 1.5, 0.667 (no trailing zeros). */
export function orderText(p: number | null | undefined): string {
  if (p === null || p === undefined) return 'none';
  if (!Number.isFinite(p)) return nonFinite(p);
  return String(Number(p.toPrecision(3)));
}

/** "[2.95, 3.01]" with '∞' for the unbounded interval a two-point fit gives. */
export function intervalText(low: number, high: number, decimals = 2): string {
  return `[${fixed(low, decimals)}, ${fixed(high, decimals)}]`;
}

/** Human level number (1-based) from the 0-based index stored in results. */
export function levelNumber(index: number): number {
  return index + 1;
}

/** "3–5" or "2, 4, 5" for a list of 0-based level indices, shown 1-based. */
export function levelRangeText(indices: readonly number[]): string {
  if (indices.length === 0) return 'none';
  const shown = indices.map(levelNumber);
  const contiguous = shown.every((v, i) => i === 0 || v === shown[i - 1] + 1);
  if (contiguous && shown.length > 1) return `${shown[0]}–${shown[shown.length - 1]}`;
  return shown.join(', ');
}

function nonFinite(x: number): string {
  if (Number.isNaN(x)) return 'n/a';
  return x > 0 ? '∞' : '−∞';
}

/** A standard error with two significant digits ("0.0042"), 'n/a' when it is not defined (two-point fits). */
export function stderrText(s: number): string {
  if (!Number.isFinite(s)) return nonFinite(s);
  if (s === 0) return '0';
  return s >= 0.01 ? s.toFixed(2) : s.toPrecision(2);
}

/** A count such as dofs or cells: the integer, or '—' when the level did not report it (a table read by `rungs fit`
 *  without that column holds NaN there). */
export function countText(n: number | null | undefined): string {
  return n === null || n === undefined || !Number.isFinite(n) ? '—' : String(n);
}

/** Text closed by one full stop: a description that already ends in '.', '!' or '?' gets none added, so that a caption
 *  built from it never shows "edge.." (common practice, no source). */
export function sentence(text: string): string {
  const t = text.trimEnd();
  return t === '' || /[.!?]$/.test(t) ? t : `${t}.`;
}
