import { parse } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { formulaText } from '../../src/codegen/formula-text.ts';
import { RungsInputError } from '../../src/errors.ts';
import { mulberry32 } from '../../src/mesh/random.ts';
import { KILN_FORMULAS } from './bundle.ts';

const text = (f: string, style: 'pow' | 'starstar') => formulaText(parse(f), style);

/** The text run as JavaScript, with the function names it may use bound to Math (pow for the 'pow' style). */
function asJavaScript(formula: string): (x: number, y: number, z: number, t: number) => number {
  const names = 'sin cos tan asin acos atan sinh cosh tanh asinh acosh atanh exp log log10 sqrt cbrt abs sign pow';
  return new Function('x', 'y', 'z', 't', `"use strict"; const { ${names.split(' ').join(', ')} } = Math; return ${formula};`) as never;
}

describe('formulaText', () => {
  it('writes powers as ** or pow(a, b), never ^, keeping the grouping of the tree', () => {
    expect(text('x^2 + (y - 1)^0.5', 'starstar')).toBe('x ** 2 + (y - 1) ** 0.5');
    expect(text('x^2 + (y - 1)^0.5', 'pow')).toBe('pow(x, 2) + pow(y - 1, 0.5)');
    expect(text('x^2^3', 'starstar')).toBe('x ** (2 ** 3)');
    expect(text('(x^2)^3', 'starstar')).toBe('(x ** 2) ** 3');
    expect(text('-x^2', 'starstar')).toBe('-(x ** 2)');
    expect(text('(-x)^2', 'starstar')).toBe('(-x) ** 2');
    expect(text('2^-x', 'starstar')).toBe('2 ** (-x)');
    expect(text('x - (y - z)', 'pow')).toBe('x - (y - z)');
    expect(text('x / (y * z)', 'pow')).toBe('x / (y * z)');
    expect(text('x + (y + z)', 'pow')).toBe('x + (y + z)');
    expect(text('x * -y', 'pow')).toBe('x * (-y)');
    expect(text('-2 * x', 'pow')).toBe('(-2) * x');
  });

  it('writes constants, pi and e to full precision and the reciprocal functions out as rungs computes them', () => {
    // From memory: pi = 3.141592653589793 and e = 2.718281828459045 as shortest round-tripping doubles.
    expect(text('pi * x + e', 'pow')).toBe('3.141592653589793 * x + 2.718281828459045');
    expect(text('0.1 + 1e-7 + 6.02e23', 'pow')).toBe('0.1 + 1e-7 + 6.02e+23');
    expect(text('sec(x) + acot(y) + log(x, 3)', 'pow')).toBe('1 / cos(x) + atan(1 / y) + log(x) / log(3)');
    expect(text('abs(x) * sign(y) + cbrt(z)', 'pow')).toBe('abs(x) * sign(y) + cbrt(z)');
  });

  it('reads back, in both styles, as the value mathjs gives the original tree', () => {
    // Reference: mathjs 15 evaluate (outside library); common practice, no source: a few ulps of the largest term.
    const random = mulberry32(17);
    const failures: string[] = [];
    for (const [name, [formula]] of Object.entries(KILN_FORMULAS)) {
      const node = parse(formula);
      for (const style of ['pow', 'starstar'] as const) {
        const t = formulaText(node, style);
        if (t.includes('^')) failures.push(`${name} ${style}: ${t}`);
        const f = asJavaScript(t);
        for (let i = 0; i < 50; i++) {
          const at = { x: random(), y: random(), z: random(), t: 2 * random() };
          const ref = node.evaluate({ ...at }) as number;
          const got = f(at.x, at.y, at.z, at.t);
          if (!(Math.abs(got - ref) <= 1e-14 * Math.max(1, Math.abs(ref)))) failures.push(`${name} ${style} ${got} vs ${ref}`);
        }
      }
    }
    expect(failures).toEqual([]);
  });

  it('refuses a style it does not offer, naming the valid ones', () => {
    expect(() => formulaText(parse('x'), 'caret' as never)).toThrow(RungsInputError);
    expect(() => formulaText(parse('x'), 'caret' as never)).toThrow(/"caret".*valid: pow, starstar/);
  });
});
