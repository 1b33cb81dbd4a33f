import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { parseFormula } from '../../src/exact/formula.ts';

function messageOf(run: () => unknown): { message: string; where: string | undefined } {
  try {
    run();
  } catch (err) {
    expect(err).toBeInstanceOf(RungsInputError);
    return { message: (err as Error).message, where: (err as RungsInputError).where };
  }
  throw new Error('expected a RungsInputError');
}

describe('parseFormula', () => {
  it('accepts the coordinates of the dimension, pi, e, arithmetic and whitelisted functions', () => {
    expect(parseFormula('sin(pi*x) * exp(-y) + sqrt(x^2 + z^2) / e', 'exact', 3).toString()).toBe(
      'sin(pi * x) * exp(-y) + sqrt(x ^ 2 + z ^ 2) / e',
    );
    expect(() => parseFormula('2x + log(x, 10) + pow(x, 3) - +x', 'exact', 1)).not.toThrow();
  });

  it('reports a parse error with mathjs message and 1-based column', () => {
    const { message, where } = messageOf(() => parseFormula('sin(x', 'exact', 1));
    expect(message).toBe('exact: cannot parse "sin(x": Parenthesis ) expected at column 6');
    expect(where).toBe('exact');
    expect(messageOf(() => parseFormula('x +* 2', 'coefficients.k', 1)).message).toMatch(
      /^coefficients\.k: cannot parse "x \+\* 2": Value expected at column 4$/,
    );
  });

  it('names an unknown variable and lists what is valid', () => {
    const { message, where } = messageOf(() => parseFormula('sin(x*t)', 'exact', 1));
    expect(where).toBe('exact');
    expect(message).toMatch(/^exact: the symbol "t" in "sin\(x\*t\)" is not allowed in 1D; valid: variables x; constants pi, e;/);
    expect(message).toMatch(/functions sin, cos, tan,.* sqrt, cbrt, abs, pow$/);
    expect(messageOf(() => parseFormula('x*y', 'exact', 1)).message).toMatch(/"y"/);
    expect(messageOf(() => parseFormula('x*y*z', 'exact', 2)).message).toMatch(/"z".*variables x, y;/);
  });

  it.each([
    ['max(x, 1)', /the function "max"/],
    ['sin(x, 2)', /"sin" with 2 argument\(s\) \(takes 1\)/],
    ['x == 1', /the operator "=="/],
    ['x mod 2', /the operator "mod"/],
    ['x!', /the operator "!"/],
    ['50%', /the percent sign/],
    ['[x, 1]', /ArrayNode/],
    ['a = x', /AssignmentNode/],
    ['x > 0 ? x : 0', /ConditionalNode/],
    ['"x"', /the constant "x"/],
    ['true * x', /the constant true/],
    ['PI * x', /the symbol "PI"/],
  ])('refuses %s', (text, pattern) => {
    expect(messageOf(() => parseFormula(text, 'exact', 2)).message).toMatch(pattern);
  });

  it('refuses an empty or non-string formula', () => {
    expect(messageOf(() => parseFormula('  ', 'exact', 2)).message).toMatch(/empty/);
    expect(messageOf(() => parseFormula(3 as unknown as string, 'exact', 2)).message).toMatch(/expected a formula string/);
  });
});
