// src/exact/mathjs.ts loads mathjs from its one-file build for speed. The same version's module build is the
// reference: both must parse, simplify and differentiate the formulas rungs handles into the same expressions and
// values (the formulas below are those of the bundled studies and of the equation presets' kind).
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as modules from 'mathjs';
import * as oneFile from '../../src/exact/mathjs.ts';

const FORMULAS = [
  'exp(-x) * sin(3*x) + x',
  'exp(-x) * sin(3*y) + x*y',
  '1 + 0.25*x*y',
  'sin(2*x) * cosh(y) + 0.5*x',
  'x^2 * (1 - x)^2 * y^(2/3) + sqrt(x^2 + y^2 + 1)',
  'atan(y / (1 + x)) + log(1 + x^2) - tanh(4*(x - 0.5)) / (2 + cos(t))',
  'abs(x - 0.3) * exp(-t) + sec(x) + acot(1 + y) + cbrt(2 + y) * sech(x)',
];

describe('mathjs one-file build against the module build', () => {
  it('parses, simplifies and differentiates alike', () => {
    const mismatches: string[] = [];
    for (const f of FORMULAS) {
      const a = modules.parse(f);
      const b = oneFile.parse(f);
      if (a.toString() !== b.toString()) mismatches.push(`parse ${f}`);
      if (modules.simplify(a).toString() !== oneFile.simplify(b).toString()) mismatches.push(`simplify ${f}`);
      for (const v of ['x', 'y', 't']) {
        const da = modules.derivative(a, v);
        const db = oneFile.derivative(b, v);
        if (da.toString() !== db.toString()) mismatches.push(`d/d${v} ${f}`);
        const at = { x: 0.37, y: 0.81, t: 0.25 };
        const va = da.evaluate(at) as number;
        const vb = db.evaluate(at) as number;
        if (va !== vb) mismatches.push(`d/d${v} ${f} at ${JSON.stringify(at)}: ${va} vs ${vb}`);
      }
    }
    expect(mismatches).toEqual([]);
  });

  it('is the same mathjs version', () => {
    expect(oneFile.version).toBe(modules.version);
  });

  it('is the only way src/ takes values from mathjs (type imports aside)', () => {
    const files = (readdirSync('src', { recursive: true }) as string[]).filter((f) => /\.(ts|mts|mjs)$/.test(f)).map((f) => join('src', f));
    const valueImports: string[] = [];
    for (const f of files) {
      if (f === join('src', 'exact', 'mathjs.ts')) continue;
      const text = readFileSync(f, 'utf8');
      for (const m of text.matchAll(/\bimport\s+([^;]*?)\s*from\s*['"]mathjs['"]/g)) {
        const what = m[1].trim();
        const typeOnly = what.startsWith('type ') || (/^\{[^}]*\}$/.test(what) && what.slice(1, -1).split(',').map((n) => n.trim()).filter(Boolean).every((n) => n.startsWith('type ')));
        if (!typeOnly) valueImports.push(`${f}: import ${what} from 'mathjs'`);
      }
      if (/\bawait\s+import\(\s*['"]mathjs['"]/.test(text)) valueImports.push(`${f}: await import('mathjs')`);
    }
    expect(valueImports).toEqual([]);
  });
});
