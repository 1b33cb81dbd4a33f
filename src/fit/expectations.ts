import { RungsInputError } from '../errors.ts';

/** Expected orders: one number for every error column, or one per column name. */
export type Expectations = number | Record<string, number>;

/** Reads "2" or "L2=2,H1semi=1" (blanks allowed); `option` names the flag in messages. */
export function parseExpectations(text: string, option = '--expect'): Expectations {
  const trimmed = text.trim();
  if (trimmed === '') throw new RungsInputError(`${option}: give an order such as 2, or orders per column such as L2=2,H1semi=1`, option);
  if (!trimmed.includes('=')) return orderValue(trimmed, option, trimmed);
  const out: Record<string, number> = {};
  for (const part of trimmed.split(',')) {
    const eq = part.indexOf('=');
    const name = part.slice(0, eq).trim();
    if (eq < 0 || name === '') {
      throw new RungsInputError(`${option}: "${part.trim()}" is not NAME=ORDER; write for example L2=2,H1semi=1`, option);
    }
    if (name in out) throw new RungsInputError(`${option}: ${name} is given twice`, option);
    out[name] = orderValue(part.slice(eq + 1).trim(), option, part.trim());
  }
  return out;
}

function orderValue(text: string, option: string, part: string): number {
  const v = Number(text);
  if (text === '' || !Number.isFinite(v)) throw new RungsInputError(`${option}: "${part}" — the order must be a finite number, got "${text}"`, option);
  return v;
}

/** The expected order of one series: by its name, by its column name, or the single number; null when none. */
export function expectationFor(exp: Expectations | undefined, name: string, column: string, allowSingle: boolean): number | null {
  if (exp === undefined) return null;
  if (typeof exp === 'number') return allowSingle ? exp : null;
  return exp[name] ?? exp[column] ?? null;
}
