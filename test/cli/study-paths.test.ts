import { describe, expect, it } from 'vitest';
import { resolveStudyPaths } from '../../src/external/study-paths.ts';
import { external } from '../../src/external/types.ts';

// Paths in an external command are the study file's: ./ and ../ words (and a relative cwd) are resolved against its
// folder; bare words keep their meaning (a program on PATH, an argument for the solver).
describe('external command paths relative to the study file', () => {
  const dir = '/projects/kiln/studies';
  it('resolves ./ and ../ words of a command string, keeps the others and the placeholders', () => {
    const d = resolveStudyPaths(external({ command: 'python3 ./rod.py --mesh "../meshes/rod a.msh" --n {n} --out {out}', output: 'vtk' }), dir);
    expect(d.command).toEqual(['python3', '/projects/kiln/studies/rod.py', '--mesh', '/projects/kiln/meshes/rod a.msh', '--n', '{n}', '--out', '{out}']);
  });
  it('resolves argv words, the preflight and a relative cwd; leaves a command without such words as written', () => {
    const d = resolveStudyPaths(external({ command: ['./bin/solve', '{n}'], preflight: 'sh ../check.sh {out}', cwd: 'work', output: 'errors' }), dir);
    expect([d.command, d.preflight, d.cwd]).toEqual([['/projects/kiln/studies/bin/solve', '{n}'], ['sh', '/projects/kiln/check.sh', '{out}'], '/projects/kiln/studies/work']);
    const plain = external({ command: 'python3 examples/solver.py --n {n}', cwd: '/abs', output: 'errors' });
    expect(resolveStudyPaths(plain, dir)).toEqual(plain);
  });
});
