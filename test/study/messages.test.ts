import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { executeStudies } from '../../src/cli/execute.ts';
import { loadStudy } from '../../src/study/load.ts';

// Bad coefficients and singular formulas are named as such before any level runs (not as "a singular matrix").
describe('messages that name the real mistake', async () => {
  const out = mkdtempSync(join(tmpdir(), 'rungs-messages-'));
  const { results, problems } = await executeStudies(['test/fixtures/messages'], { out, quiet: true });
  const msg = (file: string) => problems.find((p) => p.file.endsWith(file))?.message ?? `(no problem reported for ${file})`;

  it('refuses every fixture and runs no level of any', () => {
    expect(results).toHaveLength(0);
    expect(problems).toHaveLength(9);
    for (const p of problems) expect(p.message).not.toMatch(/pure Neumann problem needs a constraint|level \d/);
  });
  it('a zero conductivity', () => expect(msg('k-zero.study.ts')).toMatch(/k-zero\.study\.ts \(study 'fixture-k-zero'\): coefficients\.k is zero everywhere .*\(k > 0\)/));
  it('a negative conductivity', () => expect(msg('k-negative.study.ts')).toMatch(/coefficients\.k is negative \(k = -2 at \(x=1\.00000, y=1\.00000\)\).*k > 0/));
  it('a conductivity that changes sign', () => expect(msg('k-sign-change.study.ts')).toMatch(/coefficients\.k changes sign: k = -0\.5 at \(x=0\.00000, y=0\.00000\) but 0\.5 at \(x=1\.00000/));
  it('a negative Robin coefficient', () => expect(msg('robin-negative.study.ts')).toMatch(/boundary\.robin\.alpha is -2 at \(x=[0-9.]+, y=1\.00000\) on the Robin boundary \('top'\).*α must be ≥ 0/));
  // On (0, 1) with Dirichlet ends the first eigenvalue of −u'' is π² ≈ 9.87 (sin(πx)), so c = −20 gives a(v, v) < 0.
  it('a reaction that outweighs the diffusion', () => expect(msg('reaction-outweighs.study.ts')).toMatch(/coefficients\.c is -20 .*λ1 = π²Σ1\/L² = 9\.87.*not coercive/));
  it('an insulated tile with c = 0', () => expect(msg('neumann-reaction-zero.study.ts')).toMatch(/coefficients\.c: every boundary part is Neumann and the reaction c is zero everywhere/));
  it('a pole inside the domain, at the point', () => expect(msg('pole-inside.study.ts')).toMatch(/exact is \+Infinity at \(x=0\.500000\) inside the domain/));
  it('a pole between sample points, by following a sign change', () => expect(msg('pole-between.study.ts')).toMatch(/exact is .* at \(x=0\.300000, y=[0-9.]+\)/));
  it('log(x) at the boundary point x = 0', () => expect(msg('log-boundary.study.ts')).toMatch(/exact is -Infinity at \(x=0\.00000\) on the boundary of the domain/));
});

describe('loading study files', () => {
  it('a TypeScript syntax error names the file, the line and the column', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rungs-syntax-'));
    const file = join(dir, 'kiln-syntax.study.ts');
    copyFileSync('test/fixtures/messages/syntax-error.study.txt', file);
    // Line 4 is "  exact: 'x*y' coefficients: { k: 1 },": a comma is missing before `coefficients` (column 15 or 16,
    // depending on whether the transformer points at the gap or the word).
    await expect(loadStudy(file)).rejects.toThrow(/kiln-syntax\.study\.ts:4:1[56]: syntax error at line 4, column 1[56]: .*(Expected|expected)/);
  });

  it('an error thrown by the study names where it was thrown', async () => {
    await expect(loadStudy('test/fixtures/mixed/throws.study.ts')).rejects.toThrow(/the study file threw while loading: kiln controller offline \(at line \d+, column \d+\)/);
  });

  // A study in a folder with no package.json and no node_modules (os.tmpdir) imports 'rungs': the rungs command lends
  // it its own copy and loads it as an ES module. Run as a child process, since that is how the loader hooks apply.
  it('a study outside the project imports rungs when run by the rungs command', () => {
    const dir = mkdtempSync(join(tmpdir(), 'rungs-outside-'));
    writeFileSync(join(dir, 'rod.study.ts'), [
      "import { defineStudy, interval, lagrange } from 'rungs';",
      "export default defineStudy({ name: 'rod-outside', domain: interval(0, 1), exact: 'sin(x) + x',",
      "  discretization: lagrange({ degree: 1 }), ladder: { n: [4, 8, 16] } });",
    ].join('\n'));
    const out = join(dir, 'reports');
    execFileSync(process.execPath, [resolve('bin/rungs.mjs'), 'run', dir, '--out', out, '--quiet', '--jobs', '1'], { encoding: 'utf8', cwd: dir });
    expect(readFileSync(join(out, 'rod-outside.csv'), 'utf8').trim().split('\n')).toHaveLength(4);
  }, 600_000);
});
