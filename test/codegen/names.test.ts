import { parse } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { generateCode } from '../../src/codegen/generate.ts';
import { LANGUAGES } from '../../src/codegen/languages.ts';
import { POINT_ARGUMENTS, type DataBundle, type GeneratedFunction } from '../../src/codegen/types.ts';
import { RungsInputError } from '../../src/errors.ts';

const fn = (name: string, formulas = ['x + y'], extra: Partial<GeneratedFunction> = {}): GeneratedFunction => ({
  name, doc: 'tile data', args: POINT_ARGUMENTS, outputs: formulas.map((f) => parse(f)), outputNames: formulas.map((_, i) => `v${i}`), ...extra,
});
const bundle = (...functions: GeneratedFunction[]): DataBundle => ({ study: 'tile-glaze', dim: 2, hasTime: false, functions });

function refusal(action: () => unknown): RungsInputError {
  try {
    action();
  } catch (err) {
    if (err instanceof RungsInputError) return err;
    throw err;
  }
  throw new Error('expected a RungsInputError');
}

describe('bad input', () => {
  it('refuses a language that is not offered, listing the languages', () => {
    const err = refusal(() => generateCode(bundle(fn('exact_u')), 'matlab' as never));
    expect(err.message).toContain('"matlab"');
    expect(err.message).toContain(`valid: ${LANGUAGES.join(', ')}`);
    expect(err.message).toContain('tile-glaze');
  });

  it('refuses names that are keywords or no identifier in some target language, saying why and what is valid', () => {
    // Common practice, no source: end (Julia, Fortran), function (Julia, JavaScript), real (Fortran), in (Python,
    // Julia, JavaScript), class (C++, Python, JavaScript), y0 (a Bessel function of C's math.h), sin (hides the math
    // function in Fortran and Julia).
    const cases: Array<[string, RegExp]> = [
      ['end', /reserved in .*Fortran.*Julia/], ['function', /reserved in .*Julia.*JavaScript/], ['real', /reserved in Fortran/],
      ['in', /reserved in .*Python.*Julia/], ['class', /reserved in C\+\+.*Python/], ['y0', /reserved in C/],
      ['sin', /reserved in every language/], ['2u', /not an identifier/], ['u-x', /not an identifier/], ['', /not an identifier/],
      ['_u', /not an identifier/], ['ü', /not an identifier/], ['rungs_sign', /starts with "rungs_"/], ['w3', /temporary/],
      ['x', /reserved in the generated code/], [`u${'a'.repeat(63)}`, /longer than 63/],
    ];
    const problems: string[] = [];
    for (const [name, why] of cases) {
      const err = refusal(() => generateCode(bundle(fn(name)), 'c'));
      if (!why.test(err.message) || !err.message.includes(`"${name}"`) || !err.message.includes('valid: a letter')) {
        problems.push(`${name}: ${err.message}`);
      }
    }
    expect(problems).toEqual([]);
  });

  it('refuses two names that differ only in case (Fortran ignores case)', () => {
    expect(() => generateCode(bundle(fn('heat_u'), fn('Heat_U')), 'python')).toThrow(/"heat_u" and "Heat_U" are the same ignoring case/);
  });

  it('accepts ordinary snake_case names in every language', () => {
    for (const language of LANGUAGES) expect(generateCode(bundle(fn('exact_u'), fn('source_heat2')), language)).toHaveLength(2);
  });

  it('refuses symbols and functions the code cannot have, naming the function and output', () => {
    expect(() => generateCode(bundle(fn('exact_u', ['x + q'])), 'c')).toThrow(/exact_u output 1 \(v0\): the symbol "q"/);
    expect(() => generateCode(bundle(fn('exact_u', ['gamma(x)'])), 'c')).toThrow(/the function "gamma"/);
    expect(() => generateCode(bundle(fn('exact_u', ['x + nx'])), 'c')).toThrow(/the symbol "nx".*valid: arguments x, y, z, t/);
  });

  it('refuses outputs and names of different counts, and unknown or misordered arguments', () => {
    expect(() => generateCode(bundle(fn('exact_u', ['x'], { outputNames: [] })), 'c')).toThrow(/1 output\(s\) and 0 output name/);
    expect(() => generateCode(bundle(fn('exact_u', ['x'], { args: ['y', 'x'] })), 'c')).toThrow(/arguments \(y, x\)/);
    expect(() => generateCode(bundle(fn('exact_u', ['x'], { args: ['x', 'w' as never] })), 'c')).toThrow(RungsInputError);
  });

  it('refuses a sample box where a formula has no real value, and bad sample options', () => {
    expect(() => generateCode(bundle(fn('exact_u', ['sqrt(x - 2)'])), 'c')).toThrow(/exact_u output 1 is NaN at sample point 1.*options\.box/);
    expect(() => generateCode(bundle(fn('exact_u', ['sqrt(x - 2)'])), 'c', { box: { x: [2, 3] } })).not.toThrow();
    expect(() => generateCode(bundle(fn('exact_u')), 'c', { box: { x: [1, 0] } })).toThrow(/box\.x is \[1,0\]/);
    expect(() => generateCode(bundle(fn('exact_u')), 'c', { samplePoints: 0 })).toThrow(/samplePoints is 0/);
  });
});
