import { parse } from 'mathjs';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { planFunction, MAX_INLINE_NODES } from '../../src/codegen/cse.ts';
import { evaluate } from '../../src/codegen/evaluate.ts';
import { lower } from '../../src/codegen/expr.ts';
import { generateCode, prepareBundle } from '../../src/codegen/generate.ts';
import { POINT_ARGUMENTS, type DataBundle } from '../../src/codegen/types.ts';
import { KILN_BOX, kilnBundle } from './bundle.ts';

const plan = (...formulas: string[]) => planFunction(formulas.map((f) => lower(parse(f), POINT_ARGUMENTS, 'test')));
const oneFunction = (formulas: string[]): DataBundle => ({
  study: 'tile-cse', dim: 2, hasTime: false,
  functions: [{ name: 'tile_data', doc: 'test', args: POINT_ARGUMENTS, outputs: formulas.map((f) => parse(f)), outputNames: formulas.map((_, i) => `v${i}`) }],
});
const cText = (formulas: string[]): string => generateCode(oneFunction(formulas), 'c')[0].text;
const occurrences = (text: string, word: string): number => text.split(word).length - 1;

describe('common subexpressions', () => {
  it('computes a subtree repeated within and across outputs once, and leaves single uses inline', () => {
    // Common practice, no source: sin(x*y) twice and x*y three times become temporaries; cos(y) once stays inline.
    const text = cText(['sin(x * y) + cos(y) * (x * y)', 'sin(x * y) * exp(x * y)']);
    const body = text.slice(text.indexOf('tile_data'));
    expect(occurrences(body, 'sin(')).toBe(1);
    expect(occurrences(body, 'x * y')).toBe(1);
    expect(occurrences(body, 'cos(')).toBe(1);
    expect(body).toMatch(/const double w0 = x \* y;\n\s+const double w1 = sin\(w0\);/);
    expect(plan('sin(x) + cos(y)').temps).toEqual([]);
  });

  it('shares structurally equal trees however they were written (parentheses, unary plus, pow(a, b) and a^b)', () => {
    const p = plan('(x + 1)^2.5 + pow((x + 1), 2.5) + +(x + 1)^2.5');
    const pows = p.nodes.filter((n) => n.kind === 'pow');
    expect(pows.length).toBe(1);
    expect(p.temps.map((i) => p.nodes[i].kind)).toEqual(['pow']);
  });

  it('shares more than function calls: sums, products and quotients', () => {
    const p = plan('(x + y) / (x - y) + 1 / ((x + y) / (x - y))');
    const kinds = p.temps.map((i) => { const n = p.nodes[i]; return n.kind === 'bin' ? n.op : n.kind; });
    expect(kinds).toEqual(['/']);
  });

  it('lists temporaries in dependency order: each is defined before any statement reads it', () => {
    const text = generateCode(kilnBundle(), 'javascript', { box: KILN_BOX, samplePoints: 2 })[0].text;
    const problems: string[] = [];
    for (const body of text.split('export function').slice(1)) {
      const defined = new Set<string>();
      for (const line of body.split('\n')) {
        const def = /^\s+const (w\d+) = /.exec(line);
        const reads = (def ? line.slice(def[0].length) : line).match(/\bw\d+\b/g) ?? [];
        for (const r of reads) if (!defined.has(r)) problems.push(`${r} read before definition: ${line.trim()}`);
        if (def) defined.add(def[1]);
      }
    }
    expect(problems).toEqual([]);
  });

  it('writes squares and cubes as products of a named base, other powers as calls', () => {
    const text = cText(['(x + y)^2 + (x - y)^3 + x^2.5 + x^(-1)']);
    expect(text).toMatch(/const double w0 = x \+ y;/);
    expect(text).toMatch(/\(w0 \* w0\)/);
    expect(text).toMatch(/\(w1 \* w1 \* w1\)/);
    expect(text).toMatch(/pow\(x, 2\.5\)/);
    expect(text).toMatch(/pow\(x, \(-1\.0\)\)|pow\(x, -1\.0\)/);
  });

  it(`moves any subtree larger than ${MAX_INLINE_NODES} nodes into a temporary, so Fortran statements stay within its limits`, () => {
    // Fortran 2008 (ISO/IEC 1539-1:2010, 3.3.2.1 and 3.3.2.4): free-form lines of at most 132 characters, at most 255
    // continuation lines per statement.
    const sum = Array.from({ length: 400 }, (_, i) => `${i + 1}.25 * sin(${i + 1} * x + y)`).join(' + ');
    const text = generateCode(oneFunction([sum]), 'fortran')[0].text;
    const lines = text.split('\n');
    expect(lines.filter((l) => l.length > 132)).toEqual([]);
    let run = 0;
    let longest = 0;
    for (const l of lines) { run = l.trimEnd().endsWith('&') ? run + 1 : 0; longest = Math.max(longest, run); }
    expect(longest).toBeLessThanOrEqual(255);
    expect(longest).toBeGreaterThan(0);
  });
});

describe('the generated JavaScript and the evaluator that computes the self-test values', () => {
  it('give the same bits at every sample point (the same operations in the same order)', async () => {
    const bundle = kilnBundle();
    const prepared = prepareBundle(bundle, { box: KILN_BOX, samplePoints: 200, seed: 3 });
    const dir = mkdtempSync(join(tmpdir(), 'rungs-codegen-js-'));
    try {
      const [data] = generateCode(bundle, 'javascript', { box: KILN_BOX, samplePoints: 1 });
      writeFileSync(join(dir, data.name), data.text);
      const module = (await import(pathToFileURL(join(dir, data.name)).href)) as Record<string, (...a: number[]) => number | Float64Array>;
      const mismatches: string[] = [];
      for (const f of prepared.functions) {
        for (const at of prepared.points) {
          const got = module[f.fn.name](...f.fn.args.map((a) => at[a]));
          const values = typeof got === 'number' ? [got] : Array.from(got);
          f.exprs.forEach((e, k) => {
            if (!Object.is(values[k], evaluate(e, at))) mismatches.push(`${f.fn.name}[${k}] ${values[k]} vs ${evaluate(e, at)}`);
          });
        }
      }
      expect(mismatches).toEqual([]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
