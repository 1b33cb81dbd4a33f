// Word splitting follows the quoting of POSIX sh (IEEE Std 1003.1-2017, Shell Command Language §2.2: single quotes
// keep everything literal, double quotes allow \" and \\, a backslash outside quotes keeps the next character), but
// nothing is expanded.
import { describe, expect, it } from 'vitest';
import { levelEnvironment, substituteWord } from '../../src/external/placeholders.ts';
import { splitCommandWords } from '../../src/external/words.ts';

describe('splitCommandWords', () => {
  it.each([
    ['python3 solver.py --n {n}', ['python3', 'solver.py', '--n', '{n}']],
    ['  a\t b\n c  ', ['a', 'b', 'c']],
    [`run 'two words' "say \\"hi\\"" back\\ slash`, ['run', 'two words', 'say "hi"', 'back slash']],
    [`x 'a'"b"c ''`, ['x', 'abc', '']],
    [`echo '$HOME' "*.vtk" a|b`, ['echo', '$HOME', '*.vtk', 'a|b']],
  ])('%s', (template, words) => {
    expect(splitCommandWords(template)).toEqual(words);
  });
  it('rejects unclosed quotes and empty commands', () => {
    expect(() => splitCommandWords(`solver 'oops`)).toThrow(/quote opened at character 8 is never closed/);
    expect(() => splitCommandWords('   ')).toThrow(/the command is empty/);
  });
});

describe('placeholders', () => {
  const v = { study: 'tile', level: 3, n: 16, h: 0.0625, degree: 2, out: '/tmp/o u t' };
  it('substitutes inside words, with {{ }} as literal braces', () => {
    expect(substituteWord('--out={out}/x_{n}_{level}', v)).toBe('--out=/tmp/o u t/x_16_3');
    expect(substituteWord('{{n}}={n}', v)).toBe('{n}=16');
    expect(substituteWord('{h}{degree}{study}', v)).toBe('0.06252tile');
  });
  it('rejects unknown or unclosed placeholders, listing the valid ones', () => {
    expect(() => substituteWord('{nn}', v)).toThrow('unknown placeholder {nn} in "{nn}"; valid placeholders: {n} {h} {level} {degree} {out} {study}');
    expect(() => substituteWord('{n', v)).toThrow(/unknown placeholder \{n\}/);
  });
  it('sets the same values in RUNGS_* variables', () => {
    expect(levelEnvironment(v)).toEqual({ RUNGS_STUDY: 'tile', RUNGS_LEVEL: '3', RUNGS_N: '16', RUNGS_H: '0.0625', RUNGS_OUT: '/tmp/o u t', RUNGS_DEGREE: '2' });
  });
});
